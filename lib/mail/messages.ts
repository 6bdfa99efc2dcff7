// The texts of the e-mails we send. Links are absolute, built on RILLSCALE_PUBLIC_URL.
import type { OutgoingMail } from "@/lib/mail/send";

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function message(to: string | string[], subject: string, lines: string[], link?: { url: string; label: string }): OutgoingMail {
  const text = [...lines, ...(link ? ["", `${link.label}: ${link.url}`] : []), "", "— Rillscale"].join("\n");
  const html = [
    ...lines.map((l) => `<p>${escape(l)}</p>`),
    ...(link ? [`<p><a href="${escape(link.url)}">${escape(link.label)}</a></p>`] : []),
    "<p>— Rillscale</p>",
  ].join("\n");
  return { to, subject, text, html };
}

export function invitationMail(o: { to: string; orgName: string; role: string; url: string; expiresAt: Date }) {
  return message(o.to, `You are invited to ${o.orgName} on Rillscale`, [
    `You have been invited to join ${o.orgName} as ${o.role}.`,
    `The link works once and until ${o.expiresAt.toISOString()}.`,
  ], { url: o.url, label: "Accept the invitation" });
}

export function passwordResetMail(o: { to: string; url: string; expiresAt: Date }) {
  return message(o.to, "Reset your Rillscale password", [
    "Someone (hopefully you) asked to reset the password of this account.",
    `The link works once and until ${o.expiresAt.toISOString()}. If you did not ask, ignore this message.`,
  ], { url: o.url, label: "Choose a new password" });
}

export function keyChangedMail(o: { to: string[]; orgName: string; keyName: string; prefix: string; change: "rotated" | "revoked"; by: string; graceUntil?: Date | null }) {
  const lines = [`The API key "${o.keyName}" (${o.prefix}…) of ${o.orgName} was ${o.change} by ${o.by}.`];
  if (o.change === "rotated" && o.graceUntil) lines.push(`Its previous secret keeps working until ${o.graceUntil.toISOString()}.`);
  if (o.change === "revoked") lines.push("Requests with this key are refused from now on.");
  return message(o.to, `API key ${o.change}: ${o.keyName}`, lines);
}
