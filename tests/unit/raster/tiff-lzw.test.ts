import { describe, expect, it } from "vitest";
import { decodeTiffLzw } from "@/lib/raster/tiff-lzw";
import { RasterError } from "@/lib/raster/errors";

/** Packs codes MSB-first with TIFF's widths: 9 bits, growing one code early (TIFF 6.0 §13; derived). */
function pack(codes: number[]): Uint8Array {
  const bits: number[] = [];
  let next = 258, width = 9;
  for (const [i, code] of codes.entries()) {
    for (let b = width - 1; b >= 0; b--) bits.push((code >> b) & 1);
    if (code === 256) { next = 258; width = 9; continue; }
    if (code === 257) break;
    if (i > 0 && codes[i - 1] !== 256) next++;
    if (next >= (1 << width) - 1 && width < 12) width++;
  }
  const out = new Uint8Array(Math.ceil(bits.length / 8));
  bits.forEach((bit, i) => { out[i >> 3] |= bit << (7 - (i & 7)); });
  return out;
}

function decode(codes: number[], capacity = 64): number[] {
  const out = new Uint8Array(capacity);
  return Array.from(out.subarray(0, decodeTiffLzw(pack(codes), out)));
}

describe("decodeTiffLzw() (TIFF 6.0 §13)", () => {
  it("decodes literal codes and a table code: A B <AB> gives ABAB (derived)", () => {
    expect(decode([256, 65, 66, 258, 257])).toEqual([65, 66, 65, 66]);
  });
  it("decodes the KwKwK case, a code used as it is defined: A <AA> gives AAA (Welch 1984)", () => {
    expect(decode([256, 65, 258, 257])).toEqual([65, 65, 65]);
  });
  it("switches to 10-bit codes after table entry 510, as libtiff writes (TIFF 6.0 §13, early change)", () => {
    // 253 single bytes fill entries 258..510; the code after them is 10 bits wide
    const literals = Array.from({ length: 254 }, (_, i) => i % 200);
    const out = decode([256, ...literals, 300, 257], 1024);
    expect(out.slice(0, 254)).toEqual(literals);
    // entry 300 = literal[42] followed by literal[43]
    expect(out.slice(254)).toEqual([literals[42], literals[43]]);
  });
  it("refuses output past the block and a stream cut before its end code (derived)", () => {
    expect(() => decode([256, 65, 66, 258, 257], 3)).toThrow(RasterError);
    expect(() => decodeTiffLzw(new Uint8Array([0x80, 0x00]), new Uint8Array(8))).toThrow(/end code/);
  });
  it("refuses an undefined code (derived)", () => {
    expect(() => decode([256, 65, 400, 257])).toThrow(/not yet defined/);
  });
});
