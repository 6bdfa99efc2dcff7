import { describe, expect, it } from "vitest";
import { sierpinskiPascal } from "@/lib/fractal/synth/sierpinski-pascal";

describe("sierpinskiPascal()", () => {
  it("sets cell (n, m) exactly when C(n, m) is odd, i.e. m's bits are a subset of n's (Lucas 1878)", () => {
    const g = sierpinskiPascal(6);
    for (let n = 0; n < 64; n++) for (let m = 0; m < 64; m++) expect(g.data[n * 64 + m]).toBe(m <= n && (m & n) === m ? 1 : 0);
  });
  it("holds 3^k set cells on 2^k rows (derived)", () => {
    expect(sierpinskiPascal(7).data.reduce((a, b) => a + b, 0)).toBe(3 ** 7);
  });
});
