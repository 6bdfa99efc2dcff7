// GET /api/v1/ogc/collections — one collection per succeeded drainage or network job of the organisation
import { collectionsDoc } from "@/lib/features/documents";
import { listNetworkCollections } from "@/lib/features/network-collections";
import { document, withFeatureRoute } from "@/lib/features/route";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withFeatureRoute(async ({ db, principal }, bases) => document(collectionsDoc(bases, await listNetworkCollections(db, principal.org.id))));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
