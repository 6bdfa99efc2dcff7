// Object keys: one safe alphabet for both backends (a subset of the S3 "safe characters" of its key naming
// guidelines), so a key can never climb out of the local root nor differ between local disk and S3.

/** S3 caps keys at 1024 bytes; our alphabet is ASCII, so characters = bytes. */
const MAX_KEY_LENGTH = 1024;
const SEGMENT = /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/;
const SHA256_HEX = /^[0-9a-f]{64}$/;

export class InvalidObjectKeyError extends RangeError {
  readonly code = "invalid_object_key";
  constructor(readonly key: string, reason: string) {
    super(`invalid object key ${JSON.stringify(key.slice(0, 80))}: ${reason}`);
    this.name = "InvalidObjectKeyError";
  }
}

/** Throws unless key is `seg/seg/…` with segments of [A-Za-z0-9._-] not starting with a dot (no `.`, `..`,
 *  hidden names — the local adapter keeps its temp files under dot names — no empty segments, no `/` ends). */
export function assertObjectKey(key: string): void {
  if (typeof key !== "string" || key.length === 0) throw new InvalidObjectKeyError(String(key), "empty");
  if (key.length > MAX_KEY_LENGTH) throw new InvalidObjectKeyError(key, `longer than ${MAX_KEY_LENGTH} characters`);
  for (const segment of key.split("/")) {
    if (!SEGMENT.test(segment)) {
      throw new InvalidObjectKeyError(key, `segment ${JSON.stringify(segment)} must be [A-Za-z0-9._-]+ and not start with "."`);
    }
  }
}

/** Same check for a list prefix, which may be empty or end with "/". */
export function assertKeyPrefix(prefix: string): void {
  if (prefix === "") return;
  assertObjectKey(prefix.endsWith("/") ? prefix.slice(0, -1) : prefix);
}

/** Content-addressed key, e.g. `contentKey(h, "datasets")` = `datasets/ab/cd/<h>`; two fan-out levels keep
 *  directories small on local disk. */
export function contentKey(sha256: string, kind: string): string {
  if (!SHA256_HEX.test(sha256)) throw new RangeError(`sha256 must be 64 lowercase hex digits, got ${JSON.stringify(sha256)}`);
  const key = `${kind}/${sha256.slice(0, 2)}/${sha256.slice(2, 4)}/${sha256}`;
  if (kind.includes("/")) throw new InvalidObjectKeyError(key, "kind is a single segment");
  assertObjectKey(key);
  return key;
}

/** Key of a job's artifact: `jobs/<jobId>/<name>`; a retried job writes the same key, so it overwrites itself. */
export function artifactKey(jobId: string, name: string): string {
  const key = `jobs/${jobId}/${name}`;
  if (jobId.includes("/") || name.includes("/")) throw new InvalidObjectKeyError(key, "job id and artifact name are single segments");
  assertObjectKey(key);
  return key;
}
