// What a verification of [1, X) proves about cycles: the least pair (ℓ, m) of any cycle with every
// element >= X (core/cyclebound.ts), beside the cycles glidepath knows: those with an element below X
// (the exceptions of the statement) and those lying above X (each checked against the bound).
import type { CollatzMap } from "../core/map.js";
import { step } from "../core/map.js";
import { UsageError } from "../core/errors.js";
import { Window } from "../core/cyclebound.js";
import type { CycleBound, LengthPair } from "../core/cyclebound.js";
import type { CycleSearchResult } from "./cycles/cycles.js";
import type { ReadCertificate } from "./verify/certificate.js";

/** A positive cycle: its least element, its length ℓ (steps of T) and its odd elements m. */
export interface KnownCycle {
  readonly min: bigint;
  readonly period: number;
  readonly odd: number;
}

/** The cycle through n (its least element), walked in BigInt for `period` steps. */
export function cycleThrough(map: CollatzMap, n: bigint, period: number): KnownCycle {
  let odd = 0;
  let v = n;
  for (let i = 0; i < period; i++) {
    if ((v & 1n) === 1n) odd++;
    v = step(map, v);
  }
  if (v !== n) throw new Error(`internal error: ${n} does not return to itself in ${period} steps`);
  return { min: n, period, odd };
}

/** The positive cycles of a cycle search, by least element. */
export function positiveCycles(r: CycleSearchResult): KnownCycle[] {
  return r.cycles.filter((c) => c.representative > 0n).map((c) => ({ min: c.min, period: c.period, odd: c.odd }));
}

/**
 * What a certificate gives the bound: X = its `to`, or its least unresolved number when it has one
 * (a cycle's least element is listed as a cycle member or left unresolved, never passed over), and
 * its cycle members (each the least element of a cycle). Refuses a range that does not start at 1.
 */
export function certificateLimit(c: ReadCertificate): { X: bigint; to: bigint; unresolved: bigint | null; members: KnownCycle[] } {
  const { map, from, to } = c.request;
  if (from !== 1n)
    throw new UsageError(
      `the certificate covers [${from}, ${to}), not a range from 1: only a verification of every n below X bounds the cycles above X`,
    );
  const unresolved = c.findings.counts.unresolved > 0n ? (c.findings.unresolved[0] ?? null) : null;
  const X = runLimit({ from, to, counts: c.findings.counts, unresolvedList: c.findings.unresolved }) ?? to;
  const members = c.findings.cycleMembers.map((m) => cycleThrough(map, m.n, m.period));
  return { X, to, unresolved, members };
}

/** The bound, the pairs up to maxOdd, and the known cycles placed below or above X. */
export interface CycleBoundReport {
  readonly bound: CycleBound;
  readonly maxOdd: bigint;
  readonly pairs: { readonly listed: LengthPair[]; readonly count: bigint; readonly more: bigint };
  /** Known cycles with an element below X: the exceptions of "any other cycle". */
  readonly below: KnownCycle[];
  /** Known cycles with every element >= X: each is admitted by the window, with m >= the least m. */
  readonly above: KnownCycle[];
}

/**
 * The whole report for cycles of `map` with every element >= X.
 * @example cycleBoundReport(parseMap("3x+5"), 20n, [{ min: 23n, period: 5, odd: 3 }]).above.length // 1
 */
export function cycleBoundReport(
  map: CollatzMap,
  X: bigint,
  known: readonly KnownCycle[],
  options: { readonly maxOdd?: bigint; readonly list?: number } = {},
): CycleBoundReport {
  const window = new Window(map, X);
  const bound = window.least();
  const maxOdd = options.maxOdd ?? 10n * bound.least.odd;
  const pairs = window.pairs(maxOdd, options.list ?? 20);
  const seen = new Set<bigint>();
  const unique = [...known].filter((c) => !seen.has(c.min) && seen.add(c.min)).sort((a, b) => (a.min < b.min ? -1 : 1));
  const below = unique.filter((c) => c.min < X);
  const above = unique.filter((c) => c.min >= X);
  for (const c of above) {
    // the theorem in action: a real cycle above X is always admitted and never shorter than the bound
    const f = { num: BigInt(c.period), den: BigInt(c.odd) };
    if (!window.admits(f) || f.den < bound.least.odd)
      throw new Error(`internal error: the cycle of ${c.min} (ℓ = ${c.period}, m = ${c.odd}) contradicts the bound`);
  }
  return { bound, maxOdd, pairs, below, above };
}

/**
 * X for a finished run of [1, to): its `to`, or its least unresolved number; null for a run that does
 * not start at 1 (it bounds no cycle).
 */
export function runLimit(r: {
  readonly from: bigint;
  readonly to: bigint;
  readonly counts: { readonly unresolved: bigint };
  readonly unresolvedList: readonly bigint[];
}): bigint | null {
  if (r.from !== 1n) return null;
  const u = r.counts.unresolved > 0n ? (r.unresolvedList[0] ?? null) : null;
  return u !== null && u < r.to ? u : r.to;
}
