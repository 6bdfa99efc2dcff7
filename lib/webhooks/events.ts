// The events an endpoint can subscribe to and their thin payloads (Standard Webhooks 1.0 recommends a small
// body with ids and links; the receiver fetches the rest with its key).
export const WEBHOOK_EVENTS = ["job.succeeded", "job.failed", "job.cancelled"] as const;
export type WebhookEvent = (typeof WEBHOOK_EVENTS)[number];

export interface JobEventFacts {
  id: string;
  kind: string;
  status: "succeeded" | "failed" | "cancelled";
  dataset: string | null;
  finishedAt: Date;
}

export const eventOfStatus = (status: JobEventFacts["status"]): WebhookEvent => `job.${status}`;

/** The JSON body sent (the same bytes on every attempt: it is what the signature covers). */
export function jobEventPayload(job: JobEventFacts): string {
  const base = `/api/v1/jobs/${job.id}`;
  return JSON.stringify({
    type: eventOfStatus(job.status),
    timestamp: job.finishedAt.toISOString(),
    data: {
      id: job.id, kind: job.kind, status: job.status, dataset: job.dataset,
      links: { job: base, ...(job.status === "succeeded" ? { result: `${base}/result`, provenance: `${base}/provenance` } : {}) },
    },
  });
}
