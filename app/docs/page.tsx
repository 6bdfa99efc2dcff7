import type { Metadata } from "next";
import { TopBar } from "@/components/shell/top-bar";
import { ApiReference } from "./docs-client";

export const metadata: Metadata = { title: "API reference" };

// The API reference is the OpenAPI document generated from the same zod schemas the handlers parse with.
export default function DocsPage() {
  return (
    <div className="flex flex-1 flex-col">
      <TopBar place="API reference">
        <a className="ml-auto text-dense" href="/api/v1/openapi.json">
          openapi.json
        </a>
      </TopBar>
      <main className="mx-auto w-full max-w-console flex-1 bg-white px-2 py-4">
        <ApiReference url="/api/v1/openapi.json" />
      </main>
    </div>
  );
}
