// The skip of slices on the host (verify --check): which survivors of the depth-K sieve a smaller
// number reaches within three steps (README: global records), counted over a span of n by their
// residue mod q^2, and tested one by one. The test of one n is known.ts preimageBelow (BigInt, any
// size); from `skipFrom` on it depends on n mod q^2 alone (each shape's size condition holds there,
// and its divisibility is a condition mod q or q^2), so one table of q^2 entries counts whole periods.
import type { CollatzMap } from "../../core/map.js";
import { preimageBelow } from "./known.js";

/** The survivors' residues mod 2^K (ascending) and the residue table of the skip. */
export interface SliceSkip {
  readonly K: number;
  readonly residues: Uint32Array;
  readonly M: number;
  readonly from: bigint;
  readonly table: Uint8Array;
  /** How many residues a (mod 2^K) lie in each class mod M. */
  readonly byClass: Uint32Array;
  readonly map: CollatzMap;
}

/**
 * The skip's table for a map (r > 0, q < 256) over the depth-K survivors: from skipFrom =
 * 2r(q + 2) + 2q^2 + 8r + 64 on (the kernel's bound, assembly/verify/preimage.ts prepareSkip),
 * table[n mod q^2] is whether a smaller number reaches n.
 * @example sliceSkip(parseMap("3x+1"), 10, residues).table // 1 at 2, 4, 5, 8 mod 9
 */
export function sliceSkip(map: CollatzMap, K: number, residues: Uint32Array): SliceSkip {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  const M = map.q * map.q;
  const from = 2n * r * (q + 2n) + 2n * q * q + 8n * r + 64n;
  const table = new Uint8Array(M);
  for (let t = 0; t < M; t++) {
    const n = from + ((((BigInt(t) - from) % BigInt(M)) + BigInt(M)) % BigInt(M));
    table[t] = preimageBelow(map, n) === null ? 0 : 1;
  }
  const byClass = new Uint32Array(M);
  for (const a of residues) byClass[a % M]!++;
  return { K, residues, M, from, table, byClass, map };
}

/** Whether n, a survivor, is skipped: a smaller number reaches it. */
export function skippedAt(s: SliceSkip, n: bigint): boolean {
  return n < s.from ? preimageBelow(s.map, n) !== null : s.table[Number(n % BigInt(s.M))] === 1;
}

/** Whether n is a survivor of the depth-K sieve (its residue mod 2^K is in the table). */
export function isSurvivor(s: SliceSkip, n: bigint): boolean {
  const a = Number(n & ((1n << BigInt(s.K)) - 1n));
  return s.residues[lowerBound(s.residues, a)] === a;
}

/** The first index of the residues at or above a. */
function lowerBound(residues: Uint32Array, a: number): number {
  let lo = 0;
  let hi = residues.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (residues[mid]! < a) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * The survivors of [first, last] that the skip passes over: whole periods from skipFrom on by the
 * residue classes (h ≡ x mod q^2 in [h0, h1) counted exactly), the rest one by one.
 */
export function skippedIn(s: SliceSkip, first: bigint, last: bigint): bigint {
  const K = BigInt(s.K);
  const period = 1n << K;
  const M = BigInt(s.M);
  let count = 0n;
  // whole periods h with h 2^K >= max(first, skipFrom) and (h + 1) 2^K - 1 <= last
  const lowest = first > s.from ? first : s.from;
  const h0 = (lowest + period - 1n) >> K;
  const h1 = (last + 1n) >> K;
  const one = (lo: bigint, hi: bigint) => {
    // survivors in [lo, hi] (one period at most)
    const base = (lo >> K) << K;
    const i0 = lowerBound(s.residues, Number(lo - base));
    const i1 = lowerBound(s.residues, Number(hi - base) + 1);
    for (let i = i0; i < i1; i++) if (skippedAt(s, base + BigInt(s.residues[i]!))) count++;
  };
  const byPeriods = (lo: bigint, hi: bigint) => {
    for (let p = lo >> K; p <= hi >> K; p++) {
      const a = p << K > lo ? p << K : lo;
      const b = ((p + 1n) << K) - 1n < hi ? ((p + 1n) << K) - 1n : hi;
      if (a <= b) one(a, b);
    }
  };
  if (h1 <= h0) {
    byPeriods(first, last);
    return count;
  }
  if (first < h0 << K) byPeriods(first, (h0 << K) - 1n);
  // the period h starts at n = 2^K h, whose class mod M is (2^K mod M) h: in each, sum the residues' classes
  const wrap = period % M;
  const inClass = (x: bigint) => {
    const at = (t: bigint) => (t > x ? (t - x - 1n) / M + 1n : 0n); // h in [0, t) with h ≡ x
    return at(h1) - at(h0);
  };
  for (let x = 0n; x < M; x++) {
    const periods = inClass(x);
    if (periods === 0n) continue;
    const start = Number((wrap * x) % M);
    let perPeriod = 0;
    for (let c = 0; c < s.M; c++) if (s.table[(start + c) % s.M] === 1) perPeriod += s.byClass[c]!;
    count += periods * BigInt(perPeriod);
  }
  if (h1 << K <= last) byPeriods(h1 << K, last);
  return count;
}
