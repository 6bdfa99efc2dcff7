import { describe, expect, it } from "vitest";
import { boxCountLines, boxCountMask } from "@/lib/fractal/box-counting";
import { sierpinskiPascal } from "@/lib/fractal/synth/sierpinski-pascal";
import { cantorSet } from "@/lib/fractal/synth/cantor-set";
import { kochCurve } from "@/lib/fractal/synth/koch-curve";
import { makeGrid } from "@/lib/raster/grid";
import { expectClose } from "@/tests/helpers/expect-close";

describe("boxCountMask()", () => {
  it("counts exactly 3^(k−j) boxes of side 2^j on Pascal's triangle mod 2 with 2^k rows, so D = ln 3 / ln 2 (derived; METHODS.md)", () => {
    const k = 9;
    const r = boxCountMask(sierpinskiPascal(k), { sides: Array.from({ length: k + 1 }, (_, j) => 2 ** j) });
    expect(r.counts).toEqual(Array.from({ length: k + 1 }, (_, j) => 3 ** (k - j)));
    expectClose(r.dimension.value, Math.log(3) / Math.log(2), 1e-12);
    expect(r.units.side).toBe("cell");
  });

  it("counts exactly 2^(k−j) boxes of side 3^j on the middle-thirds Cantor set, so D = ln 2 / ln 3 (derived)", () => {
    const k = 8;
    const r = boxCountMask(cantorSet(k), { sides: Array.from({ length: k + 1 }, (_, j) => 3 ** j), cellSize: 2 });
    expect(r.counts).toEqual(Array.from({ length: k + 1 }, (_, j) => 2 ** (k - j)));
    expectClose(r.dimension.value, Math.log(2) / Math.log(3), 1e-12);
    expect(r.sides[1]).toBe(6); // 3 cells of 2 m
  });

  it("gives D = 2 on a full mask (derived)", () => {
    const r = boxCountMask(makeGrid(new Uint8Array(64 * 64).fill(1), 64, 64));
    expectClose(r.dimension.value, 2, 1e-12);
  });
});

describe("boxCountLines()", () => {
  it("gives D = 1 on a straight segment: a diagonal meets exactly 2n − 1 of n×n boxes when it avoids corners (derived)", () => {
    const r = boxCountLines({ lines: [Float64Array.of(0.5, 0.25, 1000.5, 1000.75)], coordinates: "metres" }, { sides: [1000 / 64, 1000 / 32, 1000 / 16, 1000 / 8] });
    expectClose(r.dimension.value, 1, 0.03);
    expect(r.counts[0]).toBeGreaterThanOrEqual(64);
  });

  it("gives ln 4 / ln 3 within 0.05 on a Koch curve (derived; box alignment adds scatter)", () => {
    const r = boxCountLines({ lines: [kochCurve(7, 1000)], coordinates: "metres" }, { sides: [1, 2, 3, 4, 5].map((j) => 1000 * 3 ** -j) });
    expectClose(r.dimension.value, Math.log(4) / Math.log(3), 0.05);
  });

  it("projects lon/lat before counting and says how (derived)", () => {
    const r = boxCountLines({ lines: [Float64Array.of(10, 45, 10.5, 45.2, 11, 45)], coordinates: "lonlat" }, { sides: [500, 1000, 2000, 4000] });
    expect(r.projection).toMatch(/equirectangular/);
    expectClose(r.dimension.value, 1, 0.05);
  });
});
