// POST /api/v1/password-resets/confirm — set a new password with the link's token
import { PasswordResetConfirmBody } from "@/lib/api/schemas";
import { noContent, parseJson, withPublic } from "@/lib/api/handler";
import { confirmPasswordReset } from "@/lib/auth/password-resets";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withPublic(async ({ req, db, clock }) => {
  await confirmPasswordReset(db, await parseJson(req, PasswordResetConfirmBody), clock);
  return noContent();
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
