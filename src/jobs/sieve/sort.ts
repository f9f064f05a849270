// Class tables: the survivors at depth K as residues sorted ascending, in bounded memory.
// Residues arrive shard by shard in tree order; they are bucketed by their top bits (4 bytes each:
// the low bits as u32), and each bucket is radix-sorted when emitted, so buckets come out in order.
// When the whole table would not fit the memory budget, the caller runs the enumeration once per
// pass and each pass keeps one range of buckets (`passPlan`).
import { LimitError } from "../../core/errors.js";
import type { BucketRange, GroupedResidues, LeafChunk } from "./messages.js";

const CHUNK = 4096;

// LSD radix sort of unsigned 32-bit keys, in place through one scratch array (stable, exact).

/**
 * Sorts `keys` ascending; `bits` is an upper bound on the key width (keys < 2^bits). The digits are
 * split evenly (at most 12 bits each) and every digit's histogram is taken in one first pass.
 * @example radixSortU32(new Uint32Array([3, 1, 2]), 2) // Uint32Array [1, 2, 3]
 */
export function radixSortU32(keys: Uint32Array, bits = 32): Uint32Array {
  const n = keys.length;
  if (n < 2 || bits <= 0) return keys;
  const passes = Math.ceil(bits / 12);
  const digit = Math.ceil(bits / passes);
  const size = 1 << digit;
  const mask = size - 1;
  const counts = new Uint32Array(size * passes);
  for (let i = 0; i < n; i++) {
    const v = keys[i]!;
    for (let p = 0; p < passes; p++) counts[p * size + ((v >>> (p * digit)) & mask)]!++;
  }
  let src: Uint32Array = keys;
  let dst: Uint32Array = new Uint32Array(n);
  for (let p = 0; p < passes; p++) {
    const base = p * size;
    let sum = 0;
    for (let d = 0; d < size; d++) {
      const c = counts[base + d]!;
      counts[base + d] = sum;
      sum += c;
    }
    const shift = p * digit;
    for (let i = 0; i < n; i++) {
      const v = src[i]!;
      dst[counts[base + ((v >>> shift) & mask)]!++] = v;
    }
    const t = src;
    src = dst;
    dst = t;
  }
  if (src !== keys) keys.set(src);
  return keys;
}

/** Bytes per stored residue in the sorter; the budget a pass may hold. */
export const SORTER_BYTES_PER_ROW = 4;
export const DEFAULT_PASS_BUDGET = 768 * 2 ** 20;

export interface PassPlan {
  readonly bucketBits: number;
  readonly passes: number;
}

/** How many enumeration passes keep the sorter within `budget` bytes for `rows` residues. */
export function passPlan(depth: number, rows: bigint, budget = DEFAULT_PASS_BUDGET): PassPlan {
  const bucketBits = Math.min(depth, 10);
  const bytes = rows * BigInt(SORTER_BYTES_PER_ROW);
  const passes = Number((bytes + BigInt(budget) - 1n) / BigInt(budget)) || 1;
  if (passes > 1 << bucketBits)
    throw new LimitError(`a table of ${rows} rows needs more than ${1 << bucketBits} passes at this memory budget`);
  return { bucketBits, passes };
}

/** The residue a < 2^depth of leaf i, exact as a double (depth <= 53). */
function residueOf(words: Uint32Array, i: number): number {
  return words[2 * i + 1]! * 2 ** 32 + words[2 * i]!;
}

/**
 * Groups leaves' residues by bucket (a counting sort by the top `bits` bits), keeping buckets
 * from..to-1: what a worker sends instead of its leaves when a table is being sorted.
 * @example groupResidues([chunk], 30, { bits: 10, from: 0, to: 1024 }).counts.length // 1024
 */
export function groupResidues(chunks: readonly LeafChunk[], depth: number, range: BucketRange): GroupedResidues {
  const lowBits = depth - range.bits;
  if (depth > 53 || lowBits > 32 || lowBits < 0) throw new LimitError(`depth ${depth}: residues beyond the table sorter's range`);
  // a = hi 2^32 + lo: bucket = a >> lowBits (< 2^bits <= 2^10) and key = a mod 2^lowBits, in
  // 32-bit integer operations (JavaScript shifts count mod 32: lowBits = 32 takes the bucket from hi alone)
  if (range.bits > 30) throw new LimitError("at most 2^30 buckets");
  const mask = lowBits === 32 ? -1 : (1 << lowBits) - 1;
  const hs = 32 - lowBits;
  const ls = lowBits === 32 ? 31 : lowBits;
  const lm = lowBits === 32 ? 0 : -1;
  const counts = new Uint32Array(range.to - range.from);
  const span = counts.length;
  for (const c of chunks) {
    const w = new Uint32Array(c.a.buffer, c.a.byteOffset, c.a.length * 2);
    for (let i = 0; i < w.length; i += 2) {
      const k = ((w[i + 1]! << hs) | ((w[i]! >>> ls) & lm)) - range.from;
      if (k >= 0 && k < span) counts[k]!++;
    }
  }
  const at = new Uint32Array(span);
  let total = 0;
  for (let k = 0; k < span; k++) {
    at[k] = total;
    total += counts[k]!;
  }
  const low = new Uint32Array(total);
  for (const c of chunks) {
    const w = new Uint32Array(c.a.buffer, c.a.byteOffset, c.a.length * 2);
    for (let i = 0; i < w.length; i += 2) {
      const k = ((w[i + 1]! << hs) | ((w[i]! >>> ls) & lm)) - range.from;
      if (k >= 0 && k < span) low[at[k]!++] = w[i]! & mask;
    }
  }
  return { low, counts };
}

/**
 * Collects residues of one pass (buckets [from, to)) and yields them sorted ascending.
 * @example const s = new ResidueSorter(30, 10, 0, 1024); s.add(chunk); for (const part of s.sorted()) write(part);
 */
export class ResidueSorter {
  private readonly lowBits: number;
  private readonly buckets: Uint32Array[][];
  private readonly fill: number[];
  count = 0;

  constructor(
    readonly depth: number,
    readonly bucketBits: number,
    readonly from: number,
    readonly to: number,
  ) {
    if (depth > 53) throw new LimitError("residues above 2^53 are not supported by the table sorter");
    this.lowBits = depth - bucketBits;
    if (this.lowBits > 32) throw new LimitError(`depth ${depth}: low residue bits exceed 32`);
    this.buckets = Array.from({ length: to - from }, () => []);
    this.fill = new Array<number>(to - from).fill(CHUNK);
  }

  /** Appends a worker's grouped residues (its buckets must be this sorter's from..to). */
  addGrouped(g: GroupedResidues): void {
    if (g.counts.length !== this.to - this.from) throw new Error("internal error: grouped residues of another bucket range");
    let off = 0;
    for (let k = 0; k < g.counts.length; k++) {
      let n = g.counts[k]!;
      const list = this.buckets[k]!;
      while (n > 0) {
        if (this.fill[k] === CHUNK) {
          list.push(new Uint32Array(CHUNK));
          this.fill[k] = 0;
        }
        const take = Math.min(n, CHUNK - this.fill[k]!);
        list[list.length - 1]!.set(g.low.subarray(off, off + take), this.fill[k]!);
        this.fill[k] = this.fill[k]! + take;
        off += take;
        n -= take;
        this.count += take;
      }
    }
  }

  add(chunk: LeafChunk): void {
    const words = new Uint32Array(chunk.a.buffer, chunk.a.byteOffset, chunk.a.length * 2);
    const div = 2 ** this.lowBits;
    for (let i = 0; i < chunk.a.length; i++) {
      const a = residueOf(words, i);
      const bucket = Math.floor(a / div);
      if (bucket < this.from || bucket >= this.to) continue;
      const k = bucket - this.from;
      const list = this.buckets[k]!;
      if (this.fill[k] === CHUNK) {
        list.push(new Uint32Array(CHUNK));
        this.fill[k] = 0;
      }
      list[list.length - 1]![this.fill[k]!++] = a - bucket * div;
      this.count++;
    }
  }

  /** Bits below the bucket of each stored key, and the bucket's first residue. */
  get keyBits(): number {
    return this.lowBits;
  }

  highOf(k: number): number {
    return (this.from + k) * 2 ** this.lowBits;
  }

  /** Takes the non-empty buckets' keys out of the sorter (unsorted), one after another, in bucket order. */
  *takeBuckets(): Generator<{ readonly k: number; readonly keys: Uint32Array }> {
    for (let k = 0; k < this.buckets.length; k++) {
      const list = this.buckets[k]!;
      const n = list.length === 0 ? 0 : (list.length - 1) * CHUNK + this.fill[k]!;
      if (n === 0) continue;
      const keys = new Uint32Array(n);
      for (let c = 0; c < list.length; c++) keys.set(c === list.length - 1 ? list[c]!.subarray(0, this.fill[k]!) : list[c]!, c * CHUNK);
      this.buckets[k] = []; // release as we go
      yield { k, keys };
    }
  }

  /** Yields, bucket by bucket, the sorted residues as u32 (depth <= 32) or u64 pairs (lo, hi). */
  *sorted(): Generator<Uint32Array> {
    for (const { k, keys } of this.takeBuckets()) yield finishBucket(keys, this.lowBits, this.highOf(k), this.depth > 32);
  }
}

/**
 * One bucket of a table, sorted and written out: its keys (the low `bits` bits) radix-sorted, plus
 * the bucket's first residue `high`, as u32 or, when `wide`, as u64 pairs (lo, hi).
 */
export function finishBucket(keys: Uint32Array, bits: number, high: number, wide: boolean): Uint32Array {
  radixSortU32(keys, bits);
  const n = keys.length;
  // high is a multiple of 2^bits (bits <= 32) and every key is below 2^bits: its low word never carries
  const hiWord = Math.floor(high / 2 ** 32);
  const loWord = high - hiWord * 2 ** 32;
  if (!wide) {
    for (let i = 0; i < n; i++) keys[i] = keys[i]! + loWord;
    return keys;
  }
  const out = new Uint32Array(2 * n);
  for (let i = 0; i < n; i++) {
    out[2 * i] = keys[i]! + loWord;
    out[2 * i + 1] = hiWord;
  }
  return out;
}
