import http from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sendAttempt } from "@/lib/webhooks/send-attempt";

let server: http.Server;
let base = "";
const seen: { path: string; headers: http.IncomingHttpHeaders; body: string }[] = [];

beforeAll(async () => {
  server = http.createServer((req, res) => {
    let body = "";
    req.on("data", (c) => (body += c));
    req.on("end", () => {
      seen.push({ path: req.url!, headers: req.headers, body });
      if (req.url === "/redirect") res.writeHead(302, { location: "/ok" }).end();
      else if (req.url === "/slow") setTimeout(() => res.writeHead(200).end(), 2000);
      else res.writeHead(req.url === "/gone" ? 410 : 200, { "content-type": "text/plain" }).end("thanks");
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

describe("sendAttempt()", () => {
  it("posts the exact body with the given headers and reports the status (derived)", async () => {
    const r = await sendAttempt({ url: `${base}/ok`, headers: { "webhook-id": "msg_1" }, body: '{"a":1}', allowPrivate: true });
    expect(r).toMatchObject({ status: 200, responseExcerpt: "thanks", error: null });
    const got = seen.find((s) => s.path === "/ok")!;
    expect(got.body).toBe('{"a":1}');
    expect(got.headers["webhook-id"]).toBe("msg_1");
    expect(got.headers["content-type"]).toBe("application/json");
  });

  it("does not follow a redirect: the 302 is the attempt's answer (Standard Webhooks 1.0)", async () => {
    const before = seen.filter((s) => s.path === "/ok").length;
    const r = await sendAttempt({ url: `${base}/redirect`, headers: {}, body: "{}", allowPrivate: true });
    expect(r.status).toBe(302);
    expect(seen.filter((s) => s.path === "/ok").length).toBe(before);
  });

  it("refuses the loopback receiver without the development setting and sends nothing (derived)", async () => {
    const before = seen.length;
    const r = await sendAttempt({ url: `${base}/ok`, headers: {}, body: "{}", allowPrivate: false });
    expect(r.status).toBeNull();
    expect(r.error).toMatch(/private, loopback/);
    const byName = await sendAttempt({ url: base.replace("127.0.0.1", "localhost") + "/ok", headers: {}, body: "{}", allowPrivate: false });
    expect(byName.error).toMatch(/private, loopback/);
    expect(seen.length).toBe(before);
  });

  it("gives up at the deadline with no status (derived)", async () => {
    const r = await sendAttempt({ url: `${base}/slow`, headers: {}, body: "{}", allowPrivate: true, timeoutMs: 200 });
    expect(r.status).toBeNull();
    expect(r.error).toMatch(/no answer within 200 ms/);
  });
});
