// The JSON documents of the feature service (OGC API – Features Part 1, OGC 17-069r4): landing page,
// conformance, collections, and GeoJSON (RFC 7946) features with the standard's links. Links are absolute,
// built on the public base URL, because desktop GIS clients follow `next` as given.
import type { NetworkCollection, NetworkFeatureRow } from "@/lib/features/network-collections";

export const GEOJSON = "application/geo+json";
const JSON_TYPE = "application/json";
const OPENAPI_TYPE = "application/vnd.oai.openapi+json;version=3.0";
const CRS84 = "http://www.opengis.net/def/crs/OGC/1.3/CRS84";

export const CONFORMANCE_CLASSES = [
  "http://www.opengis.net/spec/ogcapi-features-1/1.0/conf/core",
  "http://www.opengis.net/spec/ogcapi-features-1/1.0/conf/geojson",
  "http://www.opengis.net/spec/ogcapi-features-1/1.0/conf/oas30",
];

export interface Bases {
  /** e.g. https://rillscale.example/api/v1/ogc */
  ogc: string;
  /** the OpenAPI document */
  openapi: string;
}

const link = (href: string, rel: string, type: string, title?: string) => ({ href, rel, type, ...(title ? { title } : {}) });

export const landingPage = (b: Bases) => ({
  title: "Rillscale stream networks",
  description: "The stream networks of your organisation's succeeded drainage and network jobs, one collection per job, as OGC API – Features.",
  links: [
    link(b.ogc, "self", JSON_TYPE, "This document"),
    link(b.openapi, "service-desc", OPENAPI_TYPE, "The API definition"),
    link(`${b.ogc}/conformance`, "conformance", JSON_TYPE, "Conformance classes"),
    link(`${b.ogc}/collections`, "data", JSON_TYPE, "Collections"),
  ],
});

export const conformance = () => ({ conformsTo: CONFORMANCE_CLASSES });

const collectionUrl = (b: Bases, c: NetworkCollection) => `${b.ogc}/collections/${c.job.id}`;

export const collectionDoc = (b: Bases, c: NetworkCollection) => ({
  id: c.job.id,
  title: `Stream network of ${c.job.kind} job ${c.job.id}`,
  description: `${c.featureCount} stream links with Strahler order, Shreve magnitude, length (m), drop (m) and contributing area (m²); finished ${c.job.finishedAt?.toISOString() ?? "—"}.`,
  itemType: "feature",
  crs: [CRS84],
  ...(c.bbox ? { extent: { spatial: { bbox: [c.bbox], crs: CRS84 } } } : {}),
  links: [
    link(collectionUrl(b, c), "self", JSON_TYPE),
    link(`${collectionUrl(b, c)}/items`, "items", GEOJSON, "The stream links"),
  ],
});

export const collectionsDoc = (b: Bases, list: NetworkCollection[]) => ({
  links: [link(`${b.ogc}/collections`, "self", JSON_TYPE)],
  collections: list.map((c) => collectionDoc(b, c)),
});

export function featureOf(b: Bases, c: NetworkCollection, f: NetworkFeatureRow) {
  const self = `${collectionUrl(b, c)}/items/${f.id}`;
  return {
    type: "Feature" as const,
    id: f.id,
    geometry: JSON.parse(f.geometry) as unknown,
    properties: { link: f.id, downstream: f.downstream, order: f.order, magnitude: f.magnitude, lengthM: f.lengthM, dropM: f.dropM, areaM2: f.areaM2 },
    links: [link(self, "self", GEOJSON), link(collectionUrl(b, c), "collection", JSON_TYPE)],
  };
}

/** `self` repeats the request; `next` the same query with the cursor after this page's last link. */
export function featureCollectionOf(
  b: Bases, c: NetworkCollection, page: { features: NetworkFeatureRow[]; numberMatched: number },
  query: URLSearchParams, nextCursor: string | null, now: Date,
) {
  const items = `${collectionUrl(b, c)}/items`;
  const withQuery = (q: URLSearchParams) => (q.size ? `${items}?${q}` : items);
  const links = [link(withQuery(query), "self", GEOJSON), link(collectionUrl(b, c), "collection", JSON_TYPE)];
  if (nextCursor !== null) {
    const next = new URLSearchParams(query);
    next.set("cursor", nextCursor);
    links.push(link(withQuery(next), "next", GEOJSON, "The next page"));
  }
  return {
    type: "FeatureCollection" as const,
    timeStamp: now.toISOString(),
    numberMatched: page.numberMatched,
    numberReturned: page.features.length,
    features: page.features.map((f) => featureOf(b, c, f)),
    links,
  };
}
