// The web process: Next's request handler inside our own Node HTTP server (Next's custom-server mode) instead of
// `next start`, for one reason: a route's declared body length (lib/api/body-length.ts) becomes Content-Length,
// which Next 16 removes from route-handler answers. Usage: node --import tsx scripts/web-server.ts HOST PORT
import http from "node:http";
import path from "node:path";
import next from "next";
import { BODY_LENGTH_HEADER } from "@/lib/api/body-length";

const [hostname = "127.0.0.1", portArg = "3000"] = process.argv.slice(2);
const port = Number(portArg);
const app = next({ dev: false, dir: path.resolve(import.meta.dirname, ".."), hostname, port });
await app.prepare();
const handle = app.getRequestHandler();

/** Just before the headers go out: the declared length replaces chunked framing, unless the body is re-encoded. */
function restoreContentLength(res: http.ServerResponse) {
  const writeHead = res.writeHead;
  res.writeHead = function (this: http.ServerResponse, ...args: unknown[]) {
    const declared = this.getHeader(BODY_LENGTH_HEADER);
    if (declared !== undefined) {
      this.removeHeader(BODY_LENGTH_HEADER);
      if (!this.hasHeader("content-encoding") && !this.hasHeader("transfer-encoding")) this.setHeader("content-length", String(declared));
    }
    return (writeHead as (...a: unknown[]) => http.ServerResponse).apply(this, args);
  } as typeof res.writeHead;
}

/**
 * Next sets X-Forwarded-For only when the request has none, so a client could name its own address. The socket's peer
 * is appended as the last hop; RILLSCALE_TRUSTED_PROXIES counts the proxies before it (lib/api/handler.ts clientIp).
 */
function appendPeer(req: http.IncomingMessage) {
  const peer = req.socket.remoteAddress;
  if (!peer) return;
  const existing = req.headers["x-forwarded-for"];
  const prior = Array.isArray(existing) ? existing.join(", ") : existing;
  req.headers["x-forwarded-for"] = prior ? `${prior}, ${peer}` : peer;
}

const server = http.createServer((req, res) => {
  restoreContentLength(res);
  appendPeer(req);
  handle(req, res).catch((e: unknown) => {
    // An escaped rejection would otherwise be unhandled and end the web process.
    console.error("rillscale web: request handler failed", e);
    if (!res.headersSent) res.statusCode = 500;
    res.end();
  });
});
server.listen(port, hostname, () => console.log(`rillscale web: listening on http://${hostname}:${port}`));
/** Stop taking requests, let running ones finish for a few seconds, then go. */
const SHUTDOWN_GRACE_MS = 5_000;
for (const signal of ["SIGINT", "SIGTERM"] as const) {
  process.on(signal, () => {
    server.close(() => process.exit(0));
    server.closeIdleConnections();
    setTimeout(() => process.exit(0), SHUTDOWN_GRACE_MS).unref();
  });
}
