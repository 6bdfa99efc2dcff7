// The Idempotency-Key request header (draft-ietf-httpapi-idempotency-key-header-06 §2): its syntax, the
// retention of what it records, and the sentence the API documentation gives clients.
import { ApiError } from "@/lib/api/problem";

export const IDEMPOTENCY_RETENTION_HOURS = 24;
const MAX_KEY_CHARS = 255;

export const IDEMPOTENCY_DOC = `Send \`Idempotency-Key\` (a string of 1–${MAX_KEY_CHARS} visible ASCII characters, as a quoted structured-field string \`"…"\` or bare) to make a retry safe: the same key with the same body replays the first response (status and body, header \`Idempotent-Replayed: true\`); the same key with a different body answers 422; while the first request is still being processed, 409. Keys are scoped to the organisation and the caller (API key or user) and kept for ${IDEMPOTENCY_RETENTION_HOURS} hours.`;

/** The header's value, quoted (RFC 8941 sf-string) or bare; null when absent. */
export function parseIdempotencyKey(header: string | null): string | null {
  if (header === null) return null;
  let v = header.trim();
  if (v.length >= 2 && v.startsWith('"') && v.endsWith('"')) v = v.slice(1, -1).replace(/\\(["\\])/g, "$1");
  if (v.length === 0 || v.length > MAX_KEY_CHARS || !/^[\x20-\x7e]+$/.test(v)) {
    throw new ApiError("bad-request", `Idempotency-Key must be 1–${MAX_KEY_CHARS} visible ASCII characters.`);
  }
  return v;
}
