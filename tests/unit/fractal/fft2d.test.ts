import { describe, expect, it } from "vitest";
import { fft2d, signedFrequency } from "@/lib/fractal/fft2d";
import { mulberry32 } from "@/lib/fractal/synth/mulberry32";
import { expectClose } from "@/tests/helpers/expect-close";

describe("fft2d()", () => {
  it("returns the input after a forward and an inverse transform (invariant)", () => {
    const u = mulberry32(5);
    const x = Float64Array.from({ length: 2 * 16 * 8 }, () => u() - 0.5);
    const y = Float64Array.from(x);
    fft2d(y, 16, 8); fft2d(y, 16, 8, true);
    for (let i = 0; i < x.length; i++) expectClose(y[i], x[i], 1e-12);
  });
  it("turns a unit impulse at the origin into a flat spectrum of ones (derived)", () => {
    const x = new Float64Array(2 * 8 * 4);
    x[0] = 1;
    fft2d(x, 8, 4);
    for (let i = 0; i < x.length; i += 2) { expectClose(x[i], 1, 1e-12); expectClose(x[i + 1], 0, 1e-12); }
  });
  it("rejects sizes that are not powers of two", () => {
    expect(() => fft2d(new Float64Array(2 * 6 * 4), 6, 4)).toThrow(RangeError);
  });
});

describe("signedFrequency()", () => {
  it("orders FFT bins 0, 1, …, n/2, −n/2+1, …, −1 (derived)", () => {
    expect([0, 1, 2, 3, 4, 5, 6, 7].map((i) => signedFrequency(i, 8))).toEqual([0, 1, 2, 3, 4, -3, -2, -1]);
  });
});
