import { describe, expect, it } from "vitest";
import { stageClock } from "@/lib/pipelines/stage-clock";

describe("stageClock()", () => {
  it("reports each stage's start, progress inside a stage up to where the next one starts (the last up to 1), and completion (derived)", () => {
    const seen: [string, number][] = [];
    const clock = stageClock({ read: 0, fill: 0.2, write: 0.8 }, { onProgress: (s, f) => seen.push([s, f]) });
    clock.stage("read");
    clock.stage("fill");
    clock.within("fill", 0.5);
    clock.stage("write");
    clock.within("write", 0.5);
    clock.done();
    expect(seen).toEqual([["read", 0], ["fill", 0.2], ["fill", 0.5], ["write", 0.8], ["write", 0.9], ["done", 1]]);
    expect(Object.keys(clock.timingsS)).toEqual(["read", "fill", "write"]);
  });
});
