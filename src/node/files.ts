// Output files that are complete or absent: data goes to a hidden temporary name beside the
// target and is renamed over it only when complete; signals remove what is still temporary.
// A data file and its manifest are placed together: if the second rename fails, the first is undone.
// A target that is a device or a pipe (/dev/null, /dev/stdout) is written directly: there is no file
// to replace, and renaming over it would replace the device node.
import { createHash } from "node:crypto";
import type { Hash } from "node:crypto";
import { readdirSync, statSync, unlinkSync } from "node:fs";
import { open, rename, unlink } from "node:fs/promises";
import type { FileHandle } from "node:fs/promises";
import { basename, dirname, join } from "node:path";
import { UsageError } from "../core/errors.js";
import { toExactJson } from "../core/json.js";
import type { DataFile } from "../outputs/manifest.js";

const pending = new Set<string>();
let made = 0;

/** Removes every temporary file still open (for signal handlers; synchronous). */
export function removePendingFiles(): void {
  for (const p of pending) {
    try {
      unlinkSync(p);
    } catch {
      // already gone
    }
  }
  pending.clear();
}

/** The temporary name of a target, as AtomicFile makes it: `.NAME.partial-PID-N` beside it. */
const TEMP_NAME = /^\.(.+)\.partial-(\d+)-\d+$/;

/** Whether a process with this id runs (EPERM: it does, under another user). */
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

/**
 * Removes the temporaries of `path` that a killed process left (SIGKILL, a crash: no handler ran):
 * those named `.NAME.partial-PID-N` beside it whose PID is not a running process. Returns their names.
 * @example removeStaleTemporaries("run.ck.json") // [".run.ck.json.partial-4242-17"]
 */
export function removeStaleTemporaries(path: string): string[] {
  let names: string[];
  try {
    names = readdirSync(dirname(path));
  } catch {
    return [];
  }
  const removed: string[] = [];
  for (const name of names) {
    const m = TEMP_NAME.exec(name);
    if (!m || m[1] !== basename(path) || alive(Number(m[2]))) continue;
    try {
      unlinkSync(join(dirname(path), name));
      removed.push(name);
    } catch {
      // gone already, or not ours to remove
    }
  }
  return removed;
}

/** The error of a failed write, naming the file (a bare ENOSPC does not say which). */
function writeError(path: string, e: unknown): Error {
  return new Error(`cannot write ${path}: ${e instanceof Error ? e.message : String(e)}`, { cause: e });
}

/** Writes smaller than this are gathered into one of about this size. */
const WRITE_BUFFER_BYTES = 1 << 20;

export class AtomicFile {
  private readonly hash: Hash = createHash("sha256");
  bytes = 0n;
  private closed = false;

  private constructor(
    readonly path: string,
    readonly tempPath: string,
    private readonly fh: FileHandle,
    /** A device or a pipe, written in place: never renamed or removed. */
    private readonly direct = false,
  ) {}

  /** Creates the temporary file now, so an unwritable path fails before any long work. */
  static async create(path: string): Promise<AtomicFile> {
    const stat = statSync(path, { throwIfNoEntry: false });
    if (stat && !stat.isFile() && !stat.isDirectory()) {
      try {
        return new AtomicFile(path, path, await open(path, "w"), true);
      } catch (e) {
        throw new UsageError(`cannot write ${path}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
      }
    }
    const tempPath = join(dirname(path), `.${basename(path)}.partial-${process.pid}-${made++}`);
    let fh: FileHandle;
    pending.add(tempPath); // before the open: a signal during it must still remove the file
    try {
      fh = await open(tempPath, "wx");
    } catch (e) {
      pending.delete(tempPath);
      throw new UsageError(`cannot write ${path}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
    }
    return new AtomicFile(path, tempPath, fh);
  }

  /** Small writes are gathered here and written together (a CSV row is one call). */
  private buffered: Uint8Array[] = [];
  private bufferedBytes = 0;

  async write(data: Uint8Array | string): Promise<void> {
    const bytes = typeof data === "string" ? Buffer.from(data, "utf8") : data;
    this.hash.update(bytes);
    this.bytes += BigInt(bytes.byteLength);
    if (bytes.byteLength < WRITE_BUFFER_BYTES) {
      // copy: the caller may reuse its buffer once this call returns
      this.buffered.push(typeof data === "string" ? bytes : bytes.slice());
      this.bufferedBytes += bytes.byteLength;
      if (this.bufferedBytes >= WRITE_BUFFER_BYTES) await this.flush();
      return;
    }
    await this.flush();
    await this.writeOut(bytes);
  }

  private async flush(): Promise<void> {
    if (this.bufferedBytes === 0) return;
    const joined = Buffer.concat(this.buffered, this.bufferedBytes);
    this.buffered = [];
    this.bufferedBytes = 0;
    await this.writeOut(joined);
  }

  private async writeOut(bytes: Uint8Array): Promise<void> {
    let off = 0;
    try {
      while (off < bytes.byteLength) {
        const { bytesWritten } = await this.fh.write(bytes, off, bytes.byteLength - off);
        off += bytesWritten;
      }
    } catch (e) {
      throw writeError(this.path, e);
    }
  }

  /** Flushes and closes the temporary file; returns what a manifest says of it. */
  async finish(): Promise<DataFile> {
    await this.flush();
    try {
      if (!this.direct) await this.fh.sync();
      await this.fh.close();
    } catch (e) {
      throw writeError(this.path, e);
    }
    this.closed = true;
    return { file: basename(this.path), bytes: this.bytes, sha256: this.hash.digest("hex") };
  }

  /** Renames the finished file into place. */
  async place(): Promise<void> {
    if (this.direct) return;
    await rename(this.tempPath, this.path);
    pending.delete(this.tempPath);
  }

  /** Closes and removes the temporary file (a device or a pipe is only closed). */
  async abort(): Promise<void> {
    if (!this.closed) await this.fh.close().catch(() => {});
    if (this.direct) return;
    await unlink(this.tempPath).catch(() => {});
    pending.delete(this.tempPath);
  }

  /** Undoes a placed file: removes it (a device or a pipe stays). */
  async unplace(): Promise<void> {
    if (!this.direct) await unlink(this.path).catch(() => {});
  }
}

/** Places finished files in order; if one rename fails, the ones already placed are removed. */
async function placeAll(files: readonly AtomicFile[]): Promise<void> {
  const placed: AtomicFile[] = [];
  try {
    for (const f of files) {
      await f.place();
      placed.push(f);
    }
  } catch (e) {
    for (const f of placed) await f.unplace();
    for (const f of files) await f.abort();
    throw new Error(
      `cannot place ${files.map((f) => f.path).join(" and ")}: ${(e as NodeJS.ErrnoException).code ?? String(e)}; nothing was written`,
    );
  }
}

/**
 * Runs `work` with the data file (and its manifest FILE.json) opened first, so that a bad path
 * fails before the run; then writes the manifest that `manifest` makes and places both together.
 * Without a path, `work` gets null and nothing is written. On any failure neither file is left.
 * @example await withManifestOutput("t.u32", async (f) => { await f!.write(bytes); return 1; }, (r, data) => ({ data }));
 */
export async function withManifestOutput<T>(
  path: string | undefined,
  work: (file: AtomicFile | null) => Promise<T>,
  manifest: (result: T, data: DataFile) => unknown,
): Promise<T> {
  if (path === undefined) return work(null);
  const data = await AtomicFile.create(path);
  let meta: AtomicFile | null = null;
  try {
    meta = await AtomicFile.create(`${path}.json`);
    const result = await work(data);
    const info = await data.finish();
    await meta.write(`${toExactJson(manifest(result, info), 2)}\n`);
    await meta.finish();
    await placeAll([data, meta]);
    return result;
  } catch (e) {
    await data.abort();
    await meta?.abort();
    throw e;
  }
}

/** Writes one whole file atomically (a temporary name, then a rename). */
export async function writeFileAtomic(path: string, data: string | Uint8Array): Promise<void> {
  const f = await AtomicFile.create(path);
  try {
    await f.write(data);
    await f.finish();
    await f.place();
  } catch (e) {
    await f.abort();
    throw e;
  }
}
