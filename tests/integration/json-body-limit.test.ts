// JSON bodies over the 64 KiB cap: a chunked body (no Content-Length) is refused with a 413 problem as soon as the
// running byte count passes the cap, while the client is still writing. Sent through node:http so the test controls
// every chunk and sees the answer the moment it comes.
import http from "node:http";
import { beforeAll, describe, expect, it } from "vitest";
import { ADMIN, createKey, signIn, stack } from "@/tests/integration/client";

const MIB = 1024 * 1024;
const CHUNK = 16 * 1024;
const PAUSE_AT = 4 * 64 * 1024;
const PAUSE_MS = 10_000;
let key = "";

beforeAll(async () => {
  key = (await createKey(await signIn(ADMIN), ["jobs:write"], "json limit")).secret;
});

interface Sent {
  status: number;
  contentType: string;
  body: string;
  bytesSent: number;
  total: number;
}

/** Writes a valid 1 MiB JSON object in 16 KiB chunks with chunked transfer coding (no Content-Length), pausing
 *  after PAUSE_AT bytes, and stops writing as soon as the answer arrives. */
function postChunkedJson(path: string): Promise<Sent> {
  const head = Buffer.from('{"dataset":"00000000-0000-0000-0000-000000000000","kind":"network","params":{"pad":"');
  const tail = Buffer.from('"}}');
  const total = MIB;
  const filler = Buffer.alloc(CHUNK, "a");
  return new Promise((resolve, reject) => {
    const req = http.request(new URL(path, stack().url), {
      method: "POST",
      headers: { authorization: `Bearer ${key}`, "content-type": "application/json", "transfer-encoding": "chunked" },
    });
    let sent = 0, answered = false;
    req.on("response", (res) => {
      answered = true;
      const bytesSent = sent;
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c: string) => { body += c; });
      res.on("end", () => {
        resolve({ status: res.statusCode ?? 0, contentType: String(res.headers["content-type"]), body, bytesSent, total });
        req.destroy();
      });
    });
    req.on("error", (e) => { if (!answered) reject(e); });
    const pump = () => {
      if (answered) return;
      const remaining = total - sent;
      if (remaining <= 0) return void req.end();
      let chunk: Buffer;
      if (sent === 0) chunk = head;
      else if (remaining === tail.length) chunk = tail;
      else chunk = filler.subarray(0, Math.min(CHUNK, remaining - tail.length));
      const before = sent;
      sent += chunk.length;
      req.write(chunk);
      // At 4× the cap the writer pauses: a server that reads the whole body cannot answer during the pause, one
      // that stops at the cap answers in it. The rest follows only if no answer came.
      setTimeout(pump, before < PAUSE_AT && sent >= PAUSE_AT ? PAUSE_MS : 1);
    };
    pump();
  });
}

describe("JSON body limit (issue 6; RFC 9110 §15.5.14)", () => {
  it("a chunked 1 MiB JSON body to POST /api/v1/jobs gets a 413 payload-too-large problem before the body is sent in full", async () => {
    const r = await postChunkedJson("/api/v1/jobs");
    expect(r.status, r.body).toBe(413); // RFC 9110 §15.5.14 (413 Content Too Large)
    expect(r.contentType).toBe("application/problem+json"); // RFC 9457 §3
    const problem = JSON.parse(r.body) as { type: string; status: number; request_id: string };
    expect(problem).toMatchObject({ type: "https://rillscale.example/problems/payload-too-large", status: 413 }); // RFC 9457 §3: type URI, status equals the HTTP status
    expect(problem.request_id).toBeTruthy(); // RFC 9457 §3 extension member (STANDARDS.md)
    // the answer came while the request was still being written: the server stopped reading near the cap (derived)
    expect(r.bytesSent).toBeLessThan(PAUSE_AT + CHUNK);
    console.log(`413 after ${(r.bytesSent / 1024).toFixed(0)} KiB of ${(r.total / 1024).toFixed(0)} KiB written`);
  });
});
