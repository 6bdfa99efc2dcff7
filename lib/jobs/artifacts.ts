// Downloads of job artifacts: the media type, Content-Length, a strong ETag (the content's SHA-256, the same on
// every backend), If-None-Match → 304, and one byte range per request (RFC 9110 §14; several ranges are
// answered with the whole file, which §14.2 allows). The length goes out as Content-Length through our web process
// (lib/api/body-length.ts); `no-transform` keeps the bytes exactly those the ETag and the provenance hash name.
import { Readable } from "node:stream";
import { BODY_LENGTH_HEADER } from "@/lib/api/body-length";
import { ApiError } from "@/lib/api/problem";
import type { ObjectStore } from "@/lib/storage";

export interface StoredArtifact {
  name: string;
  mediaType: string;
  size: number;
  sha256: string;
  key: string;
}

/** `bytes=a-b`, `bytes=a-` or `bytes=-n` against size; null = serve the whole file. */
export function parseRange(header: string | null, size: number): { start: number; end: number } | null {
  if (!header) return null;
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim());
  if (!m || (m[1] === "" && m[2] === "")) return null; // several ranges or another unit: ignore the header
  let start: number, end: number;
  if (m[1] === "") {
    const n = Number(m[2]);
    if (n === 0) throw unsatisfiable(size);
    start = Math.max(0, size - n);
    end = size - 1;
  } else {
    start = Number(m[1]);
    end = m[2] === "" ? size - 1 : Math.min(Number(m[2]), size - 1);
    if (m[2] !== "" && Number(m[2]) < start) return null; // invalid range: ignored (RFC 9110 §14.1.1)
  }
  if (start >= size) throw unsatisfiable(size);
  return { start, end };
}

const unsatisfiable = (size: number) =>
  new ApiError("range-not-satisfiable", `The file has ${size} bytes.`, { headers: { "content-range": `bytes */${size}` } });

export async function artifactResponse(store: ObjectStore, a: StoredArtifact, req: Request): Promise<Response> {
  const etag = `"${a.sha256}"`;
  const headers: Record<string, string> = {
    "content-type": a.mediaType, etag, "accept-ranges": "bytes",
    "content-disposition": `attachment; filename="${a.name}"`, "cache-control": "no-store, no-transform",
  };
  const inm = req.headers.get("if-none-match");
  if (inm && (inm.trim() === "*" || inm.split(",").some((t) => t.trim().replace(/^W\//, "") === etag))) {
    return new Response(null, { status: 304, headers: { etag } });
  }
  const ifRange = req.headers.get("if-range");
  const range = ifRange && ifRange.trim() !== etag ? null : parseRange(req.headers.get("range"), a.size);
  if (req.method === "HEAD") return new Response(null, { status: 200, headers: { ...headers, [BODY_LENGTH_HEADER]: String(a.size) } });
  const read = await store.get(a.key, range ? { range } : {});
  const body = Readable.toWeb(read.body) as ReadableStream<Uint8Array>;
  if (!range) return new Response(body, { status: 200, headers: { ...headers, [BODY_LENGTH_HEADER]: String(a.size) } });
  return new Response(body, {
    status: 206,
    headers: { ...headers, [BODY_LENGTH_HEADER]: String(range.end - range.start + 1), "content-range": `bytes ${range.start}-${range.end}/${a.size}` },
  });
}
