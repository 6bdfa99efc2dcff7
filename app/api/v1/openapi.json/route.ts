// GET /api/v1/openapi.json — the OpenAPI 3.1 document, generated from the zod schemas
import { json, withPublic } from "@/lib/api/handler";
import { buildOpenApiDocument } from "@/openapi/registry";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

const document = buildOpenApiDocument();

export const GET = withPublic(async () => json(document));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
