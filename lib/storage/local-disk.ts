// Local-disk object store. Atomic replace by write-to-temp + fsync + rename(2) in the same directory: POSIX
// (IEEE Std 1003.1-2017, rename()) makes the new name appear at once, and open readers keep the old inode.
import { randomUUID } from "node:crypto";
import { constants as fsConstants, type Stats } from "node:fs";
import { copyFile, mkdir, open, opendir, rename, rmdir, stat, unlink, type FileHandle } from "node:fs/promises";
import path from "node:path";
import { assertKeyPrefix, assertObjectKey } from "@/lib/storage/keys";
import { writeStreamToFile } from "@/lib/storage/pipelined-write";
import {
  bodyToReadable, ObjectNotFoundError, resolveRange,
  type ByteRange, type ObjectBody, type ObjectInfo, type ObjectRead, type ObjectStore,
} from "@/lib/storage/object-store";

export interface LocalDiskStoreOptions {
  /** Directory that holds the objects (created when missing); resolved against the caller's working directory. */
  root: string;
}

/** Temp files are `.<name>.<uuid>.tmp`: hidden (keys cannot start with a dot) and recognisable for sweeping. */
const TEMP_SUFFIX = ".tmp";
const TEMP_NAME = /^\..+\.[0-9a-f-]{36}\.tmp$/;

/** Codes that mean "nothing stored under this key" (a segment of the key is a file, or the key is a directory). */
const MISSING = new Set(["ENOENT", "ENOTDIR", "EISDIR"]);

function isMissing(err: unknown): boolean {
  return MISSING.has((err as NodeJS.ErrnoException).code ?? "");
}

/** inode-size-mtime, as web servers derive validators for files: a put always makes a new inode. */
function etagOf(s: Stats): string {
  return `"${s.ino.toString(16)}-${s.size.toString(16)}-${Math.floor(s.mtimeMs).toString(16)}"`;
}

export class LocalDiskStore implements ObjectStore {
  readonly backend = "local" as const;
  readonly root: string;

  constructor(options: LocalDiskStoreOptions) {
    if (!options.root) throw new RangeError("local object store needs a root directory");
    this.root = path.resolve(options.root);
  }

  private pathOf(key: string): string {
    assertObjectKey(key);
    return path.join(this.root, ...key.split("/"));
  }

  put(key: string, body: ObjectBody): Promise<ObjectInfo> {
    const source = bodyToReadable(body);
    return this.writeAtomically(key, async (handle) => {
      // Writes pipelined with reading, on a handle that stays ours to sync.
      await writeStreamToFile(source, handle);
    }, () => source.destroy());
  }

  putFile(key: string, localPath: string): Promise<ObjectInfo> {
    return this.writeAtomically(key, async (_handle, tempPath) => {
      await copyFile(localPath, tempPath); // copy_file_range/reflink where the filesystem has it
    });
  }

  /** rename(2) into place after an fsync of the file, so the object is durable before it is reported stored;
   *  a file on another filesystem (EXDEV) is copied as putFile does, then removed. */
  async moveFile(key: string, localPath: string): Promise<ObjectInfo> {
    const target = this.pathOf(key);
    const dir = path.dirname(target);
    await mkdir(dir, { recursive: true });
    const handle = await open(localPath, "r");
    let s: Stats;
    try {
      await handle.sync(); // fsync works on a read-only descriptor (POSIX fsync(); Linux fsync(2))
      s = await handle.stat();
    } finally {
      await handle.close();
    }
    try {
      await rename(localPath, target);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "EXDEV") throw err;
      const info = await this.putFile(key, localPath);
      await unlink(localPath);
      return info;
    }
    await syncDirectory(dir);
    return { size: s.size, etag: etagOf(s) };
  }

  /** Fills a fresh temp file beside the target, syncs it, renames it over the target and syncs the directory
   *  (so the rename survives a crash); any failure removes the temp file and leaves the old object in place. */
  private async writeAtomically(
    key: string,
    fill: (handle: FileHandle, tempPath: string) => Promise<void>,
    onEarlyFailure?: () => void,
  ): Promise<ObjectInfo> {
    let target: string;
    try {
      target = this.pathOf(key);
    } catch (err) {
      onEarlyFailure?.();
      throw err;
    }
    const dir = path.dirname(target);
    const tempPath = path.join(dir, `.${path.basename(target)}.${randomUUID()}${TEMP_SUFFIX}`);
    let handle: FileHandle | undefined;
    try {
      await mkdir(dir, { recursive: true });
      handle = await open(tempPath, fsConstants.O_CREAT | fsConstants.O_EXCL | fsConstants.O_WRONLY, 0o644);
      await fill(handle, tempPath);
      await handle.sync();
      const s = await handle.stat();
      await handle.close();
      handle = undefined;
      await rename(tempPath, target);
      await syncDirectory(dir);
      return { size: s.size, etag: etagOf(s) };
    } catch (err) {
      onEarlyFailure?.();
      await handle?.close().catch(() => undefined);
      await unlink(tempPath).catch(() => undefined);
      throw err;
    }
  }

  async get(key: string, options: { range?: ByteRange } = {}): Promise<ObjectRead> {
    const file = this.pathOf(key);
    let handle: FileHandle;
    try {
      handle = await open(file, "r");
    } catch (err) {
      if (isMissing(err)) throw new ObjectNotFoundError(key);
      throw err;
    }
    try {
      // Size and bytes come from the same open inode, so a concurrent replace cannot mix two versions.
      const s = await handle.stat();
      if (!s.isFile()) throw new ObjectNotFoundError(key);
      const info: ObjectInfo = { size: s.size, etag: etagOf(s) };
      if (!options.range) return { body: handle.createReadStream(), info };
      const range = resolveRange(key, s.size, options.range);
      return { body: handle.createReadStream({ start: range.start, end: range.end }), info, range };
    } catch (err) {
      await handle.close();
      throw err;
    }
  }

  async head(key: string): Promise<ObjectInfo | null> {
    try {
      const s = await stat(this.pathOf(key));
      return s.isFile() ? { size: s.size, etag: etagOf(s) } : null;
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  async exists(key: string): Promise<boolean> {
    return (await this.head(key)) !== null;
  }

  async delete(key: string): Promise<void> {
    const file = this.pathOf(key);
    try {
      await unlink(file);
    } catch (err) {
      if (isMissing(err)) return;
      throw err;
    }
    // Prune directories the delete emptied, never the root; stops at the first non-empty one.
    for (let dir = path.dirname(file); dir.startsWith(this.root + path.sep); dir = path.dirname(dir)) {
      try {
        await rmdir(dir);
      } catch {
        break;
      }
    }
  }

  async *list(prefix: string): AsyncIterable<string> {
    assertKeyPrefix(prefix);
    const slash = prefix.lastIndexOf("/");
    const base = slash < 0 ? "" : prefix.slice(0, slash);
    yield* this.walk(base, prefix);
  }

  /** Removes temp files older than maxAgeMs, left by writes a crash cut short (a live write is younger than
   *  any sensible age); returns how many went. Run it at start-up. */
  async removeStaleTempFiles(maxAgeMs: number, now: number = Date.now()): Promise<number> {
    let removed = 0;
    const sweep = async (dir: string): Promise<void> => {
      let entries;
      try {
        entries = await opendir(dir);
      } catch (err) {
        if (isMissing(err)) return;
        throw err;
      }
      for await (const entry of entries) {
        const full = path.join(dir, entry.name);
        if (entry.isDirectory()) await sweep(full);
        else if (TEMP_NAME.test(entry.name) && (await stat(full)).mtimeMs < now - maxAgeMs) {
          await unlink(full).catch(() => undefined);
          removed++;
        }
      }
    };
    await sweep(this.root);
    return removed;
  }

  private async *walk(relDir: string, prefix: string): AsyncIterable<string> {
    let dir;
    try {
      dir = await opendir(relDir ? path.join(this.root, ...relDir.split("/")) : this.root);
    } catch (err) {
      if (isMissing(err)) return;
      throw err;
    }
    for await (const entry of dir) {
      if (entry.name.startsWith(".")) continue; // temp files of writes in progress
      const key = relDir ? `${relDir}/${entry.name}` : entry.name;
      if (entry.isDirectory()) {
        if (key.startsWith(prefix) || prefix.startsWith(`${key}/`)) yield* this.walk(key, prefix);
      } else if (entry.isFile() && key.startsWith(prefix)) {
        yield key;
      }
    }
  }
}

async function syncDirectory(dir: string): Promise<void> {
  const handle = await open(dir, "r");
  try {
    await handle.sync();
  } finally {
    await handle.close();
  }
}
