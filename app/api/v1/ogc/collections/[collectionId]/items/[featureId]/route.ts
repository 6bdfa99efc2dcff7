// GET /api/v1/ogc/collections/{collectionId}/items/{featureId} — one stream link as a GeoJSON Feature
import { featureOf, GEOJSON } from "@/lib/features/documents";
import { getNetworkCollection, getNetworkItem } from "@/lib/features/network-collections";
import { document, withFeatureRoute } from "@/lib/features/route";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withFeatureRoute<{ collectionId: string; featureId: string }>(async ({ db, principal, params }, bases) => {
  const collection = await getNetworkCollection(db, principal.org.id, params.collectionId);
  return document(featureOf(bases, collection, await getNetworkItem(db, collection, params.featureId)), GEOJSON);
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
