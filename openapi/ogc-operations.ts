// The feature service's operations (OGC API – Features Part 1, OGC 17-069r4) in the OpenAPI document. Their
// bodies are the standard's documents, described here by their members; the `limit` bounds are the ones the
// handlers enforce (lib/features/items-query.ts), so clients reading this document page within them.
import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import type { z } from "zod";
import { jsonContent as json, registerOperations } from "@/openapi/operations";
import { z as Z } from "@/lib/api/schemas";
import { CONFORMANCE_CLASSES, GEOJSON } from "@/lib/features/documents";
import { DEFAULT_LIMIT, MAX_LIMIT } from "@/lib/features/items-query";

const CollectionParams = Z.object({ collectionId: Z.string().openapi({ description: "The id of a succeeded drainage or network job." }) });
const FeatureParams = CollectionParams.extend({ featureId: Z.string().openapi({ description: "The stream link's id (an integer)." }) });
const ItemsQuery = Z.object({
  limit: Z.number().int().min(1).max(MAX_LIMIT).default(DEFAULT_LIMIT).optional().openapi({ description: `Features per page, 1–${MAX_LIMIT}; default ${DEFAULT_LIMIT}. Each page counts against the per-key request quota, so GIS clients reading large networks should ask for big pages (GDAL: \`-oo PAGE_SIZE=1000\`).` }),
  bbox: Z.string().optional().openapi({ description: "minLon,minLat,maxLon,maxLat in CRS84 (or 6 numbers with heights); a west edge east of the east edge spans the antimeridian. Links intersecting it are returned." }),
  cursor: Z.string().optional().openapi({ description: "Opaque; copied from a `next` link." }),
  order: Z.number().int().min(1).optional().openapi({ description: "Only links of this Strahler order." }),
});

const links = { type: "array", items: { type: "object", properties: { href: { type: "string" }, rel: { type: "string" }, type: { type: "string" }, title: { type: "string" } }, required: ["href", "rel"] } };
const collection = {
  type: "object", required: ["id", "links"],
  properties: { id: { type: "string" }, title: { type: "string" }, description: { type: "string" }, itemType: { type: "string" }, crs: { type: "array", items: { type: "string" } }, extent: { type: "object" }, links },
};
const feature = {
  type: "object", required: ["type", "geometry", "properties"],
  properties: {
    type: { const: "Feature" }, id: { type: "integer" }, links,
    geometry: { type: "object", description: "A GeoJSON LineString in lon/lat (RFC 7946)." },
    properties: { type: "object", description: "link, downstream (link id or null), order (Strahler), magnitude (Shreve), lengthM, dropM, areaM2 (contributing area at the downstream end)." },
  },
};

interface OgcOperation {
  path: string;
  summary: string;
  params?: z.ZodObject;
  query?: z.ZodObject;
  content: Record<string, { schema: unknown }>;
  errors: number[];
}

const AUTH = [401, 403, 429];
const OPERATIONS: OgcOperation[] = [
  { path: "/api/v1/ogc", summary: "Feature service landing page", content: json({ type: "object", required: ["links"], properties: { title: { type: "string" }, description: { type: "string" }, links } }), errors: AUTH },
  { path: "/api/v1/ogc/conformance", summary: "Conformance classes", content: json({ type: "object", properties: { conformsTo: { type: "array", items: { enum: CONFORMANCE_CLASSES } } } }), errors: AUTH },
  { path: "/api/v1/ogc/collections", summary: "Stream networks, one per succeeded drainage or network job", content: json({ type: "object", properties: { links, collections: { type: "array", items: collection } } }), errors: AUTH },
  { path: "/api/v1/ogc/collections/{collectionId}", summary: "A stream network collection", params: CollectionParams, content: json(collection), errors: [...AUTH, 404] },
  {
    path: "/api/v1/ogc/collections/{collectionId}/items", summary: "Stream links as GeoJSON, paged", params: CollectionParams, query: ItemsQuery,
    content: { [GEOJSON]: { schema: { type: "object", properties: { type: { const: "FeatureCollection" }, features: { type: "array", items: feature }, numberMatched: { type: "integer" }, numberReturned: { type: "integer" }, timeStamp: { type: "string" }, links } } } },
    errors: [...AUTH, 400, 404],
  },
  { path: "/api/v1/ogc/collections/{collectionId}/items/{featureId}", summary: "One stream link", params: FeatureParams, content: { [GEOJSON]: { schema: feature } }, errors: [...AUTH, 404] },
];

const ERROR_TEXT: Record<number, string> = {
  400: "A query parameter is malformed, out of range or unknown.", 401: "Not authenticated.", 403: "Not allowed (role or scope).",
  404: "No such collection or feature (or another organisation's).", 429: "Too many requests; see Retry-After.",
};

export function registerOgcOperations(registry: OpenAPIRegistry, problem: z.ZodType): void {
  registerOperations(registry, problem, { errorText: ERROR_TEXT, tags: ["OGC API – Features"] }, OPERATIONS.map((op) => ({
    method: "get", path: op.path, summary: op.summary, permission: "results:read", params: op.params, query: op.query,
    ok: { status: 200, description: "OK.", content: op.content }, errors: op.errors,
  })));
}
