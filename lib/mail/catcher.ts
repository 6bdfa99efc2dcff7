// A local SMTP catcher (smtp-server + mailparser) on loopback for `npm start` and the tests: it accepts every
// message and keeps it as JSON in a directory, where the dev-mail page and tests read it.
import { randomUUID } from "node:crypto";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";
import { saveCaughtMail } from "@/lib/mail/store";

const MAX_MESSAGE_BYTES = 5 * 1024 * 1024;

const addresses = (a: AddressObject | AddressObject[] | undefined) =>
  (Array.isArray(a) ? a : a ? [a] : []).flatMap((x) => x.value.map((v) => v.address ?? "")).filter(Boolean);

export interface MailCatcher {
  port: number;
  close(): Promise<void>;
}

export async function startMailCatcher(opts: { port: number; dir: string }): Promise<MailCatcher> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const to = addresses(parsed.to);
          saveCaughtMail(opts.dir, {
            id: `${Date.now().toString().padStart(15, "0")}-${randomUUID().slice(0, 8)}`,
            to: to.length ? to : session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : "",
            receivedAt: new Date().toISOString(),
          });
          callback();
        })
        .catch((e: Error) => callback(e));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  server.on("error", (e) => console.error("mail catcher:", e.message));
  const address = (server as unknown as { server: import("node:net").Server }).server.address();
  const port = typeof address === "object" && address ? address.port : opts.port;
  return { port, close: () => new Promise<void>((r) => server.close(() => r())) };
}
