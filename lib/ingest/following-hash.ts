// SHA-256 (FIPS 180-4) of a file while it is being written, in a worker thread that reads back each written
// stretch from the page cache: the request thread only receives and writes, and the hash, the costliest step of
// an upload on one core, runs beside it on another.
import { Worker } from "node:worker_threads";

/** Bytes read back per read(2) in the thread. */
const READ_BYTES = 4 * 1024 * 1024;

// Plain JavaScript evaluated as the thread (no bundler or TypeScript loader needed in the web server, the tsx
// worker and vitest alike). Messages in: {upTo} (bytes 0..upTo are written), {end: size}; out: {digest} | {error}.
const THREAD_SOURCE = `
const { parentPort, workerData } = require("node:worker_threads");
const { openSync, readSync, closeSync } = require("node:fs");
const { createHash } = require("node:crypto");
const hash = createHash("sha256");
const buf = Buffer.allocUnsafe(${READ_BYTES});
let fd = -1, done = 0;
try { fd = openSync(workerData.path, "r"); } catch (e) { parentPort.postMessage({ error: String(e && e.message || e) }); }
function advance(upTo) {
  while (done < upTo) {
    const n = readSync(fd, buf, 0, Math.min(buf.length, upTo - done), done);
    if (n === 0) throw new Error("the staged file is shorter than what was written (" + done + " < " + upTo + ")");
    hash.update(n === buf.length ? buf : buf.subarray(0, n));
    done += n;
  }
}
parentPort.on("message", (m) => {
  if (fd < 0) return;
  try {
    if (m.upTo !== undefined) advance(m.upTo);
    else { advance(m.end); closeSync(fd); parentPort.postMessage({ digest: hash.digest("hex") }); }
  } catch (e) {
    parentPort.postMessage({ error: String(e && e.message || e) });
    try { closeSync(fd); } catch {}
    fd = -1;
  }
});
`;

/** Follows one file as it grows; call advance() with each new written length, then digest() once. */
export class FollowingHash {
  private readonly thread: Worker;
  private readonly answer: Promise<string>;

  constructor(path: string) {
    this.thread = new Worker(THREAD_SOURCE, { eval: true, workerData: { path } });
    this.answer = new Promise<string>((resolve, reject) => {
      this.thread.on("message", (m: { digest?: string; error?: string }) => {
        if (m.digest) resolve(m.digest);
        else reject(new Error(`hashing the staged file failed: ${m.error}`));
        void this.thread.terminate();
      });
      this.thread.on("error", reject);
      this.thread.on("exit", () => reject(new Error("the hashing thread ended before its answer")));
    });
    this.answer.catch(() => undefined); // observed by digest(); a stopped hash needs no handler
  }

  /** Bytes 0..length of the file are written. */
  advance(length: number): void {
    this.thread.postMessage({ upTo: length });
  }

  /** Lowercase hex digest of the file's first `size` bytes. */
  digest(size: number): Promise<string> {
    this.thread.postMessage({ end: size });
    return this.answer;
  }

  /** Ends the thread without an answer (the upload failed). */
  stop(): void {
    void this.thread.terminate();
  }
}
