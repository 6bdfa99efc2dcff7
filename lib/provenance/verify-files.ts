// Re-hashing the files a provenance document names (the input dataset and the artifacts) against the SHA-256
// and size the signed document states: the signature proves the document, this proves the files.
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import { basename } from "node:path";
import { filesOfDocument, type ProvDocument } from "@/lib/provenance/prov-json";

export interface FileCheck {
  path: string;
  ok: boolean;
  /** The entity the file's hash matched, or null when it matches none in the document. */
  entityId: string | null;
  sha256: string;
  detail: string;
}

export async function sha256OfFile(path: string): Promise<{ sha256: string; size: number }> {
  const hash = createHash("sha256");
  let size = 0;
  for await (const chunk of createReadStream(path)) {
    hash.update(chunk as Buffer);
    size += (chunk as Buffer).length;
  }
  return { sha256: hash.digest("hex"), size };
}

/** Each file must match, by hash, an input or artifact of the document (matched by content, not by name). */
export async function checkFiles(doc: ProvDocument, paths: string[]): Promise<FileCheck[]> {
  const named = filesOfDocument(doc);
  const out: FileCheck[] = [];
  for (const path of paths) {
    const { sha256, size } = await sha256OfFile(path);
    const match = named.find((f) => f.sha256 === sha256 && f.sizeBytes === size);
    out.push(match
      ? { path, ok: true, entityId: match.entityId, sha256, detail: `${basename(path)} is the ${match.role} ${match.label}` }
      : { path, ok: false, entityId: null, sha256, detail: `${basename(path)} (sha256 ${sha256}) matches no input or artifact of the document` });
  }
  return out;
}
