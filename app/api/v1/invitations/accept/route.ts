// POST /api/v1/invitations/accept — join an organisation with an invitation link's token; signs the invitee in
import { InvitationAcceptBody } from "@/lib/api/schemas";
import { noContent, parseJson, withPublic } from "@/lib/api/handler";
import { acceptInvitation } from "@/lib/auth/invitations";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withPublic(async ({ req, db, clock, ip, userAgent }) => {
  const body = await parseJson(req, InvitationAcceptBody);
  const { cookie } = await acceptInvitation(db, { ...body, ip, userAgent }, clock);
  return noContent({ "set-cookie": cookie });
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
