// Bounded unzip after PKWARE's APPNOTE.TXT 6.3.10 (.ZIP format; §4.4.4 bit 11 UTF-8 names, §4.4.15 external
// attributes with the Unix mode in the high 16 bits), read through yauzl; caps are checked while inflating.
import yauzl from "yauzl";
import type { Entry, ZipFile } from "yauzl";
import { MAX_UNZIPPED_BYTES, MAX_ZIP_ENTRIES, MAX_ZIP_NAME_BYTES } from "./limits";
import { VectorError } from "./vector-error";

export interface UnzipCaps {
  /** total inflated bytes over all kept entries */
  maxTotalBytes: number;
  /** entries in the central directory, directories included */
  maxEntries: number;
  maxNameBytes: number;
}

export interface UnzipResult {
  /** inflated entries kept, by entry name */
  files: Map<string, Buffer>;
  /** total bytes inflated */
  totalBytes: number;
}

const DEFAULT_CAPS: UnzipCaps = {
  maxTotalBytes: MAX_UNZIPPED_BYTES,
  maxEntries: MAX_ZIP_ENTRIES,
  maxNameBytes: MAX_ZIP_NAME_BYTES,
};

const UTF8_NAME_FLAG = 0x800;
const S_IFMT = 0o170000;
const S_IFLNK = 0o120000;
/** MS-DOS attribute bit 0x400 is a reparse point (a Windows symbolic link or junction). */
const DOS_REPARSE_POINT = 0x400;

/** Why an entry name is refused, or null when it is a plain relative path. */
function unsafeName(name: string): string | null {
  if (name.length === 0) return "an empty name";
  if (name.includes("\0")) return "a NUL byte";
  if (name.includes("\\")) return "a backslash";
  if (name.startsWith("/")) return "an absolute path";
  if (/^[A-Za-z]:/.test(name)) return "a drive letter";
  if (name.split("/").some((part) => part === "..")) return "a '..' component";
  return null;
}

function isLink(entry: Entry): boolean {
  const unixMode = (entry.externalFileAttributes >>> 16) & 0xffff;
  return (unixMode & S_IFMT) === S_IFLNK || (entry.externalFileAttributes & DOS_REPARSE_POINT) !== 0;
}

function openZip(source: Buffer | string): Promise<ZipFile> {
  // decodeStrings off: names are checked here, so a refusal names our rule rather than a library message
  const options = { lazyEntries: true, decodeStrings: false, validateEntrySizes: false, autoClose: false };
  return new Promise((resolve, reject) => {
    const done = (err: Error | null, zip: ZipFile) =>
      err ? reject(new VectorError("bad_zip", `not a readable zip file (${err.message})`)) : resolve(zip);
    if (typeof source === "string") yauzl.open(source, options, done);
    else yauzl.fromBuffer(source, options, done);
  });
}

/**
 * Inflates the entries of a zip whose names pass `keep`, refusing unsafe names, links, too many entries
 * and more than `maxTotalBytes` in total. The byte count is taken from the inflating stream itself, not
 * from the sizes the archive declares, so a lying header is stopped at the cap with at most one chunk
 * beyond it held in memory. Every entry name is checked, kept or not.
 */
export async function safeUnzip(
  source: Buffer | string,
  keep: (name: string) => boolean = () => true,
  caps: Partial<UnzipCaps> = {},
): Promise<UnzipResult> {
  const cap = { ...DEFAULT_CAPS, ...caps };
  for (const [key, value] of Object.entries(cap)) {
    if (!(Number.isInteger(value) && value > 0)) throw new RangeError(`${key} must be a positive integer, got ${value}`);
  }
  const zip = await openZip(source);
  try {
    if (zip.entryCount > cap.maxEntries) {
      throw new VectorError("zip_too_many_entries", `the zip has ${zip.entryCount} entries; at most ${cap.maxEntries} are accepted`);
    }
    const files = new Map<string, Buffer>();
    let totalBytes = 0;
    for (;;) {
      const entry = await nextEntry(zip);
      if (!entry) break;
      const raw = entry.fileNameRaw ?? (entry.fileName as unknown as Buffer);
      if (raw.length > cap.maxNameBytes) {
        throw new VectorError("unsafe_zip_entry", `an entry name is ${raw.length} bytes long; at most ${cap.maxNameBytes} are accepted`);
      }
      // names without the UTF-8 flag are CP437; its ASCII half is all the path rules look at
      const name = raw.toString((entry.generalPurposeBitFlag & UTF8_NAME_FLAG) !== 0 ? "utf8" : "latin1");
      const why = unsafeName(name);
      if (why) throw new VectorError("unsafe_zip_entry", `entry ${JSON.stringify(name)} is refused: it has ${why}`);
      if (isLink(entry)) throw new VectorError("unsafe_zip_entry", `entry ${JSON.stringify(name)} is refused: it is a symbolic link`);
      if (name.endsWith("/") || !keep(name)) continue;
      if (totalBytes + entry.uncompressedSize > cap.maxTotalBytes) {
        throw tooLarge(cap.maxTotalBytes, totalBytes, `entry ${JSON.stringify(name)} declares ${entry.uncompressedSize} bytes`);
      }
      const data = await inflate(zip, entry, cap.maxTotalBytes - totalBytes, (inflated) =>
        tooLarge(cap.maxTotalBytes, totalBytes + inflated, `while inflating ${JSON.stringify(name)}`),
      );
      totalBytes += data.length;
      files.set(name, data);
    }
    return { files, totalBytes };
  } finally {
    zip.close();
  }
}

function tooLarge(capBytes: number, reached: number, where: string): VectorError {
  return new VectorError(
    "zip_too_large",
    `the zip inflates past the cap of ${capBytes} bytes (${where}; stopped at ${reached} bytes)`,
  );
}

function nextEntry(zip: ZipFile): Promise<Entry | null> {
  return new Promise((resolve, reject) => {
    const cleanup = () => {
      zip.removeListener("entry", onEntry);
      zip.removeListener("end", onEnd);
      zip.removeListener("error", onError);
    };
    const onEntry = (entry: Entry) => { cleanup(); resolve(entry); };
    const onEnd = () => { cleanup(); resolve(null); };
    const onError = (err: Error) => { cleanup(); reject(new VectorError("bad_zip", `the zip directory is damaged (${err.message})`)); };
    zip.on("entry", onEntry);
    zip.on("end", onEnd);
    zip.on("error", onError);
    zip.readEntry();
  });
}

/** Inflates one entry, destroying the stream as soon as more than `budget` bytes have come out. */
function inflate(zip: ZipFile, entry: Entry, budget: number, overflow: (inflated: number) => VectorError): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    zip.openReadStream(entry, (err, stream) => {
      if (err) return reject(new VectorError("bad_zip", `an entry cannot be read (${err.message})`));
      const chunks: Buffer[] = [];
      let inflated = 0;
      let stopped = false;
      stream.on("data", (chunk: Buffer) => {
        if (stopped) return;
        inflated += chunk.length;
        if (inflated > budget) {
          stopped = true;
          chunks.length = 0;
          stream.destroy();
          reject(overflow(inflated));
          return;
        }
        chunks.push(chunk);
      });
      stream.on("error", (e: Error) => {
        if (!stopped) reject(new VectorError("bad_zip", `an entry cannot be inflated (${e.message})`));
      });
      stream.on("end", () => resolve(Buffer.concat(chunks, inflated)));
    });
  });
}
