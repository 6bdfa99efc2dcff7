// Worker-thread entry that runs one job handler. The pipelines compute synchronously between their stages, so
// they run off the worker's main thread: it stays free to write heartbeats and progress, and a cancel ends the
// thread at once (Worker.terminate stops even a tight loop). The thread is started ahead of its job (modules
// loaded, waiting for the one message that names the job) and ends after it.
import { parentPort } from "node:worker_threads";
import { HANDLERS } from "@/jobs/handlers/index";
import type { HandlerInput } from "@/jobs/handlers/types";
import type { JobKind } from "@/lib/jobs/kinds";

export type ThreadMessage =
  | { type: "progress"; stage: string; fraction: number }
  | { type: "done"; output: Awaited<ReturnType<(typeof HANDLERS)[JobKind]>> }
  | { type: "error"; error: { name: string; code: string | null; message: string } };

/** The one message a thread receives. */
export interface ThreadJob {
  kind: JobKind;
  input: HandlerInput;
}

const post = (m: ThreadMessage) => parentPort!.postMessage(m);

parentPort!.once("message", ({ kind, input }: ThreadJob) => void HANDLERS[kind](input, { onProgress: (stage, fraction) => post({ type: "progress", stage, fraction }) }).then(
  (output) => post({ type: "done", output }),
  (e: unknown) => {
    const err = e as { name?: unknown; code?: unknown; detail?: unknown; message?: unknown };
    post({
      type: "error",
      error: {
        name: typeof err?.name === "string" ? err.name : "Error",
        code: typeof err?.code === "string" ? err.code : null,
        message: typeof err?.detail === "string" ? err.detail : typeof err?.message === "string" ? err.message : String(e),
      },
    });
  },
));
