// GET /api/v1/ogc/conformance — the OGC API – Features Part 1 conformance classes implemented
import { conformance } from "@/lib/features/documents";
import { document, withFeatureRoute } from "@/lib/features/route";

export const runtime = "nodejs";

export const GET = withFeatureRoute(async () => document(conformance()));
