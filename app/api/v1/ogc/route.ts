// GET /api/v1/ogc — landing page of the OGC API – Features service for stream networks
import { landingPage } from "@/lib/features/documents";
import { document, withFeatureRoute } from "@/lib/features/route";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withFeatureRoute(async (_c, bases) => document(landingPage(bases)));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
