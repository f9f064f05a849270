// Exact survivor counts by dynamic programming over lattice paths (BigInt, no wasm).
// A class's coefficient q^m / 2^j depends only on its parity path's odd counts, so the number of
// classes alive at (j, m) is a path count: live(j+1, m) += live(j, m) unless q^m < 2^(j+1) (then it
// stops there), and live(j+1, m+1) += live(j, m). Independent of the kernels: their cross-check.
import type { CollatzMap } from "./map.js";
import { UsageError } from "./errors.js";
import { bitLength } from "./arith.js";

export const MAX_EXACT_DEPTH = 10_000;

export interface Level {
  readonly depth: number;
  /** Classes mod 2^depth whose coefficient has not yet dropped below 1. */
  readonly survivors: bigint;
  /** Classes whose coefficient first drops below 1 at exactly this depth. */
  readonly stopped: bigint;
}

export interface ExactCounts {
  readonly levels: Level[];
  /** byOdd[j]: live counts at depth j for m = mLow[j] .. j (only when asked for). */
  readonly byOdd?: { readonly mLow: number; readonly live: bigint[]; readonly stopped: bigint[] }[];
}

/**
 * Survivors and stopped counts for depths 0..depth.
 * @example exactCounts(makeMap(3, 1), 5).levels[5].survivors // 4n
 */
export function exactCounts(map: CollatzMap, depth: number, options: { byOdd?: boolean; onProgress?: (done: number) => void } = {}): ExactCounts {
  if (!Number.isInteger(depth) || depth < 0 || depth > MAX_EXACT_DEPTH) {
    throw new UsageError(`depth must be an integer from 0 to ${MAX_EXACT_DEPTH}`);
  }
  // drop[m] = bitlen(q^m), the least j with q^m < 2^j, kept incrementally: multiplying by q
  // adds bitlen(q) - 1 or bitlen(q) bits (q^0 = 1 = 2^0 drops at j = 1).
  const drop: number[] = [1];
  const q = BigInt(map.q);
  const qBits = bitLength(q);
  let p = 1n;
  let bits = 1;
  for (let m = 1; m <= depth; m++) {
    p *= q;
    bits += qBits - 1;
    if (p >> BigInt(bits) !== 0n) bits++;
    drop.push(bits);
  }
  // live[m] for m in [lo, j]; entries below lo are zero (those paths have all stopped).
  let live: bigint[] = [1n];
  let lo = 0;
  const levels: Level[] = [{ depth: 0, survivors: 1n, stopped: 0n }];
  const byOdd: NonNullable<ExactCounts["byOdd"]> = [];
  if (options.byOdd) byOdd.push({ mLow: 0, live: [1n], stopped: [0n] });
  let survivors = 1n;
  for (let j = 0; j < depth; j++) {
    const jj = j + 1;
    // In place, from the top down: live(jj, m) = [m does not drop at jj] live(j, m) + live(j, m - 1),
    // index i standing for m = lo + i. At most one m drops per depth (drop[] is strictly increasing).
    live.push(0n);
    let stopped = 0n;
    let stoppedAt = -1;
    for (let i = live.length - 1; i >= 0; i--) {
      let keep = live[i]!;
      if (keep !== 0n && jj === drop[lo + i]) {
        stopped = keep;
        stoppedAt = i;
        keep = 0n;
      }
      live[i] = i > 0 ? keep + live[i - 1]! : keep;
    }
    // each survivor at depth j has two children, of which the dropped ones stop (common practice)
    survivors = 2n * survivors - stopped;
    levels.push({ depth: jj, survivors, stopped });
    if (options.byOdd) {
      const stoppedRow = new Array<bigint>(live.length).fill(0n);
      if (stoppedAt >= 0) stoppedRow[stoppedAt] = stopped;
      byOdd.push({ mLow: lo, live: live.slice(), stopped: stoppedRow });
    }
    // Trim the zero entries at the low end so the window stays [lo, jj].
    let cut = 0;
    while (cut < live.length - 1 && live[cut] === 0n) cut++;
    if (cut > 0) {
      live = live.slice(cut);
      lo += cut;
    }
    if (options.onProgress && (jj & 255) === 0) options.onProgress(jj);
  }
  return options.byOdd ? { levels, byOdd } : { levels };
}
