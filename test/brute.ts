// BigInt brute forces shared by the census, cycle and step-table tests: written here, independent of src/.
import type { CollatzMap } from "../src/core/map.js";
import { T } from "./helpers.js";

export function iterateBig(map: CollatzMap, n: bigint, k: number): bigint {
  for (let i = 0; i < k; i++) n = T(BigInt(map.q), BigInt(map.r), n);
  return n;
}

/** floor(4 log2(v / a)) for positive a, v, decided here by integer comparisons: 2^k a^4 <= v^4 < 2^(k+1) a^4. */
export function quarterBin(a: bigint, v: bigint): number {
  const A = a ** 4n,
    V = v ** 4n;
  const atMost = (k: number) => (k >= 0 ? A << BigInt(k) <= V : A <= V << BigInt(-k)); // 2^k a^4 <= v^4
  let k = 0;
  if (atMost(0)) while (atMost(k + 1)) k++;
  else while (!atMost(k)) k--;
  return k;
}

/** Cycles reached from every start value with |n| <= bound, by direct iteration (a set of seen values). */
export function bruteCycles(map: CollatzMap, bound: number, maxPeriod: number): Map<bigint, number> {
  const found = new Map<bigint, number>();
  for (let s = -bound; s <= bound; s++) {
    if (s === 0) continue;
    const seen = new Map<bigint, number>();
    let v = BigInt(s);
    for (let i = 0; i < 5000 && !seen.has(v); i++) {
      seen.set(v, i);
      v = T(BigInt(map.q), BigInt(map.r), v);
    }
    if (!seen.has(v) || v === 0n) continue;
    const period = seen.size - seen.get(v)!;
    const cyc = [v];
    for (let u = T(BigInt(map.q), BigInt(map.r), v); u !== v; u = T(BigInt(map.q), BigInt(map.r), u)) cyc.push(u);
    const rep = cyc.reduce((a, b) => ((a < 0n ? -a : a) <= (b < 0n ? -b : b) ? a : b));
    if (period <= maxPeriod) found.set(rep, period);
  }
  return found;
}
