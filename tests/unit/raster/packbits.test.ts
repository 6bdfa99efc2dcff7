import { describe, expect, it } from "vitest";
import { decodePackBits } from "@/lib/raster/packbits";
import { RasterError } from "@/lib/raster/errors";

describe("decodePackBits() (Apple TN1023; TIFF 6.0 §9)", () => {
  it("unpacks the TIFF 6.0 §9 sample: 15 packed bytes to 24 (TIFF 6.0 §9 example)", () => {
    const packed = new Uint8Array([0xfe, 0xaa, 0x02, 0x80, 0x00, 0x2a, 0xfd, 0xaa, 0x03, 0x80, 0x00, 0x2a, 0x22, 0xf7, 0xaa]);
    const out = new Uint8Array(24);
    expect(decodePackBits(packed, out)).toBe(24);
    expect(Array.from(out)).toEqual([
      0xaa, 0xaa, 0xaa, 0x80, 0x00, 0x2a, 0xaa, 0xaa, 0xaa, 0xaa, 0x80, 0x00, 0x2a, 0x22,
      ...new Array(10).fill(0xaa),
    ]);
  });
  it("skips the -128 no-op header (TIFF 6.0 §9)", () => {
    const out = new Uint8Array(2);
    expect(decodePackBits(new Uint8Array([0x80, 0x01, 5, 6]), out)).toBe(2);
    expect(Array.from(out)).toEqual([5, 6]);
  });
  it("refuses a run past the output block (derived)", () => {
    expect(() => decodePackBits(new Uint8Array([0x81, 0x01]), new Uint8Array(10))).toThrow(RasterError);
  });
});
