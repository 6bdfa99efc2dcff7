// GET /api/v1/ogc — landing page of the OGC API – Features service for stream networks
import { landingPage } from "@/lib/features/documents";
import { document, withFeatureRoute } from "@/lib/features/route";

export const runtime = "nodejs";

export const GET = withFeatureRoute(async (_c, bases) => document(landingPage(bases)));
