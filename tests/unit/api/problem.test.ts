import { describe, expect, it } from "vitest";
import { z } from "zod";
import { ApiError, PROBLEM_BASE, PROBLEM_TYPES, toProblem } from "@/lib/api/problem";

describe("problem", () => {
  it("toProblem() maps a ZodError to 422 with one JSON Pointer per failing field (RFC 9457 §3; RFC 6901)", async () => {
    const r = z.object({ a: z.object({ "b/c": z.number() }), list: z.array(z.string()) }).safeParse({ a: { "b/c": "x" }, list: [1] });
    const res = toProblem(r.error, "req-12345678");
    expect(res.status).toBe(422);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    const body = (await res.json()) as { type: string; status: number; request_id: string; errors: { pointer: string }[] };
    expect(body.type).toBe(`${PROBLEM_BASE}validation`);
    expect(body.status).toBe(422);
    expect(body.request_id).toBe("req-12345678");
    expect(body.errors.map((e) => e.pointer).sort()).toEqual(["/a/b~1c", "/list/0"]);
  });

  it("toProblem() keeps an ApiError's status, detail and headers (RFC 9457 §3.1)", async () => {
    const res = toProblem(new ApiError("too-many-requests", "wait", { headers: { "retry-after": "7" } }), "r");
    expect(res.status).toBe(429);
    expect(res.headers.get("retry-after")).toBe("7");
    expect(await res.json()).toMatchObject({ title: PROBLEM_TYPES["too-many-requests"].title, detail: "wait" });
  });

  it("toProblem() answers anything else with a bare 500 that reveals no message (STANDARDS.md: no stack traces, SQL or paths)", async () => {
    const quiet = console.error;
    console.error = () => {};
    try {
      const res = toProblem(new Error("relation \"users\" does not exist at /work/main/db/x.ts"), "r");
      const text = await res.text();
      expect(res.status).toBe(500);
      expect(text).not.toMatch(/relation|\/work\//);
    } finally {
      console.error = quiet;
    }
  });

  it("every problem type's status is a 4xx or 5xx code (RFC 9110 §15, derived)", () => {
    for (const t of Object.values(PROBLEM_TYPES)) expect(t.status >= 400 && t.status < 600).toBe(true);
  });
});
