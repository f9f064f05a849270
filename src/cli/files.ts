// Output files that are complete or absent: data goes to a hidden temporary name beside the
// target and is renamed over it only when complete; signals remove what is still temporary.
import { createHash } from "node:crypto";
import type { Hash } from "node:crypto";
import { open, rename, unlink } from "node:fs/promises";
import type { FileHandle } from "node:fs/promises";
import { unlinkSync } from "node:fs";
import { basename, dirname, join } from "node:path";

const pending = new Set<string>();

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

export class AtomicFile {
  private readonly hash: Hash = createHash("sha256");
  bytes = 0n;

  private constructor(
    readonly path: string,
    readonly tempPath: string,
    private readonly fh: FileHandle,
  ) {}

  /** Creates the temporary file now, so an unwritable path fails before any long work. */
  static async create(path: string): Promise<AtomicFile> {
    const tempPath = join(dirname(path), `.${basename(path)}.partial-${process.pid}`);
    let fh: FileHandle;
    try {
      fh = await open(tempPath, "wx");
    } catch (e) {
      throw new Error(`cannot write ${path}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
    }
    pending.add(tempPath);
    return new AtomicFile(path, tempPath, fh);
  }

  async write(data: Uint8Array | string): Promise<void> {
    const bytes = typeof data === "string" ? Buffer.from(data, "utf8") : data;
    this.hash.update(bytes);
    this.bytes += BigInt(bytes.byteLength);
    let off = 0;
    while (off < bytes.byteLength) {
      const { bytesWritten } = await this.fh.write(bytes, off, bytes.byteLength - off);
      off += bytesWritten;
    }
  }

  /** Flushes, closes and renames into place; returns the data's sha256. */
  async commit(): Promise<string> {
    await this.fh.sync();
    await this.fh.close();
    await rename(this.tempPath, this.path);
    pending.delete(this.tempPath);
    return this.hash.digest("hex");
  }

  async abort(): Promise<void> {
    await this.fh.close().catch(() => {});
    await unlink(this.tempPath).catch(() => {});
    pending.delete(this.tempPath);
  }
}

/** Writes a whole file atomically. */
export async function writeFileAtomic(path: string, data: string | Uint8Array): Promise<void> {
  await withOutput(path, async () => data, (d) => d);
}

/**
 * Opens `path` (when given) before `work` runs, so a bad path fails at once, then writes what
 * `render` makes of the result and renames it into place; on any failure nothing is left.
 */
export async function withOutput<T>(path: string | undefined, work: () => Promise<T>, render: (result: T) => string | Uint8Array): Promise<T> {
  const f = path === undefined ? null : await AtomicFile.create(path);
  try {
    const result = await work();
    if (f) {
      await f.write(render(result));
      await f.commit();
    }
    return result;
  } catch (e) {
    await f?.abort();
    throw e;
  }
}

