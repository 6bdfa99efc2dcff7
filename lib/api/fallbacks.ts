// Answers for what no route handler covers, as RFC 9457 problems: an unknown /api/v1 path (404) and a method a
// path does not have (405 with Allow, RFC 9110 §15.5.6). Next alone answers these with an HTML page or an empty 405.
import "server-only";
import { withPublic } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";

/** The methods a route file may export that Next does not implement by itself (it derives HEAD from GET and OPTIONS). */
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;
type Method = (typeof METHODS)[number];
type FallbackHandler = ReturnType<typeof withPublic>;

/** Every method of a path no route serves: 404 not-found. */
export function unknownPath(): Record<Method | "OPTIONS", FallbackHandler> {
  const notFound = withPublic(async ({ req }) => {
    throw new ApiError("not-found", `There is no ${req.method} ${new URL(req.url).pathname} in this API; see /api/v1/openapi.json.`);
  });
  return { GET: notFound, POST: notFound, PUT: notFound, PATCH: notFound, DELETE: notFound, OPTIONS: notFound };
}

/** The methods a route file lacks, each answering 405 with the `Allow` list of those it has, and OPTIONS with that
 *  list; the route file exports them: `export const { PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET", "POST")`. */
export function otherMethods<const M extends readonly Method[]>(...implemented: M): Record<Exclude<Method, M[number]> | "OPTIONS", FallbackHandler> {
  const has = (m: Method) => (implemented as readonly Method[]).includes(m);
  const allow = [...implemented, ...(has("GET") ? ["HEAD"] : []), "OPTIONS"].sort().join(", ");
  const notAllowed = withPublic(async ({ req }) => {
    throw new ApiError("method-not-allowed", `${new URL(req.url).pathname} answers ${allow}, not ${req.method}.`, { headers: { allow } });
  });
  // Next's own OPTIONS would list the 405 handlers above as allowed
  const options = withPublic(async () => new Response(null, { status: 204, headers: { allow } }));
  const missing = Object.fromEntries(METHODS.filter((m) => !has(m)).map((m) => [m, notAllowed]));
  return { ...missing, OPTIONS: options } as Record<Exclude<Method, M[number]> | "OPTIONS", FallbackHandler>;
}
