// Calls against an extra stack of a suite's own (tests/setup/stack.ts startExtraStack), which runs on its own URL,
// database and object root: sign-in, keys, uploads and jobs, as client.ts and data-helpers.ts do for the shared one.
import { DEMO_PASSWORD } from "@/db/seed";
import { LocalDiskStore } from "@/lib/storage";
import { pollJob, type JobBody } from "@/tests/integration/data-helpers";
import type { ExtraStack } from "@/tests/setup/stack";

export interface ExtraCall {
  method?: string;
  key?: string;
  cookie?: string;
  body?: unknown;
  headers?: Record<string, string>;
}

export interface JobTimes extends JobBody {
  kind: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export function extraClient(app: ExtraStack) {
  const call = (path: string, c: ExtraCall = {}): Promise<Response> => {
    const headers: Record<string, string> = { ...c.headers };
    if (c.key) headers.authorization = `Bearer ${c.key}`;
    if (c.cookie) headers.cookie = c.cookie;
    let body: BodyInit | undefined;
    if (c.body instanceof Uint8Array) body = c.body as Uint8Array<ArrayBuffer>;
    else if (c.body !== undefined) {
      body = JSON.stringify(c.body);
      headers["content-type"] = "application/json";
    }
    return fetch(`${app.url}${path}`, { method: c.method ?? "GET", headers, body, redirect: "manual" });
  };

  const expectStatus = async (res: Response, status: number, what: string) => {
    if (res.status !== status) throw new Error(`${what} answered ${res.status}: ${await res.text()}`);
    return res;
  };

  const getJob = async (key: string, id: string) => (await (await expectStatus(await call(`/api/v1/jobs/${id}`, { key }), 200, "job read")).json()) as JobTimes;

  return {
    call,
    getJob,
    /** The extra stack's object store (a local disk root of its own). */
    store: () => new LocalDiskStore({ root: app.env.RILLSCALE_STORAGE_ROOT }),

    async signIn(email: string): Promise<string> {
      const res = await expectStatus(await call("/api/v1/session", { method: "POST", body: { email, password: DEMO_PASSWORD } }), 204, `sign-in of ${email}`);
      return res.headers.getSetCookie().find((h) => h.includes("rillscale_session="))!.split(";")[0];
    },

    async createKey(cookie: string, scopes: string[], name: string): Promise<string> {
      const res = await expectStatus(await call("/api/v1/keys", { method: "POST", cookie, body: { name, scopes } }), 201, "key creation");
      return ((await res.json()) as { secret: string }).secret;
    },

    async upload(key: string, bytes: Uint8Array, contentType: string, filename: string): Promise<string> {
      const res = await expectStatus(await call(`/api/v1/datasets?filename=${filename}`, { method: "POST", key, body: bytes, headers: { "content-type": contentType } }), 201, `upload of ${filename}`);
      return ((await res.json()) as { id: string }).id;
    },

    async submit(key: string, body: unknown): Promise<JobTimes> {
      return (await (await expectStatus(await call("/api/v1/jobs", { method: "POST", key, body }), 202, "job submission")).json()) as JobTimes;
    },

    /** Polls every 100 ms until `done(job)`; fails with the last state after timeoutMs. */
    waitForJob: (key: string, id: string, done: (j: JobTimes) => boolean, timeoutMs = 120_000): Promise<JobTimes> =>
      pollJob(() => getJob(key, id), id, done, timeoutMs),
  };
}
