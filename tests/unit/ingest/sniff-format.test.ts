import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { sniffFile, sniffFormat } from "@/lib/ingest/sniff-format";

const bytes = (...b: number[]) => Uint8Array.from(b);
const text = (s: string) => new TextEncoder().encode(s);

describe("sniffFormat()", () => {
  it("knows TIFF by II*\\0 / MM\\0* and BigTIFF by 43 in either byte order (TIFF 6.0 §2; BigTIFF 2006)", () => {
    expect(sniffFormat(bytes(0x49, 0x49, 42, 0, 8, 0, 0, 0))).toBe("tiff");
    expect(sniffFormat(bytes(0x4d, 0x4d, 0, 42, 0, 0, 0, 8))).toBe("tiff");
    expect(sniffFormat(bytes(0x49, 0x49, 43, 0, 8, 0, 0, 0))).toBe("bigtiff");
    expect(sniffFormat(bytes(0x4d, 0x4d, 0, 43, 0, 8, 0, 0))).toBe("bigtiff");
  });

  it("knows a zip by its local file header PK\\3\\4 (PKWARE APPNOTE 4.3.7)", () => {
    expect(sniffFormat(bytes(0x50, 0x4b, 3, 4, 20, 0))).toBe("zip");
    expect(sniffFormat(bytes(0x50, 0x4b, 5, 6))).toBe("unknown"); // an empty zip has only the end record: nothing to read
  });

  it("knows JSON by a leading { after an optional BOM and JSON whitespace (RFC 8259 §2, §8.1)", () => {
    expect(sniffFormat(text('{"type":"FeatureCollection"}'))).toBe("json");
    expect(sniffFormat(text('\ufeff \r\n\t{"type"'))).toBe("json");
    expect(sniffFormat(text("[1,2]"))).toBe("unknown"); // GeoJSON is an object
  });

  it("names PNG, JPEG and gzip so a misnamed file gets a clear refusal (PNG spec §5.2; JFIF; RFC 1952)", () => {
    expect(sniffFormat(bytes(0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13))).toBe("png");
    expect(sniffFormat(bytes(0xff, 0xd8, 0xff, 0xe0))).toBe("jpeg");
    expect(sniffFormat(bytes(0x1f, 0x8b, 8))).toBe("gzip");
    expect(sniffFormat(bytes())).toBe("unknown");
    expect(sniffFormat(bytes(0x49, 0x49))).toBe("unknown"); // a truncated header is not a TIFF
  });
});

describe("sniffFile()", () => {
  const dir = mkdtempSync(path.join(tmpdir(), "rillscale-sniff-"));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("reads only the head of the file, whatever its length (derived)", async () => {
    const file = path.join(dir, "a.json");
    writeFileSync(file, `${" ".repeat(10)}{"type":"FeatureCollection","features":[]}`);
    expect(await sniffFile(file)).toBe("json");
    const empty = path.join(dir, "empty");
    writeFileSync(empty, "");
    expect(await sniffFile(empty)).toBe("unknown");
  });
});
