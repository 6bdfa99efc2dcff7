// GET /.well-known/jwks.json — the provenance signing keys (RFC 7517), retired ones included so old documents verify
import { json, withPublic } from "@/lib/api/handler";
import { publishedJwks } from "@/lib/provenance/keys";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = withPublic(async ({ db }) => json(await publishedJwks(db), 200, { "content-type": "application/jwk-set+json" }));
