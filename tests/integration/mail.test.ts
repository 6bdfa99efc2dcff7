// Invitations by e-mail through the local SMTP catcher: the mail arrives with a working link; accepting joins.
import { describe, expect, it } from "vitest";
import { ADMIN, api, signIn, stack, unique, waitForMail } from "@/tests/integration/client";

describe("invitation e-mail", () => {
  it("an invitation arrives at the catcher with a link whose token, once accepted, creates the membership (platform contract)", async () => {
    const admin = await signIn(ADMIN);
    const email = `${unique("invitee")}@elsewhere.example`;
    const inv = await api("/api/v1/invitations", { method: "POST", cookie: admin, body: { email, role: "auditor" } });
    expect(inv.status).toBe(201);
    const pending = (await (await api("/api/v1/invitations", { cookie: admin })).json()) as { items: { email: string }[] };
    expect(pending.items.map((i) => i.email)).toContain(email);

    const mail = await waitForMail((m) => m.to.includes(email));
    expect(mail.subject).toBe("You are invited to Tallow Creek Watershed Trust on Rillscale");
    const link = new URL(/https?:\/\/\S+accept-invite\?token=\S+/.exec(mail.text)![0]);
    expect(link.origin + link.pathname).toBe(`${stack().url}/accept-invite`);
    expect(mail.html).toContain(link.toString().replaceAll("&", "&#38;"));
    const page = await fetch(link);
    expect(page.status).toBe(200);

    // Dev mail route shows the same message to an admin.
    const dev = (await (await api("/api/v1/dev/mail", { cookie: admin })).json()) as { items: { to: string[] }[] };
    expect(dev.items.some((m) => m.to.includes(email))).toBe(true);

    const token = link.searchParams.get("token")!;
    const accepted = await api("/api/v1/invitations/accept", { method: "POST", body: { token, name: "New Auditor", password: "invited password" } });
    expect(accepted.status).toBe(204);
    const cookie = accepted.headers.getSetCookie()[0].split(";")[0];
    const me = (await (await api("/api/v1/me", { cookie })).json()) as { role: string; org: { slug: string }; user: { email: string } };
    expect(me).toMatchObject({ role: "auditor", org: { slug: "tallow-creek" }, user: { email } });
    const members = (await (await api("/api/v1/members", { cookie: admin })).json()) as { items: { email: string; role: string }[] };
    expect(members.items).toContainEqual(expect.objectContaining({ email, role: "auditor" }));

    const again = await api("/api/v1/invitations/accept", { method: "POST", body: { token, name: "Again", password: "invited password" } });
    expect(again.status).toBe(422);
  });

  it("the last admin can be neither demoted nor removed (platform contract: 409)", async () => {
    const other = await signIn("admin@brackenridge.example");
    const me = (await (await api("/api/v1/me", { cookie: other })).json()) as { user: { id: string } };
    expect((await api(`/api/v1/members/${me.user.id}`, { method: "PATCH", cookie: other, body: { role: "analyst" } })).status).toBe(409);
    expect((await api(`/api/v1/members/${me.user.id}`, { method: "DELETE", cookie: other })).status).toBe(409);
  });
});
