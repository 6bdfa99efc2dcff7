// The query of GET …/collections/{id}/items (OGC API – Features Part 1, OGC 17-069r4 §7.15): `limit`, `bbox`,
// the opaque `cursor` our `next` links carry, and the `order` property filter. Anything else is refused with
// 400, as the standard asks of parameters the API definition does not name.
import { ApiError, type FieldError } from "@/lib/api/problem";

export const DEFAULT_LIMIT = 10;
/** The largest page: 10 000 features of a few hundred vertices stay within a few megabytes of GeoJSON. */
export const MAX_LIMIT = 10_000;
const ALLOWED = new Set(["limit", "bbox", "cursor", "order", "f"]);
const CURSOR_PREFIX = "after:";

/** A lon/lat envelope in CRS84; a bbox crossing the antimeridian (west > east) becomes two. */
export interface Envelope {
  west: number;
  south: number;
  east: number;
  north: number;
}

export interface ItemsQuery {
  limit: number;
  envelopes: Envelope[] | null;
  /** Features after this feature id (keyset paging). */
  after: number | null;
  order: number | null;
}

const bad = (name: string, detail: string): never => {
  throw new ApiError("bad-request", `Query parameter ${name}: ${detail}.`, { errors: [{ pointer: `/${name}`, detail }] });
};

const NON_NEGATIVE_INT = /^\d{1,9}$/;

export const encodeItemsCursor = (afterFeatureId: number) => Buffer.from(CURSOR_PREFIX + afterFeatureId).toString("base64url");

function decodeItemsCursor(cursor: string): number {
  const text = Buffer.from(cursor, "base64url").toString("utf8");
  const id = text.startsWith(CURSOR_PREFIX) ? text.slice(CURSOR_PREFIX.length) : "";
  return NON_NEGATIVE_INT.test(id) ? Number(id) : bad("cursor", "not a cursor this service gave out");
}

/** `minLon,minLat,maxLon,maxLat` or the six-number form with heights (ignored: the links are 2-D). */
export function parseBbox(text: string): Envelope[] {
  const parts = text.split(",");
  if (parts.length !== 4 && parts.length !== 6) bad("bbox", "give 4 numbers (minLon,minLat,maxLon,maxLat) or 6 with heights");
  const v = parts.map((p) => (p.trim() === "" ? NaN : Number(p)));
  if (v.some((x) => !Number.isFinite(x))) bad("bbox", "every value must be a number");
  const [west, south, east, north] = parts.length === 4 ? v : [v[0], v[1], v[3], v[4]];
  if ([west, east].some((x) => x < -180 || x > 180)) bad("bbox", "longitudes must lie in −180…180");
  if ([south, north].some((y) => y < -90 || y > 90)) bad("bbox", "latitudes must lie in −90…90");
  if (south > north) bad("bbox", "the minimum latitude is above the maximum");
  // OGC 17-069r4 §7.15.3: a west edge east of the east edge means the box spans the antimeridian
  return west <= east ? [{ west, south, east, north }] : [{ west, south, east: 180, north }, { west: -180, south, east, north }];
}

export function parseItemsQuery(params: URLSearchParams): ItemsQuery {
  const errors: FieldError[] = [];
  for (const name of new Set(params.keys())) {
    if (!ALLOWED.has(name)) errors.push({ pointer: `/${name}`, detail: "unknown query parameter" });
    else if (params.getAll(name).length > 1) errors.push({ pointer: `/${name}`, detail: "given more than once" });
  }
  if (errors.length) throw new ApiError("bad-request", `Unknown or repeated query parameters: ${errors.map((e) => e.pointer.slice(1)).join(", ")}.`, { errors });
  const f = params.get("f");
  if (f !== null && f !== "json" && f !== "geojson") bad("f", "only json (GeoJSON) is offered");
  const limitText = params.get("limit");
  let limit = DEFAULT_LIMIT;
  if (limitText !== null) {
    limit = NON_NEGATIVE_INT.test(limitText) ? Number(limitText) : NaN;
    if (!(limit >= 1 && limit <= MAX_LIMIT)) bad("limit", `must be a whole number from 1 to ${MAX_LIMIT}`);
  }
  const orderText = params.get("order");
  let order: number | null = null;
  if (orderText !== null) {
    order = NON_NEGATIVE_INT.test(orderText) ? Number(orderText) : 0;
    if (order < 1) bad("order", "must be a Strahler order, a whole number from 1");
  }
  const bbox = params.get("bbox");
  const cursor = params.get("cursor");
  return { limit, envelopes: bbox === null ? null : parseBbox(bbox), after: cursor === null ? null : decodeItemsCursor(cursor), order };
}
