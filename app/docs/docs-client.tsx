"use client";

import dynamic from "next/dynamic";
import "swagger-ui-react/swagger-ui.css";

// Swagger UI touches `window` while loading, so it renders in the browser only.
const SwaggerUI = dynamic(() => import("swagger-ui-react"), {
  ssr: false,
  loading: () => <p className="px-4 text-graphite-muted">Loading the API reference…</p>,
});

export function ApiReference({ url }: { url: string }) {
  return <SwaggerUI url={url} docExpansion="list" defaultModelsExpandDepth={0} tryItOutEnabled={false} />;
}
