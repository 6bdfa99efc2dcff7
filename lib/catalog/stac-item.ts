// SpatioTemporal Asset Catalog Item Specification 1.1.0 (stacspec.org, 2024) of one finished job, with the
// Projection extension 2.0.0 (`proj:code`) and the File extension 2.1.0 (`file:checksum` as a multihash,
// `file:size`); the signed provenance is linked and listed as a metadata asset. Pure: facts in, JSON out.
export const STAC_VERSION = "1.1.0";
export const STAC_EXTENSIONS = [
  "https://stac-extensions.github.io/projection/v2.0.0/schema.json",
  "https://stac-extensions.github.io/file/v2.1.0/schema.json",
] as const;
/** W3C PROV-AQ (2013) §3.1 link relation for "this resource's provenance is there". */
export const HAS_PROVENANCE = "http://www.w3.org/ns/prov#has_provenance";
/** Multihash prefix of a SHA2-256 digest: function code 0x12, length 0x20 (multiformats table). */
const SHA256_MULTIHASH_PREFIX = "1220";

export interface StacJobFacts {
  baseUrl: string;
  job: { id: string; kind: string; createdAt: Date; finishedAt: Date; cachedFrom: string | null };
  dataset: { id: string; name: string };
  /** [west, south, east, north] in degrees (CRS84), from the dataset's metadata. */
  bboxLonLat: [number, number, number, number];
  /** EPSG code of the dataset (and of its raster artifacts), or null when it has none we know. */
  epsg: number | null;
  software: { name: string; version: string };
  artifacts: { name: string; mediaType: string; sizeBytes: number; sha256: string }[];
}

/**
 * One asset of the Item: STAC 1.1.0 requires `href`; the File and Projection fields are set where they apply.
 * A type alias, not an interface, so it stays assignable to the open (index-signature) asset type of the schemas.
 */
export type ItemAsset = {
  href: string;
  type: string;
  title: string;
  roles: string[];
  "file:checksum"?: string;
  "file:size"?: number;
  "proj:code"?: string;
};

const rolesOf = (mediaType: string): string[] => (mediaType.startsWith("text/csv") ? ["data", "table"] : ["data"]);

export function buildStacItem(f: StacJobFacts) {
  const [w, s, e, n] = f.bboxLonLat;
  if (!(w <= e && s <= n)) throw new RangeError(`bbox must be [west, south, east, north] with west ≤ east and south ≤ north, got ${f.bboxLonLat.join(", ")}`);
  const base = `${f.baseUrl.replace(/\/$/, "")}/api/v1/jobs/${f.job.id}`;
  const assets: Record<string, ItemAsset> = {};
  for (const a of f.artifacts) {
    assets[a.name] = {
      href: `${base}/artifacts/${encodeURIComponent(a.name)}`, type: a.mediaType, title: a.name, roles: rolesOf(a.mediaType),
      "file:checksum": SHA256_MULTIHASH_PREFIX + a.sha256, "file:size": a.sizeBytes,
      ...(a.mediaType.startsWith("image/tiff") && f.epsg !== null ? { "proj:code": `EPSG:${f.epsg}` } : {}),
    };
  }
  assets.provenance = { href: `${base}/provenance`, type: "application/json", title: "Signed W3C PROV-JSON document", roles: ["metadata"] };
  assets["provenance-signature"] = { href: `${base}/provenance.jws`, type: "application/jose", title: "Detached JWS (RFC 7797) of the provenance document", roles: ["metadata"] };
  return {
    type: "Feature" as const,
    stac_version: STAC_VERSION,
    stac_extensions: [...STAC_EXTENSIONS],
    id: f.job.id,
    geometry: { type: "Polygon" as const, coordinates: [[[w, s], [e, s], [e, n], [w, n], [w, s]]] },
    bbox: [w, s, e, n],
    properties: {
      title: `${f.job.kind} analysis of ${f.dataset.name}`,
      datetime: f.job.finishedAt.toISOString(),
      created: f.job.createdAt.toISOString(),
      "proj:code": f.epsg === null ? null : `EPSG:${f.epsg}`,
      "rillscale:kind": f.job.kind,
      "rillscale:dataset": f.dataset.id,
      "rillscale:cached_from": f.job.cachedFrom,
      processing_software: { [f.software.name]: f.software.version },
    },
    links: [
      { rel: "self", href: `${base}/stac`, type: "application/geo+json" },
      { rel: HAS_PROVENANCE, href: `${base}/provenance`, type: "application/json", title: "Signed provenance" },
      { rel: "related", href: `${base}/result`, type: "application/json", title: "Result summary" },
      { rel: "via", href: base, type: "application/json", title: "The job" },
    ],
    assets,
  };
}
