// The class table of a cluster run: the shards' sorted raw parts merged into one sorted table
// (what `merge --out` of a sieve writes). Isomorphic: the parts are read through TableSource
// (src/node/files.ts opens files as such).
import { LimitError } from "../../core/errors.js";
import type { ByteSink } from "../../engine/plan.js";
import { finishBucket } from "./sort.js";

/** A sorted raw table to merge: its name (for messages) and positioned reads of its bytes. */
export interface TableSource {
  readonly name: string;
  /** Reads bytes.length bytes at most from `position` into `bytes`: how many it read (0 at the end). */
  read(bytes: Uint8Array, position: number): Promise<number>;
}

/** Bytes each reader buffers; the window of residues merged at once is 2^WINDOW_BITS wide. */
const READ_BYTES = 1 << 18;
const WINDOW_BITS = 22;

/**
 * Merges sorted raw class tables (little-endian u32, or u64 for depth > 32, residues < 2^53) into
 * one sorted stream, window by window: each part's run of residues in [w, w + 2^22) is appended,
 * the window's keys are radix-sorted and written. A window holds at most 2^22 residues, so memory
 * is bounded whatever the table's size; a part out of order, or a residue in two parts, is an error.
 */
export async function mergeSortedTables(sources: readonly TableSource[], depth: number, sink: ByteSink): Promise<bigint> {
  if (depth > 53) throw new LimitError("tables deeper than 2^53 are not merged here");
  const width = depth > 32 ? 8 : 4;
  const bits = Math.min(depth, WINDOW_BITS);
  const windows = 2 ** (depth - bits);
  const readers = sources.map((h) => ({
    h,
    path: h.name,
    buf: new Uint32Array(READ_BYTES / 4),
    fill: 0, // u32 words in buf
    pos: 0,
    offset: 0,
    last: -1,
  }));
  const refill = async (r: (typeof readers)[number]): Promise<boolean> => {
    const bytes = new Uint8Array(r.buf.buffer);
    const bytesRead = await r.h.read(bytes, r.offset);
    if (bytesRead % width !== 0) throw new Error(`${r.path}: its length is not a whole number of ${width}-byte residues`);
    r.offset += bytesRead;
    r.fill = bytesRead / 4;
    r.pos = 0;
    return bytesRead > 0;
  };
  const keys = new Uint32Array(2 ** bits);
  let count = 0n;
  for (let w = 0; w < windows; w++) {
    const start = w * 2 ** bits;
    const end = start + 2 ** bits;
    let n = 0;
    for (const r of readers) {
      for (;;) {
        if (r.pos >= r.fill && !(await refill(r))) break;
        const v = width === 4 ? r.buf[r.pos]! : r.buf[r.pos + 1]! * 2 ** 32 + r.buf[r.pos]!;
        if (v >= end) break;
        if (v <= r.last) throw new Error(`${r.path}: residue ${v} is out of order or repeated`);
        r.last = v;
        keys[n++] = v - start;
        r.pos += width / 4;
      }
    }
    if (n === 0) continue;
    const sorted = finishBucket(keys.subarray(0, n), bits, start, width === 8);
    const step = width / 4;
    for (let i = step; i < sorted.length; i += step)
      if (sorted[i] === sorted[i - step] && (step === 1 || sorted[i + 1] === sorted[i - step + 1]))
        throw new Error(`residue ${step === 1 ? sorted[i] : sorted[i + 1]! * 2 ** 32 + sorted[i]!} is in two parts`);
    await sink.write(new Uint8Array(sorted.buffer, sorted.byteOffset, sorted.byteLength));
    count += BigInt(n);
  }
  for (const r of readers) if (r.pos < r.fill || (await refill(r))) throw new Error(`${r.path}: residues at or above 2^${depth}`);
  return count;
}
