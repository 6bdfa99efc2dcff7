// POST /api/v1/password-resets — e-mail a single-use reset link (202 whether or not the address has an account)
import { PasswordResetRequestBody } from "@/lib/api/schemas";
import { parseJson, withPublic } from "@/lib/api/handler";
import { requestPasswordReset } from "@/lib/auth/password-resets";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withPublic(async ({ req, db, clock }) => {
  const { email } = await parseJson(req, PasswordResetRequestBody);
  await requestPasswordReset(db, email, clock);
  return new Response(null, { status: 202 });
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
