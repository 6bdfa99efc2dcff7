// GET /api/v1/ogc/conformance — the OGC API – Features Part 1 conformance classes implemented
import { conformance } from "@/lib/features/documents";
import { document, withFeatureRoute } from "@/lib/features/route";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withFeatureRoute(async () => document(conformance()));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
