// Exact survivor counts by dynamic programming over lattice paths (BigInt, no wasm).
// A class's coefficient q^m / 2^j depends only on its parity path's odd counts, so the number of
// classes alive at (j, m) is a path count: live(j+1, m) += live(j, m) unless q^m < 2^(j+1) (then it
// stops there), and live(j+1, m+1) += live(j, m). Independent of the kernels: their cross-check.
import type { CollatzMap } from "./map.js";
import { dropDepths } from "./map.js";
import { UsageError } from "./errors.js";

export const MAX_EXACT_DEPTH = 10_000;

export interface Level {
  readonly depth: number;
  /** Classes mod 2^depth whose coefficient has not yet dropped below 1. */
  readonly survivors: bigint;
  /** Classes whose coefficient first drops below 1 at exactly this depth. */
  readonly stopped: bigint;
}

/** One depth of the counter: its level, the m of the classes stopping there, and the live window. */
export interface ExactRow extends Level {
  /** Odd steps of the classes that stopped at this depth (null when none did). */
  readonly stoppedOdd: number | null;
  /** live[i] is the number of classes alive at (depth, mLow + i); below mLow every entry is zero. */
  readonly mLow: number;
  /** The counter's own window: valid until the next row is taken (copy it to keep it). */
  readonly live: readonly bigint[];
}

export interface ExactCounts {
  readonly levels: Level[];
  /** byOdd[j]: live counts at depth j for m = mLow[j] .. j (only when asked for). */
  readonly byOdd?: { readonly mLow: number; readonly live: bigint[]; readonly stopped: bigint[] }[];
}

/**
 * The counter row by row, depths 0..depth, in memory independent of the depth's history: a
 * consumer that writes each row as it comes holds one window at a time.
 * @example for (const row of exactRows(makeMap(3, 1), 5)) console.log(row.depth, row.survivors)
 */
export function* exactRows(map: CollatzMap, depth: number): Generator<ExactRow> {
  if (!Number.isInteger(depth) || depth < 0 || depth > MAX_EXACT_DEPTH) {
    throw new UsageError(`depth must be an integer from 0 to ${MAX_EXACT_DEPTH}`);
  }
  const counter = new LatticeCounter(map.q, depth);
  yield counter.row(0, 0n, null);
  for (let j = 1; j <= depth; j++) yield counter.next();
}

/** The dynamic programme itself, one depth per call (a plain method: the hot loop stays optimisable). */
class LatticeCounter {
  private readonly drop: number[];
  /** live[m - lo] for m in [lo, j]; entries below lo are zero (those paths have all stopped). */
  private live: bigint[] = [1n];
  private lo = 0;
  private depth = 0;
  private survivors = 1n;

  constructor(q: number, maxDepth: number) {
    this.drop = dropDepths(q, maxDepth); // drop[m] = bitlen(q^m), strictly increasing
  }

  row(depth: number, stopped: bigint, stoppedOdd: number | null): ExactRow {
    return { depth, survivors: this.survivors, stopped, stoppedOdd, mLow: this.lo, live: this.live };
  }

  next(): ExactRow {
    // Trim the zero entries at the low end left by the previous depth, so the window stays [lo, j].
    let cut = 0;
    while (cut < this.live.length - 1 && this.live[cut] === 0n) cut++;
    if (cut > 0) {
      this.live = this.live.slice(cut);
      this.lo += cut;
    }
    const live = this.live;
    const lo = this.lo;
    const drop = this.drop;
    const jj = ++this.depth;
    // In place, from the top down: live(jj, m) = [m does not drop at jj] live(j, m) + live(j, m - 1),
    // index i standing for m = lo + i. At most one m drops per depth.
    live.push(0n);
    let stopped = 0n;
    let stoppedOdd: number | null = null;
    for (let i = live.length - 1; i >= 0; i--) {
      let keep = live[i]!;
      if (keep !== 0n && jj === drop[lo + i]) {
        stopped = keep;
        stoppedOdd = lo + i;
        keep = 0n;
      }
      live[i] = i > 0 ? keep + live[i - 1]! : keep;
    }
    // each survivor at depth j has two children, of which the dropped ones stop (common practice);
    // the tests check this total against the sum of the window, which is computed separately
    this.survivors = 2n * this.survivors - stopped;
    return this.row(jj, stopped, stoppedOdd);
  }
}

/**
 * Survivors and stopped counts for depths 0..depth (and the (j, m) tables when asked for).
 * @example exactCounts(makeMap(3, 1), 5).levels[5].survivors // 4n
 */
export function exactCounts(map: CollatzMap, depth: number, options: { byOdd?: boolean } = {}): ExactCounts {
  const levels: Level[] = [];
  const byOdd: NonNullable<ExactCounts["byOdd"]> = [];
  for (const row of exactRows(map, depth)) {
    levels.push({ depth: row.depth, survivors: row.survivors, stopped: row.stopped });
    if (options.byOdd) byOdd.push({ mLow: row.mLow, live: row.live.slice(), stopped: stoppedRow(row) });
  }
  return options.byOdd ? { levels, byOdd } : { levels };
}

/** The stopped counts of a row over its window (one nonzero entry at most). */
export function stoppedRow(row: ExactRow): bigint[] {
  const out = new Array<bigint>(row.live.length).fill(0n);
  if (row.stoppedOdd !== null) out[row.stoppedOdd - row.mLow] = row.stopped;
  return out;
}

/**
 * Parity vectors of length K (all 2^K) by the (j, m) where their coefficient q^m/2^j is largest
 * (q odd: distinct (j, m) give distinct values, so the peak is one point). A lattice-path count:
 * the prefix to (j, m) must lie strictly below it (read backwards from (j, m), every x last steps
 * with y odd ones have q^y > 2^x, i.e. x < bitlen(q^y)), and the K - j steps after it strictly
 * below too (x >= bitlen(q^y)); the count is the product of the two. Returned as [j][m], m = 0..j.
 * @example peakCounts(3, 2) // [[2n], [0n, 1n], [0n, 0n, 1n]]: even-first vectors peak at the root
 */
export function peakCounts(q: number, depth: number): bigint[][] {
  const drop = dropDepths(q, depth);
  const before = pathCounts(depth, (x, y) => x < drop[y]!);
  const after = pathCounts(depth, (x, y) => x >= drop[y]!).map((row) => row.reduce((s, n) => s + n, 0n));
  return before.map((row, j) => row.map((n) => n * after[depth - j]!));
}

/**
 * [x][y], x = 0..depth: the paths of x steps with y odd ones whose every prefix (x', y') passes
 * `ok(x', y')` (with `ok` always true, the binomials C(x, y)).
 * @example pathCounts(2, () => true) // [[1n], [1n, 1n], [1n, 2n, 1n]]
 */
export function pathCounts(depth: number, ok: (x: number, y: number) => boolean): bigint[][] {
  const out: bigint[][] = [[1n]];
  for (let x = 1; x <= depth; x++) {
    const prev = out[x - 1]!;
    out.push(Array.from({ length: x + 1 }, (_, y) => (ok(x, y) ? (prev[y] ?? 0n) + (y > 0 ? prev[y - 1]! : 0n) : 0n)));
  }
  return out;
}
