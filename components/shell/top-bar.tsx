import Link from "next/link";
import type { ReactNode } from "react";
import { Wordmark } from "@/components/shell/wordmark";

/** The bar across the top of the console and the API reference: wordmark home link, "/", where you are, then `children` at the right. */
export function TopBar({ place, placeLabel, children }: { place: ReactNode; placeLabel?: string; children?: ReactNode }) {
  return (
    <header className="border-b border-paper-line bg-white">
      <div className="mx-auto flex max-w-console items-center gap-4 px-6 py-2.5">
        <Link href="/" className="no-underline hover:no-underline">
          <Wordmark />
        </Link>
        <span className="text-graphite-faint" aria-hidden="true">
          /
        </span>
        <span className="font-medium" aria-label={placeLabel}>
          {place}
        </span>
        {children}
      </div>
    </header>
  );
}
