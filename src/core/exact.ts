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
  const drop = dropDepths(map.q, depth); // drop[m] = bitlen(q^m), strictly increasing
  // live[m] for m in [lo, j]; entries below lo are zero (those paths have all stopped).
  let live: bigint[] = [1n];
  let lo = 0;
  yield { depth: 0, survivors: 1n, stopped: 0n, stoppedOdd: null, mLow: 0, live };
  for (let j = 0; j < depth; j++) {
    const jj = j + 1;
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
    // survivors: the sum of the window itself (not derived from the stopped count, so that the
    // relation survivors(j) = 2 survivors(j - 1) - stopped(j) is a check, not an identity)
    yield { depth: jj, survivors: sumOf(live), stopped, stoppedOdd, mLow: lo, live };
    // Trim the zero entries at the low end so the window stays [lo, jj].
    let cut = 0;
    while (cut < live.length - 1 && live[cut] === 0n) cut++;
    if (cut > 0) {
      live = live.slice(cut);
      lo += cut;
    }
  }
}

function sumOf(xs: readonly bigint[]): bigint {
  let s = 0n;
  for (const x of xs) s += x;
  return s;
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
