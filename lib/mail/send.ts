// Outgoing mail through nodemailer over SMTP (the local catcher in development and tests).
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "@/lib/env";

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html: string;
}

let transport: Transporter | undefined;

export async function sendMail(m: OutgoingMail): Promise<void> {
  const e = env();
  transport ??= nodemailer.createTransport({ host: e.SMTP_HOST, port: e.SMTP_PORT, secure: false, ignoreTLS: e.SMTP_HOST === "127.0.0.1" });
  await transport.sendMail({ from: e.MAIL_FROM, ...m });
}

/** For mail a request should not wait on or fail for (notifications): log, never throw. */
export function sendMailInBackground(m: OutgoingMail): void {
  sendMail(m).catch((err: Error) => console.error(`mail to ${String(m.to)} failed: ${err.message}`));
}
