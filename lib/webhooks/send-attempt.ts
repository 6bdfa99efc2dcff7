// One HTTP attempt of a webhook delivery: POST the exact body with the Standard Webhooks headers, through the
// address guard, without following redirects (a 3xx is a failed attempt), with a deadline, reading at most a
// little of the answer for the delivery log.
import http from "node:http";
import https from "node:https";
import { checkWebhookUrl, guardedLookup } from "@/lib/webhooks/address-guard";

/** Receivers should answer fast and work later; waiting longer only ties up the worker. */
export const ATTEMPT_TIMEOUT_MS = 15_000;
/** Enough of the receiver's answer to show in the delivery log. */
const RESPONSE_EXCERPT_BYTES = 1024;

export interface AttemptResult {
  status: number | null;
  durationMs: number;
  responseExcerpt: string;
  error: string | null;
}

export interface AttemptRequest {
  url: string;
  headers: Record<string, string>;
  body: string;
  allowPrivate: boolean;
  timeoutMs?: number;
  userAgent?: string;
}

export function sendAttempt(r: AttemptRequest): Promise<AttemptResult> {
  const started = Date.now();
  return new Promise((resolve) => {
    let url: URL;
    try {
      url = checkWebhookUrl(r.url, r.allowPrivate);
    } catch (e) {
      resolve({ status: null, durationMs: 0, responseExcerpt: "", error: (e as Error).message });
      return;
    }
    const lib = url.protocol === "https:" ? https : http;
    const req = lib.request(url, {
      method: "POST",
      lookup: guardedLookup(r.allowPrivate) as never,
      timeout: r.timeoutMs ?? ATTEMPT_TIMEOUT_MS,
      headers: {
        ...r.headers, "content-type": "application/json", "content-length": Buffer.byteLength(r.body),
        "user-agent": r.userAgent ?? "Rillscale-Webhooks/1",
      },
    }, (res) => {
      const chunks: Buffer[] = [];
      let kept = 0;
      res.on("data", (c: Buffer) => {
        if (kept < RESPONSE_EXCERPT_BYTES) {
          chunks.push(c.subarray(0, RESPONSE_EXCERPT_BYTES - kept));
          kept += c.length;
        }
      });
      res.on("end", () => resolve({ status: res.statusCode ?? null, durationMs: Date.now() - started, responseExcerpt: Buffer.concat(chunks).toString("utf8"), error: null }));
      res.on("error", (e) => resolve({ status: res.statusCode ?? null, durationMs: Date.now() - started, responseExcerpt: "", error: e.message }));
    });
    req.on("timeout", () => req.destroy(new Error(`no answer within ${r.timeoutMs ?? ATTEMPT_TIMEOUT_MS} ms`)));
    req.on("error", (e) => resolve({ status: null, durationMs: Date.now() - started, responseExcerpt: "", error: e.message }));
    req.end(r.body);
  });
}
