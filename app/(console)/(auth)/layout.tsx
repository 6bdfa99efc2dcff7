import type { ReactNode } from "react";
import { Wordmark } from "@/components/shell/wordmark";

// Pages for people who are not signed in: one narrow card, nothing else to get lost in.
export default function AuthLayout({ children }: { children: ReactNode }) {
  return (
    <main className="flex flex-1 items-start justify-center px-4 pt-[12vh]">
      <div className="w-full max-w-sm">
        <div className="mb-6 flex justify-center">
          <Wordmark className="text-lg" />
        </div>
        <div className="card p-6">{children}</div>
      </div>
    </main>
  );
}
