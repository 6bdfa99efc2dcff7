// GET /api/v1/ogc/collections/{collectionId} — a job's stream network: extent in CRS84 and the items link
import { collectionDoc } from "@/lib/features/documents";
import { getNetworkCollection } from "@/lib/features/network-collections";
import { document, withFeatureRoute } from "@/lib/features/route";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withFeatureRoute<{ collectionId: string }>(async ({ db, principal, params }, bases) =>
  document(collectionDoc(bases, await getNetworkCollection(db, principal.org.id, params.collectionId))));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
