// Class tables: the survivors at depth K as residues sorted ascending, in bounded memory.
// Residues arrive shard by shard in tree order; they are bucketed by their top bits (4 bytes each:
// the low bits as u32), and each bucket is radix-sorted when emitted, so buckets come out in order.
// When the whole table would not fit the memory budget, the caller runs the enumeration once per
// pass and each pass keeps one range of buckets (`passPlan`).
import type { LeafChunk } from "../engine/messages.js";
import { radixSortU32 } from "./sort.js";
import { LimitError } from "../core/errors.js";

export type TableFormat = "raw" | "csv" | "arrow";

/** Rows above which CSV is refused unless forced (a CSV row is ~30 bytes; raw is 4 or 8). */
export const CSV_ROW_GUARD = 1_000_000;
const CHUNK = 4096;

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

  /** Yields, bucket by bucket, the sorted residues as u32 (depth <= 32) or u64 pairs (lo, hi). */
  *sorted(): Generator<Uint32Array> {
    const wide = this.depth > 32;
    for (let k = 0; k < this.buckets.length; k++) {
      const list = this.buckets[k]!;
      const n = list.length === 0 ? 0 : (list.length - 1) * CHUNK + this.fill[k]!;
      if (n === 0) continue;
      const keys = new Uint32Array(n);
      for (let c = 0; c < list.length; c++) keys.set(c === list.length - 1 ? list[c]!.subarray(0, this.fill[k]!) : list[c]!, c * CHUNK);
      this.buckets[k] = []; // release as we go
      radixSortU32(keys, this.lowBits);
      const high = (this.from + k) * 2 ** this.lowBits;
      if (!wide) {
        for (let i = 0; i < n; i++) keys[i] = keys[i]! + high;
        yield keys;
      } else {
        const out = new Uint32Array(2 * n);
        for (let i = 0; i < n; i++) {
          const a = keys[i]! + high;
          out[2 * i] = a % 2 ** 32;
          out[2 * i + 1] = Math.floor(a / 2 ** 32);
        }
        yield out;
      }
    }
  }
}

export interface CsvRow {
  readonly residue: bigint;
  readonly odd: number;
  readonly image: bigint;
}

/** Collects full rows (a, m, b) for CSV; callers check CSV_ROW_GUARD first. */
export function collectRows(rows: CsvRow[], chunk: LeafChunk): void {
  for (let i = 0; i < chunk.a.length; i++) rows.push({ residue: chunk.a[i]!, odd: chunk.m[i]!, image: chunk.b[i]! });
}

export const CSV_HEADER = "residue,odd_steps,image\n";

/** Sorts rows by residue and renders them, header first. */
export function* csvLines(rows: CsvRow[]): Generator<string> {
  rows.sort((u, v) => (u.residue < v.residue ? -1 : u.residue > v.residue ? 1 : 0));
  yield CSV_HEADER;
  for (const r of rows) yield `${r.residue},${r.odd},${r.image}\n`;
}

/** Parses a class table CSV back into rows (exact BigInt residues and images). */
export function parseCsv(text: string): CsvRow[] {
  const lines = text.split("\n").filter((l) => l.length > 0);
  if (lines[0] + "\n" !== CSV_HEADER) throw new Error("not a glidepath class table CSV");
  return lines.slice(1).map((l) => {
    const [a, m, b] = l.split(",");
    return { residue: BigInt(a!), odd: Number(m), image: BigInt(b!) };
  });
}
