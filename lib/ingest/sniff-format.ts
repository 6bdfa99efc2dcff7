// Format sniffing by leading bytes ("magic numbers"): TIFF 6.0 §2 (Adobe 1992) byte-order header with 42, BigTIFF
// (Aware Systems 2006) with 43, ZIP local file header PK\3\4 (PKWARE APPNOTE.TXT 4.3.7), JSON text per RFC 8259.
import { open } from "node:fs/promises";

/** What the leading bytes say the file is. The last three are named only to give a clear refusal. */
export type SniffedFormat = "tiff" | "bigtiff" | "zip" | "json" | "png" | "jpeg" | "gzip" | "unknown";

/** Bytes read: a TIFF/BigTIFF header needs 4, JSON may be preceded by a BOM and some whitespace. */
export const SNIFF_BYTES = 64;

const FORMAT_NAMES: Record<SniffedFormat, string> = {
  tiff: "a TIFF", bigtiff: "a BigTIFF", zip: "a zip archive", json: "JSON text", png: "a PNG image",
  jpeg: "a JPEG image", gzip: "a gzip stream", unknown: "of no recognised format",
};

export function describeFormat(format: SniffedFormat): string {
  return FORMAT_NAMES[format];
}

const startsWith = (b: Uint8Array, magic: number[]) => magic.every((v, i) => b[i] === v);

export function sniffFormat(head: Uint8Array): SniffedFormat {
  if (startsWith(head, [0x49, 0x49, 0x2a, 0x00]) || startsWith(head, [0x4d, 0x4d, 0x00, 0x2a])) return "tiff";
  if (startsWith(head, [0x49, 0x49, 0x2b, 0x00]) || startsWith(head, [0x4d, 0x4d, 0x00, 0x2b])) return "bigtiff";
  if (startsWith(head, [0x50, 0x4b, 0x03, 0x04])) return "zip";
  if (startsWith(head, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return "png";
  if (startsWith(head, [0xff, 0xd8, 0xff])) return "jpeg";
  if (startsWith(head, [0x1f, 0x8b])) return "gzip";
  // JSON: optional UTF-8 BOM (RFC 8259 §8.1 lets parsers ignore it), JSON whitespace, then an object.
  let i = startsWith(head, [0xef, 0xbb, 0xbf]) ? 3 : 0;
  while (i < head.length && (head[i] === 0x20 || head[i] === 0x09 || head[i] === 0x0a || head[i] === 0x0d)) i++;
  if (head[i] === 0x7b) return "json";
  return "unknown";
}

export async function sniffFile(path: string): Promise<SniffedFormat> {
  const handle = await open(path, "r");
  try {
    const head = new Uint8Array(SNIFF_BYTES);
    const { bytesRead } = await handle.read(head, 0, SNIFF_BYTES, 0);
    return sniffFormat(head.subarray(0, bytesRead));
  } finally {
    await handle.close();
  }
}
