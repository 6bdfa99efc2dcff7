// Runs untrusted-input work in a child Node process that the parent can always stop: a V8 heap limit
// (--max-old-space-size), an RSS watchdog reading VmRSS from /proc/<pid>/status (proc(5)), and a wall-clock
// deadline, both enforced with SIGKILL, which the child cannot catch or delay (POSIX signal.h).
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import type { Socket } from "node:net";
import { readFile } from "node:fs/promises";
import path from "node:path";
import { READY, type SandboxReply } from "@/lib/ingest/sandbox-child";

export interface SandboxLimits {
  /** Wall-clock budget from spawn to answer, start-up included. */
  timeoutMs: number;
  /** V8 old-generation heap limit of the child. */
  maxOldSpaceMb: number;
  /** Resident set size past which the watchdog kills the child (catches Buffers and native memory too). */
  rssCapMb: number;
  /** Watchdog sampling period. */
  pollMs: number;
}

/** 8 s leaves room inside the 10 s an upload answer may take; 1 GiB of heap fits the largest GeoJSON text the
 *  vector readers accept (256 MB) parsed; the RSS cap adds room for Buffers and the runtime itself. */
export const DEFAULT_SANDBOX_LIMITS: SandboxLimits = { timeoutMs: 8_000, maxOldSpaceMb: 1024, rssCapMb: 1536, pollMs: 25 };

/** The next spare child is started this long after a run ends. */
const SPARE_DELAY_MS = 1_000;

/** Bytes of the child's stderr kept for a crash report (the tail, where the fatal message is). */
const STDERR_TAIL = 4096;

export class InspectionTimeoutError extends Error {
  readonly code = "inspection_timeout";
  constructor(readonly timeoutMs: number) {
    super(`the file inspection did not finish within ${timeoutMs} ms and was stopped`);
    this.name = "InspectionTimeoutError";
  }
}

export class InspectionMemoryError extends Error {
  readonly code = "inspection_memory";
  constructor(readonly limit: "rss-cap" | "heap-limit", readonly capMb: number, readonly peakRssBytes: number) {
    super(`the file inspection needed more than ${capMb} MB of memory (${limit}) and was stopped`);
    this.name = "InspectionMemoryError";
  }
}

/** The child refused the file with a typed error (`code`/`detail` from RasterError, VectorError, …), or died. */
export class InspectionFailedError extends Error {
  constructor(readonly code: string, readonly detail: string, readonly childErrorName = "Error") {
    super(`${code}: ${detail}`);
    this.name = "InspectionFailedError";
  }
}

/** Too many inspections already waiting for a slot (→ 503 with Retry-After). */
export class InspectionBusyError extends Error {
  readonly code = "inspection_busy";
  constructor(readonly running: number, readonly waiting: number) {
    super(`${running} file inspections are running and ${waiting} waiting; try again shortly`);
    this.name = "InspectionBusyError";
  }
}

/**
 * Caps how many children run at once, since each may hold up to its RSS cap: without it, a burst of hostile
 * uploads multiplies the cap by the burst. Runs past `size` wait in order; past `maxWaiting` they are refused.
 */
export class SandboxSlots {
  private running = 0;
  private readonly waiting: (() => void)[] = [];

  constructor(readonly size: number, readonly maxWaiting: number) {
    if (!Number.isInteger(size) || size < 1) throw new RangeError(`sandbox slots must be a positive integer, got ${size}`);
    if (!Number.isInteger(maxWaiting) || maxWaiting < 0) throw new RangeError(`maxWaiting must be a non-negative integer, got ${maxWaiting}`);
  }

  /** Resolves with the release function once a slot is free. */
  acquire(): Promise<() => void> {
    const release = () => {
      const next = this.waiting.shift();
      if (next) next();
      else this.running--;
    };
    if (this.running < this.size) {
      this.running++;
      return Promise.resolve(release);
    }
    if (this.waiting.length >= this.maxWaiting) return Promise.reject(new InspectionBusyError(this.running, this.waiting.length));
    return new Promise((resolve) => this.waiting.push(() => resolve(release)));
  }
}

export interface SandboxRun<T> {
  result: T;
  elapsedMs: number;
  /** Highest VmRSS the watchdog saw (0 where /proc is not available). */
  peakRssBytes: number;
}

export interface SandboxOptions {
  /** Directory holding package.json, tsconfig.json and node_modules/tsx; the child runs there. Defaults to the
   *  working directory, which is the project root under scripts/web-server.ts, the worker and vitest alike. */
  projectRoot?: string;
  /** Shared cap on concurrent children; the deadline starts once a slot is held (not while waiting for one) and covers
   *  a cold child's start-up too, so a child that hangs before it is ready is still killed. */
  slots?: SandboxSlots;
  /** Keep one more child of this entry started and idle, for the next run: Node's and tsx's start-up and the
   *  entry's module loading (most of a small inspection's time, seconds on a busy machine) happen before the
   *  file arrives. Each child still serves exactly one request and is killed after it. */
  keepSpare?: boolean;
}

async function readRssBytes(pid: number): Promise<number | null> {
  try {
    const status = await readFile(`/proc/${pid}/status`, "utf8");
    const m = /^VmRSS:\s+(\d+)\s+kB/m.exec(status);
    return m ? Number(m[1]) * 1024 : null;
  } catch {
    return null; // gone already, or no procfs
  }
}

function checkLimits(l: SandboxLimits): void {
  for (const [name, v] of Object.entries(l)) {
    if (!Number.isFinite(v) || v <= 0) throw new RangeError(`sandbox limit ${name} must be a positive number, got ${v}`);
  }
}

/**
 * Spawns `process.execPath --max-old-space-size=N --import tsx <entry>` (tsx compiles the TypeScript child on
 * the fly, so this works the same from vitest, the tsx worker and the web server, scripts/web-server.ts, whose
 * bundle holds no child file), sends it `request` over IPC once it reports ready, and returns its one reply. The
 * child gets an empty environment apart from the tsconfig path, so no server secret reaches code that parses uploads.
 */
export function runInSandbox<T>(
  entry: string, request: unknown, limits: Partial<SandboxLimits> = {}, options: SandboxOptions = {},
): Promise<SandboxRun<T>> {
  const l = { ...DEFAULT_SANDBOX_LIMITS, ...limits };
  checkLimits(l);
  // runtime paths: the ignore comments keep Next's build from tracing the whole project through them
  const root = path.resolve(/*turbopackIgnore: true*/ options.projectRoot ?? process.cwd());
  const entryPath = path.resolve(root, entry);
  if (!existsSync(/*turbopackIgnore: true*/ entryPath)) throw new Error(`sandbox entry ${entryPath} does not exist`);
  const run = () => {
    if (!options.keepSpare) return serve<T>(startChild(root, entryPath, l.maxOldSpaceMb), request, l);
    return serve<T>(takeSpare(root, entryPath, l.maxOldSpaceMb), request, l)
      .finally(() => setTimeout(() => keepSpareOf(root, entryPath, l.maxOldSpaceMb), SPARE_DELAY_MS).unref());
  };
  if (!options.slots) return run();
  return options.slots.acquire().then((release) => run().finally(release));
}

/** A spawned child, from its start: whether it has said it listens, its end, the tail of its stderr. */
interface StartedChild {
  child: ChildProcess;
  /** Resolves when the child reports READY; rejects if it ends or fails to spawn first. */
  ready: Promise<void>;
  closed: Promise<{ exitCode: number | null; signal: NodeJS.Signals | null }>;
  spawnError: Error | null;
  exited: boolean;
  stderr: string;
}

function startChild(root: string, entryPath: string, maxOldSpaceMb: number): StartedChild {
  const child = spawn(process.execPath, [`--max-old-space-size=${Math.round(maxOldSpaceMb)}`, "--import", "tsx", entryPath], {
    cwd: root,
    env: { TSX_TSCONFIG_PATH: path.join(root, "tsconfig.json") } as unknown as NodeJS.ProcessEnv,
    stdio: ["ignore", "ignore", "pipe", "ipc"],
    serialization: "advanced", // structured clone: NaN nodata and typed arrays survive, unlike JSON
  });
  const started: StartedChild = {
    child, spawnError: null, exited: false, stderr: "",
    ready: Promise.resolve(), closed: Promise.resolve({ exitCode: null, signal: null }),
  };
  child.stderr!.setEncoding("utf8");
  child.stderr!.on("data", (s: string) => {
    started.stderr = (started.stderr + s).slice(-STDERR_TAIL);
  });
  started.closed = new Promise((resolve) => {
    child.once("close", (exitCode, signal) => {
      started.exited = true;
      resolve({ exitCode, signal });
    });
  });
  started.ready = new Promise<void>((resolve, reject) => {
    const onMessage = (message: unknown) => {
      if (message !== READY) return;
      child.off("message", onMessage);
      resolve();
    };
    child.on("message", onMessage);
    // always listened to, so an idle spare that fails cannot throw in the parent
    child.on("error", (err) => {
      started.spawnError = err;
      started.exited = true;
      reject(err);
    });
    void started.closed.then(() => reject(new Error("the sandbox child ended before it was ready")));
  });
  started.ready.catch(() => undefined); // observed by serve()
  return started;
}

/** Idle spares, one per entry and heap limit. An idle spare holds no slot: it has no input yet. */
const spares = new Map<string, StartedChild>();
let stopOnExit = false;

/** Kills every idle spare (at shutdown, or after a test); a later keepSpare run starts a new one. */
export function stopSpares(): void {
  for (const spare of spares.values()) spare.child.kill("SIGKILL");
  spares.clear();
}
const spareKey = (root: string, entryPath: string, maxOldSpaceMb: number) => `${root}\0${entryPath}\0${maxOldSpaceMb}`;

function takeSpare(root: string, entryPath: string, maxOldSpaceMb: number): StartedChild {
  const key = spareKey(root, entryPath, maxOldSpaceMb);
  const spare = spares.get(key);
  spares.delete(key);
  if (!spare || spare.exited) return startChild(root, entryPath, maxOldSpaceMb);
  refChild(spare.child, true);
  return spare;
}

/** The process, its IPC channel and its stderr pipe each hold the parent's event loop open, or not. */
function refChild(child: ChildProcess, held: boolean): void {
  for (const handle of [child, child.channel, child.stderr as (Socket | null)]) {
    if (held) handle?.ref();
    else handle?.unref();
  }
}

/** Starts the next spare a little after a run is over (not during it or its answer, so the two do not share
 *  the cores). */
function keepSpareOf(root: string, entryPath: string, maxOldSpaceMb: number): void {
  const key = spareKey(root, entryPath, maxOldSpaceMb);
  if (spares.get(key)?.exited === false) return;
  // The web process's bundle holds its own copy of this module, so its shutdown cannot call stopSpares(); every
  // process that keeps spares ends them on its way out instead.
  if (!stopOnExit) {
    stopOnExit = true;
    process.once("exit", stopSpares);
  }
  const spare = startChild(root, entryPath, maxOldSpaceMb);
  refChild(spare.child, false); // an idle spare must not keep the parent process alive
  void spare.closed.then(() => {
    if (spares.get(key) === spare) spares.delete(key);
  });
  spares.set(key, spare);
}

/** Gives a started child its request (once it is ready) under the limits; the deadline and the watchdog start now. */
function serve<T>(started: StartedChild, request: unknown, l: SandboxLimits): Promise<SandboxRun<T>> {
  const begun = performance.now();
  const { child } = started;

  return new Promise<SandboxRun<T>>((resolve, reject) => {
    let reply: SandboxReply | undefined;
    let killedFor: "timeout" | "memory" | undefined;
    let peakRss = 0;
    let sampling = false;

    const kill = (why: "timeout" | "memory") => {
      if (reply || killedFor) return;
      killedFor = why;
      child.kill("SIGKILL");
    };
    const deadline = setTimeout(() => kill("timeout"), l.timeoutMs);
    const watchdog = setInterval(() => {
      if (sampling || child.pid === undefined) return;
      sampling = true;
      void readRssBytes(child.pid).then((rss) => {
        sampling = false;
        if (rss === null) return;
        peakRss = Math.max(peakRss, rss);
        if (rss > l.rssCapMb * 1024 * 1024) kill("memory");
      });
    }, l.pollMs);

    const onMessage = (message: unknown) => {
      if (message === READY || reply || killedFor) return;
      reply = message as SandboxReply;
      child.kill("SIGKILL"); // the answer is in; nothing the child does afterwards matters
    };
    const stop = () => {
      clearTimeout(deadline);
      clearInterval(watchdog);
      child.off("message", onMessage);
    };
    child.on("message", onMessage);
    started.ready.then(() => {
      if (!killedFor && child.connected) child.send(request as never);
    }, () => {
      // a failed spawn may never emit "close"
      if (started.spawnError && child.pid === undefined) {
        stop();
        reject(started.spawnError);
      }
    });
    void started.closed.then(({ exitCode, signal }) => {
      stop();
      const elapsedMs = performance.now() - begun;
      if (killedFor === "memory") return reject(new InspectionMemoryError("rss-cap", l.rssCapMb, peakRss));
      if (killedFor === "timeout") return reject(new InspectionTimeoutError(l.timeoutMs));
      if (reply?.ok) return resolve({ result: reply.result as T, elapsedMs, peakRssBytes: peakRss });
      if (reply) return reject(new InspectionFailedError(reply.error.code, reply.error.detail, reply.error.name));
      if (started.spawnError) return reject(started.spawnError);
      // No answer: V8 aborts (SIGABRT, or exit 134) with "heap out of memory" when the heap limit is hit.
      const stderr = started.stderr;
      if (signal === "SIGABRT" || exitCode === 134 || /heap out of memory|Allocation failed/i.test(stderr)) {
        return reject(new InspectionMemoryError("heap-limit", l.maxOldSpaceMb, peakRss));
      }
      const lastLine = stderr.trim().split("\n").filter(Boolean).at(-1) ?? "no output";
      reject(new InspectionFailedError("inspector_crashed", `the inspection process ended without an answer (${signal ?? `exit ${exitCode}`}): ${lastLine}`));
    });
  });
}
