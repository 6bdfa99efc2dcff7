import { afterAll, describe, expect, it } from "vitest";
import {
  InspectionBusyError, InspectionFailedError, InspectionMemoryError, InspectionTimeoutError, runInSandbox, SandboxSlots, stopSpares,
} from "@/lib/ingest/sandbox";

// The keepSpare test leaves an idle spare behind.
afterAll(stopSpares);

const CHILD = "tests/unit/ingest/fixtures/misbehaving-child.ts";

/** Runs fn while sampling the parent's event-loop delay: the parent must stay responsive throughout. */
async function withLoopLag<T>(fn: () => Promise<T>): Promise<{ value: T | unknown; lagMs: number; ms: number }> {
  let last = performance.now(), lagMs = 0;
  const tick = setInterval(() => {
    const now = performance.now();
    lagMs = Math.max(lagMs, now - last - 20);
    last = now;
  }, 20);
  const started = performance.now();
  const value = await fn().catch((e: unknown) => e);
  clearInterval(tick);
  return { value, lagMs, ms: performance.now() - started };
}

describe("runInSandbox()", () => {
  it("returns the child's answer by structured clone, NaN and typed arrays intact, with no parent environment (derived)", async () => {
    process.env.RILLSCALE_SANDBOX_TEST_SECRET = "must-not-leak";
    const run = await runInSandbox<{ nan: number; cells: Float32Array; envKeys: string[]; request: unknown }>(CHILD, { act: "echo" });
    delete process.env.RILLSCALE_SANDBOX_TEST_SECRET;
    expect(run.result.request).toEqual({ act: "echo" });
    expect(run.result.nan).toBeNaN();
    expect(run.result.cells).toBeInstanceOf(Float32Array);
    expect(Array.from(run.result.cells)).toEqual([1.5, Number.NaN]);
    expect(run.result.envKeys).not.toContain("RILLSCALE_SANDBOX_TEST_SECRET");
    expect(run.result.envKeys).not.toContain("DATABASE_URL");
  });

  it("kills a child that sleeps at the deadline with SIGKILL, the parent's event loop never stalled (derived)", async () => {
    const { value, lagMs, ms } = await withLoopLag(() => runInSandbox(CHILD, { act: "sleep" }, { timeoutMs: 1_500 }));
    expect(value).toBeInstanceOf(InspectionTimeoutError);
    expect(ms).toBeGreaterThanOrEqual(1_500);
    expect(ms).toBeLessThan(4_000);
    expect(lagMs).toBeLessThan(250);
  });

  it("kills a child stuck in a synchronous loop at the deadline (derived)", async () => {
    const { value, ms } = await withLoopLag(() => runInSandbox(CHILD, { act: "spin" }, { timeoutMs: 1_500 }));
    expect(value).toBeInstanceOf(InspectionTimeoutError);
    expect(ms).toBeLessThan(4_000);
  });

  it("kills a child that allocates native memory without end once its RSS passes the cap (derived)", async () => {
    const { value, ms } = await withLoopLag(() => runInSandbox(CHILD, { act: "buffers" }, { rssCapMb: 200, timeoutMs: 30_000 }));
    expect(value).toBeInstanceOf(InspectionMemoryError);
    const err = value as InspectionMemoryError;
    expect(err.limit).toBe("rss-cap");
    expect(err.peakRssBytes).toBeGreaterThan(200 * 1024 * 1024);
    expect(ms).toBeLessThan(20_000);
  });

  it("stops a child that fills its JS heap at --max-old-space-size (V8 aborts on heap exhaustion)", async () => {
    const value = await runInSandbox(CHILD, { act: "heap" }, { maxOldSpaceMb: 64, rssCapMb: 4096, timeoutMs: 30_000 }).catch((e: unknown) => e);
    expect(value).toBeInstanceOf(InspectionMemoryError);
    expect((value as InspectionMemoryError).limit).toBe("heap-limit");
  });

  it("passes on the child's typed error code and detail (derived)", async () => {
    const value = await runInSandbox(CHILD, { act: "typed-error" }).catch((e: unknown) => e);
    expect(value).toBeInstanceOf(InspectionFailedError);
    expect(value).toMatchObject({ code: "corrupt", detail: "the chain of image directories loops back to byte 8", childErrorName: "RasterError" });
  });

  it("reports a child that exits without answering as inspector_crashed (derived)", async () => {
    const value = await runInSandbox(CHILD, { act: "exit" }).catch((e: unknown) => e);
    expect(value).toBeInstanceOf(InspectionFailedError);
    expect((value as InspectionFailedError).code).toBe("inspector_crashed");
    expect((value as InspectionFailedError).detail).toMatch(/exit 3/);
  });

  it("with keepSpare, the next run is served by a child started before that run began (derived)", async () => {
    type Up = { uptimeMs: number };
    const cold = await runInSandbox<Up>(CHILD, { act: "uptime" });
    // a child spawned for the run has lived no longer than the run
    expect(cold.result.uptimeMs).toBeLessThanOrEqual(cold.elapsedMs);
    await runInSandbox<Up>(CHILD, { act: "uptime" }, {}, { keepSpare: true });
    // the spare is spawned a second after that run ends (SPARE_DELAY_MS); then a pause longer than Node's own
    // start before process.uptime() counts
    await new Promise((r) => setTimeout(r, 1_500));
    const warm = await runInSandbox<Up>(CHILD, { act: "uptime" }, {}, { keepSpare: true });
    expect(warm.result.uptimeMs).toBeGreaterThan(warm.elapsedMs);
    const failed = await runInSandbox(CHILD, { act: "typed-error" }, {}, { keepSpare: true }).catch((e: unknown) => e);
    expect(failed).toMatchObject({ code: "corrupt" }); // a spare answers failures exactly as a fresh child does
  });

  it("after stopSpares(), the next keepSpare run is served by a child spawned for it (derived)", async () => {
    type Up = { uptimeMs: number };
    await runInSandbox<Up>(CHILD, { act: "uptime" }, {}, { keepSpare: true });
    await new Promise((r) => setTimeout(r, 1_500)); // the spare is up (as in the test above)
    stopSpares();
    const next = await runInSandbox<Up>(CHILD, { act: "uptime" }, {}, { keepSpare: true });
    expect(next.result.uptimeMs).toBeLessThanOrEqual(next.elapsedMs);
  });

  it("refuses non-positive limits before spawning anything (derived)", () => {
    expect(() => runInSandbox(CHILD, {}, { timeoutMs: 0 })).toThrow(RangeError);
    expect(() => runInSandbox("tests/unit/ingest/fixtures/no-such-child.ts", {})).toThrow(/does not exist/);
  });

  it("with one slot, a second run waits for the first child to end, and a third past the queue is refused (derived)", async () => {
    const slots = new SandboxSlots(1, 1);
    const order: string[] = [];
    const first = runInSandbox(CHILD, { act: "sleep" }, { timeoutMs: 1_000 }, { slots }).catch(() => order.push("first ended"));
    const second = runInSandbox(CHILD, { act: "echo" }, {}, { slots }).then(() => order.push("second answered"));
    await expect(runInSandbox(CHILD, { act: "echo" }, {}, { slots })).rejects.toBeInstanceOf(InspectionBusyError);
    await Promise.all([first, second]);
    expect(order).toEqual(["first ended", "second answered"]);
    await expect(runInSandbox(CHILD, { act: "echo" }, {}, { slots })).resolves.toBeDefined(); // slots freed
  });
});
