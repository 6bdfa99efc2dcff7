// Opaque keyset cursors for newest-first lists: base64url of the last row's (createdAt, id). Keyset, not
// offset, so rows inserted meanwhile never shift or repeat a page.
import { ApiError } from "@/lib/api/problem";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const encodeCursor = (at: Date, id: string) => Buffer.from(`${at.toISOString()}|${id}`).toString("base64url");

export function decodeCursor(cursor: string): { at: Date; id: string } {
  const [iso, id] = Buffer.from(cursor, "base64url").toString("utf8").split("|");
  const at = new Date(iso ?? "");
  if (!id || !UUID.test(id) || Number.isNaN(at.getTime())) {
    throw new ApiError("validation", "The cursor is not one this API gave out.", { errors: [{ pointer: "/cursor", detail: "unknown cursor" }] });
  }
  return { at, id };
}
