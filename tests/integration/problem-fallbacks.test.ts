// What no route handler covers still answers as the API does: an unknown /api/v1 path is a 404 problem document
// (not Next's HTML page) for every method, and a method a real path lacks is a 405 problem with `Allow`.
import { randomUUID } from "node:crypto";
import { describe, expect, it } from "vitest";
import { api } from "@/tests/integration/client";

const PROBLEMS = "https://rillscale.example/problems/";

async function expectProblem(res: Response, status: number, type: string) {
  expect(res.status).toBe(status); // RFC 9110 §15.5.5 (404) / §15.5.6 (405)
  expect(res.headers.get("content-type")).toBe("application/problem+json"); // RFC 9457 §3
  const body = (await res.json()) as { type: string; status: number; title: string; request_id: string };
  expect(body).toMatchObject({ type: PROBLEMS + type, status }); // RFC 9457 §3: type is a URI, status equals the HTTP status
  expect(body.title).toBeTruthy(); // RFC 9457 §3 title member; fixed per type (STANDARDS.md)
  // the request id of the body is the one of the header (STANDARDS.md)
  expect(body.request_id).toBeTruthy(); // RFC 9457 §3 extension member (STANDARDS.md)
  expect(res.headers.get("x-request-id")).toBe(body.request_id); // derived: one id for header and body (STANDARDS.md)
  return body;
}

describe("unknown API paths (RFC 9457; RFC 9110 §15.5.5)", () => {
  it("GET of a path no route serves is a 404 not-found problem with a request id", async () => {
    await expectProblem(await api("/api/v1/no-such-thing"), 404, "not-found");
  });

  it("POST with a JSON body to a path no route serves is the same 404 problem", async () => {
    await expectProblem(await api("/api/v1/no-such-thing/deeper", { method: "POST", body: { a: 1 } }), 404, "not-found");
  });

  it("a path below a real one that has no route of its own is a 404 problem; the id given in x-request-id comes back", async () => {
    const id = `fallback-${randomUUID()}`;
    const body = await expectProblem(await api(`/api/v1/jobs/${randomUUID()}/no-such-part`, { method: "DELETE", headers: { "x-request-id": id } }), 404, "not-found");
    expect(body.request_id).toBe(id); // derived: a caller's x-request-id is kept (STANDARDS.md)
  });
});

describe("a method a real path does not have (RFC 9110 §15.5.6: 405 with Allow)", () => {
  const cases: [method: string, path: string, allow: string][] = [
    ["DELETE", "/api/v1/health", "GET, HEAD, OPTIONS"],
    ["PUT", "/api/v1/jobs", "GET, HEAD, OPTIONS, POST"],
    ["GET", `/api/v1/jobs/${randomUUID()}/cancel`, "OPTIONS, POST"],
    ["POST", `/api/v1/datasets/${randomUUID()}`, "DELETE, GET, HEAD, OPTIONS"],
  ];
  it.each(cases)("%s %s is a 405 method-not-allowed problem with Allow: %s", async (method, path, allow) => {
    const res = await api(path, { method, ...(method === "GET" ? {} : { body: {} }) });
    await expectProblem(res, 405, "method-not-allowed"); // RFC 9110 §15.5.6; RFC 9457 §3
    expect(res.headers.get("allow")).toBe(allow); // RFC 9110 §15.5.6: a 405 carries Allow with the methods the path has
  });

  it("OPTIONS lists the methods the path has, not the 405 answers (RFC 9110 §9.3.7)", async () => {
    const res = await api("/api/v1/jobs", { method: "OPTIONS" });
    expect(res.status).toBe(204); // RFC 9110 §9.3.7 (a success without content; 204 rather than 200 is common practice)
    expect(res.headers.get("allow")).toBe("GET, HEAD, OPTIONS, POST"); // RFC 9110 §9.3.7 with §10.2.1 Allow
  });
});
