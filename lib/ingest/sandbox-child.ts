// Child side of the sandbox protocol: take one request over the IPC channel, answer once, exit. Errors travel
// as {name, code, detail} so the parent can rebuild a typed failure without trusting the child's objects.

export interface SandboxErrorPayload {
  name: string;
  /** The thrower's typed code (RasterError/VectorError), or "internal" for anything untyped. */
  code: string;
  detail: string;
}

export type SandboxReply = { ok: true; result: unknown } | { ok: false; error: SandboxErrorPayload };

function toPayload(err: unknown): SandboxErrorPayload {
  const e = err as { name?: unknown; code?: unknown; detail?: unknown; message?: unknown };
  const typed = typeof e?.code === "string";
  return {
    name: typeof e?.name === "string" ? e.name : "Error",
    code: typed ? (e.code as string) : "internal",
    detail: typeof e?.detail === "string" ? e.detail : typeof e?.message === "string" ? e.message : String(err),
  };
}

/** First message of the child: it listens now, so the request cannot be sent into the void. */
export const READY = "rillscale-sandbox-ready";

/** Serves exactly one request with handler; call it once at the top level of a child entry. */
export function serveOneRequest(handler: (request: unknown) => Promise<unknown>): void {
  if (!process.send) throw new Error("a sandbox child must be started with an IPC channel");
  process.once("message", (request: unknown) => {
    handler(request)
      .then((result): SandboxReply => ({ ok: true, result }), (err: unknown): SandboxReply => ({ ok: false, error: toPayload(err) }))
      .then((reply) => process.send!(reply, () => process.disconnect()));
  });
  process.send(READY);
}
