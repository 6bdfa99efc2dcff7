// A second thread for the drainage kernels (node:worker_threads), working on SharedArrayBuffer-backed arrays. The
// thread evaluates the kernels' own source text as plain JavaScript, so it needs no TypeScript loader under tsx,
// vitest or a bundle, starts in tens of milliseconds, and runs the very code the calling thread runs.
import { Worker } from "node:worker_threads";
import { flatDescentRows, steepestDescentRows } from "@/lib/hydro/d8";
import { stepsTowardsLower } from "@/lib/hydro/flats";

/** The kernels the thread can run: each self-contained (no imports, closures or inner functions). */
const KERNELS = { steepestDescentRows, stepsTowardsLower, flatDescentRows };
type Kernels = typeof KERNELS;
type KernelName = keyof Kernels;

// Messages in: {id, name, args}; out: {id, result} | {id, error}. Calls run one after another, in order.
const THREAD_SOURCE = `"use strict";
const { parentPort } = require("node:worker_threads");
const kernels = {
${Object.entries(KERNELS).map(([name, kernel]) => `${JSON.stringify(name)}: ${kernel.toString()}`).join(",\n")}
};
parentPort.on("message", ({ id, name, args }) => {
  let reply;
  try { reply = { id, result: kernels[name](...args) }; }
  catch (e) { reply = { id, error: String((e && e.stack) || e) }; }
  parentPort.postMessage(reply);
});
`;

export class HelperThread {
  private readonly thread = new Worker(THREAD_SOURCE, { eval: true });
  private readonly pending = new Map<number, { resolve(v: unknown): void; reject(e: Error): void }>();
  private nextId = 0;
  private closed = false;

  constructor() {
    this.thread.on("message", (m: { id: number; result?: unknown; error?: string }) => {
      const call = this.pending.get(m.id);
      if (!call) return;
      this.pending.delete(m.id);
      if (m.error !== undefined) call.reject(new Error(`helper thread: ${m.error}`));
      else call.resolve(m.result);
    });
    const failAll = (e: Error) => {
      for (const call of this.pending.values()) call.reject(e);
      this.pending.clear();
    };
    this.thread.on("error", failAll);
    this.thread.on("exit", (code) => {
      if (!this.closed) failAll(new Error(`the helper thread ended (exit code ${code}) before its answers`));
    });
  }

  /** Runs `name(...args)` in the thread after the calls before it. Every typed array must be backed by a
   *  SharedArrayBuffer: the thread would otherwise work on a copy, and its writes would be lost. */
  run<K extends KernelName>(name: K, ...args: Parameters<Kernels[K]>): Promise<ReturnType<Kernels[K]>> {
    for (const a of args) {
      if (ArrayBuffer.isView(a) && !(a.buffer instanceof SharedArrayBuffer)) {
        throw new TypeError(`${name}: an argument's array is not in a SharedArrayBuffer`);
      }
    }
    const id = this.nextId++;
    const answer = new Promise<ReturnType<Kernels[K]>>((resolve, reject) => {
      this.pending.set(id, { resolve: resolve as (v: unknown) => void, reject });
    });
    answer.catch(() => undefined); // a caller that stops early (an abort) leaves it unawaited
    this.thread.postMessage({ id, name, args });
    return answer;
  }

  /** Ends the thread, at once even inside a kernel; unanswered calls stay unsettled. */
  close(): void {
    this.closed = true;
    this.pending.clear();
    void this.thread.terminate();
  }
}
