// RFC 9457 problem documents and the one mapper from thrown errors to responses. Each `type` is an absolute URI
// listed in the OpenAPI document's description (PROBLEM_TYPES), so clients can branch on it.
import { ZodError } from "zod";

export const PROBLEM_BASE = "https://rillscale.example/problems/";

export const PROBLEM_TYPES = {
  "bad-request": { status: 400, title: "The request could not be read" },
  unauthenticated: { status: 401, title: "Authentication required" },
  forbidden: { status: 403, title: "Not allowed for this role" },
  "insufficient-scope": { status: 403, title: "The API key lacks the scope this needs" },
  "cross-site": { status: 403, title: "Cross-site request refused" },
  "not-found": { status: 404, title: "Not found" },
  "method-not-allowed": { status: 405, title: "This path does not answer that method" },
  conflict: { status: 409, title: "Conflicts with the current state" },
  "payload-too-large": { status: 413, title: "Request body too large" },
  "range-not-satisfiable": { status: 416, title: "The range is outside the file" },
  "unsupported-media-type": { status: 415, title: "Send application/json" },
  validation: { status: 422, title: "The request is not valid" },
  "too-many-requests": { status: 429, title: "Too many attempts" },
  internal: { status: 500, title: "Internal error" },
  // The `error` of a failed job (GET /api/v1/jobs/{id}), not an HTTP answer of their own.
  "job-input": { status: 422, title: "The dataset or parameters cannot give a result" },
  "job-internal": { status: 500, title: "The analysis failed on our side" },
  "bad-gateway": { status: 502, title: "An upstream service failed" },
  "service-unavailable": { status: 503, title: "Busy; try again shortly" },
} as const;

export type ProblemKind = keyof typeof PROBLEM_TYPES;

export interface FieldError {
  pointer: string;
  detail: string;
}

/** A failure a handler or service means to report; anything else thrown becomes a 500 without details. */
export class ApiError extends Error {
  constructor(
    readonly kind: ProblemKind,
    readonly detail?: string,
    readonly options: { errors?: FieldError[]; headers?: Record<string, string> } = {},
  ) {
    super(detail ?? PROBLEM_TYPES[kind].title);
  }
}

/** JSON Pointer (RFC 6901) of a zod issue path. */
const pointer = (path: PropertyKey[]) => "/" + path.map((p) => String(p).replaceAll("~", "~0").replaceAll("/", "~1")).join("/");

export function problemResponse(kind: ProblemKind, requestId: string, detail?: string, extra: { errors?: FieldError[]; headers?: Record<string, string> } = {}): Response {
  const { status, title } = PROBLEM_TYPES[kind];
  const body = { type: PROBLEM_BASE + kind, title, status, ...(detail ? { detail } : {}), request_id: requestId, ...(extra.errors ? { errors: extra.errors } : {}) };
  return new Response(JSON.stringify(body), {
    status,
    headers: { "content-type": "application/problem+json", "x-request-id": requestId, ...extra.headers },
  });
}

export function toProblem(e: unknown, requestId: string): Response {
  if (e instanceof ApiError) return problemResponse(e.kind, requestId, e.detail, e.options);
  if (e instanceof ZodError) {
    const errors = e.issues.map((i) => ({ pointer: pointer(i.path), detail: i.message }));
    return problemResponse("validation", requestId, `${errors.length} field(s) failed validation`, { errors });
  }
  console.error(`[${requestId}] unhandled error:`, e);
  return problemResponse("internal", requestId, "Something failed on our side; quote the request id when reporting it.");
}
