// What every feature-service route shares: the data routes' wrapper (authentication, `results:read`, request
// limits, errors as problem documents) and the absolute base of its links.
import "server-only";
import type { AuthedContext } from "@/lib/api/handler";
import { json } from "@/lib/api/handler";
import { env } from "@/lib/env";
import type { Bases } from "@/lib/features/documents";
import { withDataRoute } from "@/lib/jobs/route";

export function withFeatureRoute<P = Record<string, string>>(handler: (c: AuthedContext<P>, bases: Bases) => Promise<Response>) {
  return withDataRoute<P>((c) => {
    const root = env().RILLSCALE_PUBLIC_URL.replace(/\/+$/, "");
    return handler(c, { ogc: `${root}/api/v1/ogc`, openapi: `${root}/api/v1/openapi.json` });
  }, "results:read");
}

export const document = (body: unknown, contentType = "application/json") => json(body, 200, { "content-type": contentType });
