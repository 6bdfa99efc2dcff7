import { describe, expect, it } from "vitest";
import { withContentSize, zstdOutputBound } from "@/lib/raster/zstd-frame";

/** A frame header (RFC 8878 §3.1.1.1): magic, descriptor, window byte, optional 4-byte content size. */
function frame(contentSize: number | null, blocks: Uint8Array[]): Uint8Array {
  const head = [0x28, 0xb5, 0x2f, 0xfd, contentSize === null ? 0x00 : 0x80, 0x38];
  if (contentSize !== null) head.push(contentSize & 255, (contentSize >>> 8) & 255, (contentSize >>> 16) & 255, contentSize >>> 24);
  return Uint8Array.from([...head, ...blocks.flatMap((b) => Array.from(b))]);
}
/** A block header (RFC 8878 §3.1.1.2): bit 0 last, bits 1–2 type, bits 3–23 size. */
function block(type: number, size: number, last: boolean, body: number[]): Uint8Array {
  const h = (size << 3) | (type << 1) | (last ? 1 : 0);
  return Uint8Array.from([h & 255, (h >>> 8) & 255, h >>> 16, ...body]);
}

describe("zstdOutputBound() (RFC 8878 §3.1)", () => {
  it("takes a frame's declared content size (derived)", () => {
    expect(zstdOutputBound(frame(5, [block(0, 5, true, [1, 2, 3, 4, 5])]))).toBe(5);
  });
  it("without a content size, adds raw and RLE sizes and 128 KiB per compressed block (derived)", () => {
    const data = frame(null, [block(0, 3, false, [1, 2, 3]), block(1, 1000, false, [7]), block(2, 2, true, [0, 0])]);
    expect(zstdOutputBound(data)).toBe(3 + 1000 + 131072);
  });
  it("sums the frames of a block (derived)", () => {
    const one = frame(4, [block(0, 4, true, [1, 2, 3, 4])]);
    expect(zstdOutputBound(Uint8Array.from([...one, ...one]))).toBe(8);
  });
  it("refuses bytes that are no Zstd frame, and a frame cut short (derived)", () => {
    expect(() => zstdOutputBound(new Uint8Array([1, 2, 3, 4, 5]))).toThrow(/Zstd/);
    expect(() => zstdOutputBound(frame(5, [block(0, 5, false, [1, 2, 3, 4, 5])]))).toThrow(/cut short/);
  });
});

describe("withContentSize() (RFC 8878 §3.1.1.1.4, Frame_Content_Size)", () => {
  const bare = frame(null, [block(0, 5, true, [1, 2, 3, 4, 5])]);
  it("inserts a 4-byte content size into a frame that lacks one, leaving the blocks intact (derived)", () => {
    const sized = withContentSize(bare, 5);
    expect(sized.length).toBe(bare.length + 4);
    expect(sized[4] >> 6).toBe(2);
    expect(zstdOutputBound(sized)).toBe(5);
    expect(Array.from(sized.subarray(10))).toEqual(Array.from(bare.subarray(6)));
  });
  it("returns a frame that declares its size unchanged (derived)", () => {
    const declared = frame(5, [block(0, 5, true, [1, 2, 3, 4, 5])]);
    expect(withContentSize(declared, 99)).toBe(declared);
  });
  it("refuses a missing size when none is given, and blocks of two frames (derived)", () => {
    expect(() => withContentSize(bare, null)).toThrow(/content size/);
    expect(() => withContentSize(Uint8Array.from([...bare, ...bare]), 10)).toThrow(/one frame/);
  });
});
