// GET /api/v1/ogc/collections/{collectionId}/items — stream links as GeoJSON, by bbox, Strahler order, pages
import { featureCollectionOf, GEOJSON } from "@/lib/features/documents";
import { encodeItemsCursor, parseItemsQuery } from "@/lib/features/items-query";
import { getNetworkCollection, queryNetworkItems } from "@/lib/features/network-collections";
import { document, withFeatureRoute } from "@/lib/features/route";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withFeatureRoute<{ collectionId: string }>(async ({ db, principal, params, req, clock }, bases) => {
  const collection = await getNetworkCollection(db, principal.org.id, params.collectionId);
  const search = new URL(req.url).searchParams;
  const query = parseItemsQuery(search);
  const page = await queryNetworkItems(db, collection, query);
  const next = page.nextAfter === null ? null : encodeItemsCursor(page.nextAfter);
  return document(featureCollectionOf(bases, collection, page, search, next, clock.now()), GEOJSON);
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
