// The BigInt reference iteration of verification: one n step by step, exactly, at any size. It
// finishes what the kernel hands off (values past its word size), runs the BigInt engine, and is
// what `verify --check` iterates again.
import type { CollatzMap } from "../../core/map.js";
import { step } from "../../core/map.js";
import { findCycle } from "../../core/padic.js";

/** One n, iterated in BigInt. */
export interface Trace {
  readonly outcome: "descent" | "cycle" | "unresolved";
  /** Steps of T to the first value below n (descent), or back to n (cycle). */
  readonly steps: number;
  readonly odd: number;
  /** The highest value of T on the way, before the descent (n itself for a cycle member). */
  readonly path: bigint;
  /** The depth at which n's class coefficient q^m / 2^j first drops below 1, within `depth`. */
  readonly cutDepth: number | null;
}

/**
 * n iterated step by step in BigInt until it goes below n, returns to n, or passes maxSteps. A
 * return to n is a cycle whatever the cap (n on a cycle of period p > maxSteps is still a cycle
 * member once the cap allows p steps; below it, it is unresolved, then shown by cycleEntry).
 * @example traceBig(parseMap("3x+1"), 27n, 1000, 24) // { outcome: "descent", steps: 59, odd: 37, path: 4616n, ... }
 */
export function traceBig(map: CollatzMap, n: bigint, maxSteps: number, depth: number): Trace {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  let v = n;
  let odd = 0;
  let path = n;
  let cutDepth: number | null = null;
  let qm = 1n;
  for (let steps = 1; steps <= maxSteps; steps++) {
    if ((v & 1n) === 1n) {
      v = (q * v + r) >> 1n;
      odd++;
      qm *= q;
    } else v >>= 1n;
    if (cutDepth === null && steps <= depth && qm >> BigInt(steps) === 0n) cutDepth = steps;
    if (v > path) path = v;
    if (v < n) return { outcome: "descent", steps, odd, path, cutDepth };
    if (v === n) return { outcome: "cycle", steps, odd, path: n, cutDepth };
  }
  return { outcome: "unresolved", steps: maxSteps, odd, path, cutDepth };
}

/** Brent's budget for an n past the step cap: twice the cap, and at least 100,000 steps whatever the cap. */
export const cycleBudget = (maxSteps: number): number => Math.max(2 * maxSteps, 100_000);

/**
 * Whether n's trajectory enters a cycle (without going below n: the cycle's elements are all above
 * n), by Brent's method within about `budget` steps while its values stay below 2^maxBits: the
 * cycle's least element and period, exactly, or null when that is not shown.
 * @example cycleEntry(parseMap("3x+5"), 3n, 1000) // { min: 19n, period: 5 }
 */
export function cycleEntry(map: CollatzMap, n: bigint, budget: number, maxBits = 256): { min: bigint; period: number } | null {
  const T = (v: bigint) => step(map, v);
  const limit = 1n << BigInt(maxBits);
  const found = findCycle(T, n, budget, (v) => v >= limit || v <= -limit);
  if (!found) return null;
  let v = n;
  for (let i = 0; i < found.mu; i++) v = T(v);
  let min = v;
  for (let i = 1, w = T(v); i < found.lambda; i++, w = T(w)) if (w < min) min = w;
  return { min, period: found.lambda };
}
