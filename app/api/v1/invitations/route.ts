// GET /api/v1/invitations — pending invitations; POST /api/v1/invitations — invite an e-mail address with a role
import { InvitationCreateBody } from "@/lib/api/schemas";
import { actingOf, json, parseJson, withAuth } from "@/lib/api/handler";
import { invitationView } from "@/lib/api/views";
import { createInvitation, listPendingInvitations } from "@/lib/auth/invitations";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ principal, db, clock }) => {
  const items = await listPendingInvitations(db, principal.org.id, clock);
  return json({ items: items.map(invitationView) });
}, { permission: "members:manage" });

export const POST = withAuth(async ({ req, principal, db, clock, ip }) => {
  const body = await parseJson(req, InvitationCreateBody);
  const inv = await createInvitation(db, actingOf(principal, ip), body, clock);
  return json(invitationView(inv), 201);
}, { permission: "members:manage" });

export const { PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET", "POST");
