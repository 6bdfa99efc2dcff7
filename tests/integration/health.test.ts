import { describe, expect, it } from "vitest";
import { api } from "@/tests/integration/client";

describe("GET /api/v1/health", () => {
  it("reports the database and the queue as up once the worker has created its queues (platform contract)", async () => {
    const res = await api("/api/v1/health");
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ status: "ok", database: { ok: true }, queue: { ok: true } });
  });
});
