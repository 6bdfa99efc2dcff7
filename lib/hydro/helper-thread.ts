// A second thread for the drainage kernels (node:worker_threads), working on SharedArrayBuffer-backed arrays. The
// thread evaluates the kernels' own source text as plain JavaScript, so it needs no TypeScript loader under tsx,
// vitest or a bundle, starts in tens of milliseconds, and runs the very code the calling thread runs.
import { Worker } from "node:worker_threads";
import { flatDescentRows, steepestDescentRows } from "@/lib/hydro/d8";
import { stepsTowardsLower } from "@/lib/hydro/flats";

/** Writes a zero into every 4 KiB page of each array (zeroed, and not used elsewhere until this returns),
 *  so that the operating system maps their pages here, and not at their first use on the other thread,
 *  where each first touch of a page costs about 1.7 µs on this kind of machine (measured: 256 MB in ~110 ms). */
export function touchPages(...arrays: ArrayBufferView[]): number {
  let pages = 0;
  for (const a of arrays) {
    const bytes = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
    for (let i = 0; i < bytes.length; i += 4096) {
      bytes[i] = 0;
      pages++;
    }
  }
  return pages;
}

/** The kernels the thread can run: each self-contained (no imports, closures or inner functions). */
const KERNELS = { steepestDescentRows, stepsTowardsLower, flatDescentRows, touchPages };
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
