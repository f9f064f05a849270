// BigInt brute forces shared by the census, cycle and step-table tests: written here, independent of src/.
import { expect } from "vitest";
import type { CollatzMap } from "../src/core/map.js";
import type { VerifyResult } from "../src/jobs/verify/merge.js";
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

/**
 * Every n of [from, to) iterated here in BigInt: its glide, path, cycle, or none within `cap` steps,
 * and (given the sieve depth K) its outcome as a verification counts it: sieved at depth j when its
 * class's coefficient q^m/2^j first drops below 1 at j <= K and n descends at that step, an exception
 * when it drops but n does not descend there, checked when it does not drop within K.
 */
export function bruteVerify(map: CollatzMap, from: bigint, to: bigint, cap: number, K = 0) {
  const counts = { checked: 0n, exceptions: 0n, sievedByDepth: new Array<bigint>(K + 1).fill(0n) };
  const q = BigInt(map.q),
    r = BigInt(map.r);
  const glideRecords: bigint[] = [];
  const pathRecords: bigint[] = [];
  const cycles: bigint[] = [];
  const unresolved: bigint[] = [];
  const entrants: [bigint, bigint][] = [];
  let bestGlide = -1,
    bestPath = -1n,
    maxGlideN = -1n,
    maxPathN = -1n;
  for (let n = from; n < to; n++) {
    let v = n,
      steps = 0,
      odd = 0,
      path = n,
      outcome = "unresolved",
      cut = 0;
    while (steps < cap) {
      if (v % 2n === 0n) v /= 2n;
      else {
        v = (q * v + r) / 2n;
        odd++;
      }
      steps++;
      if (cut === 0 && steps <= K && q ** BigInt(odd) < 1n << BigInt(steps)) cut = steps;
      if (v > path) path = v;
      if (v < n) {
        outcome = "descent";
        break;
      }
      if (v === n) {
        outcome = "cycle";
        break;
      }
    }
    if (outcome === "unresolved") {
      // does it enter a cycle (of larger numbers)? every value seen, within twice the cap and 2^256
      const seen = new Set<bigint>();
      let u = n;
      for (let i = 0; i <= 2 * cap && !seen.has(u) && u < 1n << 256n; i++) {
        seen.add(u);
        u = u % 2n === 0n ? u / 2n : (q * u + r) / 2n;
      }
      if (seen.has(u)) {
        let min = u;
        for (let w = u % 2n === 0n ? u / 2n : (q * u + r) / 2n; w !== u; w = w % 2n === 0n ? w / 2n : (q * w + r) / 2n)
          if (w < min) min = w;
        entrants.push([n, min]);
      } else unresolved.push(n);
      continue;
    }
    if (outcome === "descent") {
      if (cut > 0 && steps === cut) counts.sievedByDepth[cut]!++;
      else if (cut > 0) counts.exceptions++;
      else counts.checked++;
    }
    if (outcome === "cycle") {
      cycles.push(n);
      path = n;
    } else if (steps + odd > bestGlide) {
      bestGlide = steps + odd;
      glideRecords.push(n);
      maxGlideN = n;
    }
    if (path > bestPath) {
      bestPath = path;
      pathRecords.push(n);
      maxPathN = n;
    }
  }
  return { glideRecords, pathRecords, cycles, unresolved, entrants, bestGlide, bestPath, maxGlideN, maxPathN, counts, K };
}

/** A run's records, maxima, lists and counts equal the brute force's (counts by depth when it classified them). */
export function expectAgrees(r: VerifyResult, b: ReturnType<typeof bruteVerify>) {
  expect(r.glideRecords.map((g) => g.n)).toEqual(b.glideRecords);
  expect(r.pathRecords.map((p) => p.n)).toEqual(b.pathRecords);
  expect(r.cycleMembers.map((c) => c.n)).toEqual(b.cycles);
  expect(r.unresolvedList).toEqual(b.unresolved);
  expect(r.cycleEntrants.map((e) => [e.n, e.cycleMin])).toEqual(b.entrants);
  expect(r.maxGlide?.standardSteps ?? -1).toBe(b.bestGlide);
  expect(r.maxPath?.peakT ?? -1n).toBe(b.bestPath);
  expect(r.maxGlide?.n ?? -1n).toBe(b.maxGlideN);
  expect(r.maxPath?.n ?? -1n).toBe(b.maxPathN);
  const c = r.counts;
  if (b.K > 0) {
    // counts by outcome and by cut depth, each n classified here
    expect(r.sieveDepth).toBe(b.K);
    expect(c.sievedByDepth).toEqual(b.counts.sievedByDepth);
    expect(c.checked).toBe(b.counts.checked);
    expect(c.exceptions).toBe(b.counts.exceptions);
  }
  expect(c.cycleEntrants).toBe(BigInt(b.entrants.length));
  expect(c.cycleMembers).toBe(BigInt(b.cycles.length));
  expect(c.unresolved).toBe(BigInt(b.unresolved.length));
}

/** What n's trajectory does first, iterated in BigInt: goes below n, returns to n, enters a cycle of larger numbers, or none of these. */
export type StartKind =
  | { kind: "descent"; below: bigint }
  | { kind: "member"; period: number }
  | { kind: "entrant"; min: bigint }
  | { kind: "unresolved" };

/**
 * n of qx+r iterated in BigInt up to maxSteps: its first value below n, a return to n, or (past the cap)
 * a cycle entered above n (a value seen twice within 20,000 more steps, values below 2^64), or none.
 */
export function classifyStart(q: bigint, r: bigint, n: bigint, maxSteps: number): StartKind {
  const T = (v: bigint) => ((v & 1n) === 1n ? (q * v + r) / 2n : v / 2n);
  let v = n;
  for (let s = 1; s <= maxSteps; s++) {
    v = T(v);
    if (v < n) return { kind: "descent", below: v };
    if (v === n) return { kind: "member", period: s };
  }
  const seen = new Set<bigint>();
  for (let s = 0; s < 20_000 && v < 1n << 64n; s++, v = T(v)) {
    if (seen.has(v)) {
      let min = v;
      for (let w = T(v); w !== v; w = T(w)) if (w < min) min = w;
      return { kind: "entrant", min };
    }
    seen.add(v);
  }
  return { kind: "unresolved" };
}
