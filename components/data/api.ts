// The console's one way to call /api/v1 from the browser: same-origin JSON with the session cookie,
// and RFC 9457 problem documents turned into one error type the pages can show.

export interface ProblemFieldError {
  pointer: string;
  detail: string;
}

export class ApiProblem extends Error {
  readonly status: number;
  readonly title: string;
  readonly detail: string | undefined;
  readonly errors: ProblemFieldError[];
  readonly retryAfterSeconds: number | undefined;

  constructor(status: number, body: Record<string, unknown>, retryAfter: string | null) {
    const title = typeof body.title === "string" ? body.title : `Request failed (${status})`;
    super(typeof body.detail === "string" ? body.detail : title);
    this.name = "ApiProblem";
    this.status = status;
    this.title = title;
    this.detail = typeof body.detail === "string" ? body.detail : undefined;
    this.errors = Array.isArray(body.errors) ? (body.errors as ProblemFieldError[]) : [];
    const seconds = retryAfter === null ? NaN : Number(retryAfter);
    this.retryAfterSeconds = Number.isFinite(seconds) ? seconds : undefined;
  }
}

export interface ApiRequest {
  method?: "GET" | "POST" | "PATCH" | "DELETE";
  body?: unknown;
}

/** Calls `/api/v1${path}`; resolves to the parsed JSON (undefined for 204), rejects with ApiProblem. */
export async function api<T>(path: string, request: ApiRequest = {}): Promise<T> {
  const response = await fetch(`/api/v1${path}`, {
    method: request.method ?? "GET",
    credentials: "same-origin",
    headers: request.body === undefined ? { accept: "application/json" } : {
      accept: "application/json",
      "content-type": "application/json",
    },
    body: request.body === undefined ? undefined : JSON.stringify(request.body),
  });
  if (response.status === 204) {
    return undefined as T;
  }
  const text = await response.text();
  // 202 may carry a body (a queued job) or none (a password reset request).
  if (response.ok && text.length === 0) {
    return undefined as T;
  }
  const parsed: unknown = text.length > 0 ? safeJson(text) : {};
  if (!response.ok) throw problemOf(response, parsed);
  return parsed as T;
}

/** GETs `/api/v1${path}` as raw bytes (a signed document must not be re-serialised); rejects with ApiProblem. */
export async function apiBytes(path: string): Promise<Uint8Array<ArrayBuffer>> {
  const response = await fetch(`/api/v1${path}`, { credentials: "same-origin" });
  const bytes = new Uint8Array(await response.arrayBuffer());
  if (!response.ok) throw problemOf(response, safeJson(new TextDecoder().decode(bytes)));
  return bytes;
}

function problemOf(response: Response, parsed: unknown): ApiProblem {
  const body = typeof parsed === "object" && parsed !== null ? (parsed as Record<string, unknown>) : {};
  return new ApiProblem(response.status, body, response.headers.get("retry-after"));
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return { detail: text.slice(0, 200) };
  }
}

/** A sentence for a failed request, for alerts. */
export function describeProblem(error: unknown): string {
  if (error instanceof ApiProblem) {
    const retry = error.retryAfterSeconds === undefined ? "" : ` Try again in ${error.retryAfterSeconds} s.`;
    return error.detail !== undefined && error.detail !== error.title
      ? `${error.title}: ${error.detail}${retry}`
      : `${error.title}${retry}`;
  }
  return error instanceof Error ? error.message : "Something went wrong.";
}
