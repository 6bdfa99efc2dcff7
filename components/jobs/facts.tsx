// A titled list of label–value pairs: the plain facts of a result, one line each.
import type { ReactNode } from "react";

export interface Fact {
  label: ReactNode;
  value: string;
}

export function Facts({ title, facts }: { title: string; facts: Fact[] }) {
  return (
    <section className="card p-4">
      <h2 className="mb-2">{title}</h2>
      <dl className="grid grid-cols-1 gap-x-6 gap-y-1.5 text-dense sm:grid-cols-[minmax(10rem,auto)_minmax(0,1fr)]">
        {facts.map((f, i) => (
          <div key={i} className="contents">
            <dt className="text-graphite-muted">{f.label}</dt>
            <dd className="tabular-nums">{f.value}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
