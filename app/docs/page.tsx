import type { Metadata } from "next";
import Link from "next/link";
import { Wordmark } from "@/components/shell/wordmark";
import { ApiReference } from "./docs-client";

export const metadata: Metadata = { title: "API reference" };

// The API reference is the OpenAPI document generated from the same zod schemas the handlers parse with.
export default function DocsPage() {
  return (
    <div className="flex flex-1 flex-col">
      <header className="border-b border-paper-line bg-white">
        <div className="mx-auto flex max-w-console items-center gap-4 px-6 py-2.5">
          <Link href="/" className="no-underline hover:no-underline">
            <Wordmark />
          </Link>
          <span className="text-graphite-faint" aria-hidden="true">
            /
          </span>
          <span className="font-medium">API reference</span>
          <a className="ml-auto text-dense" href="/api/v1/openapi.json">
            openapi.json
          </a>
        </div>
      </header>
      <main className="mx-auto w-full max-w-console flex-1 bg-white px-2 py-4">
        <ApiReference url="/api/v1/openapi.json" />
      </main>
    </div>
  );
}
