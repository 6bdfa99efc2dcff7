// Any /api/v1 path no other route serves, every method: a 404 not-found problem instead of Next's HTML page
import { unknownPath } from "@/lib/api/fallbacks";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const { GET, POST, PUT, PATCH, DELETE, OPTIONS } = unknownPath();
