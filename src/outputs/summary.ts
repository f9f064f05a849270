// The machine-readable summaries of a run, shared by the CLI (--json) and the web app
// (data-run-summary): every count an exact integer (BigInt, written as digits by toExactJson).
import type { SieveResult } from "../jobs/sieve/sieve.js";
import type { CensusResult } from "../jobs/census/census.js";
import type { CycleSearchResult } from "../jobs/cycles/cycles.js";
import type { ConjugacyResult } from "../jobs/conjugacy.js";
import type { Card } from "../jobs/inspect.js";
import type { Level } from "../core/exact.js";
import type { CollatzMap } from "../core/map.js";
import type { PeriodicPoint } from "../core/padic.js";
import type { TreeResult } from "../jobs/tree/tree.js";
import { heuristicGrowth } from "../jobs/tree/tree.js";

/** The fields of `glidepath sieve --json` (a census carries the same fields). */
export function sieveJson(r: Pick<SieveResult, "map" | "depth" | "levels" | "exceptions" | "exceptionCount" | "nodes" | "seconds">) {
  return {
    map: r.map.name,
    depth: r.depth,
    levels: r.levels.map((l) => ({ depth: l.depth, survivors: l.survivors, stopped: l.stopped })),
    exceptions: r.exceptions.map((e) => ({ n: e.n, residue: e.residue, classDepth: e.classDepth })),
    exceptionCount: r.exceptionCount,
    nodes: r.nodes,
    seconds: Number(r.seconds.toFixed(3)),
  };
}

/** log2(q^m / 2^j) for display only (never used to decide anything). */
export function log2Coefficient(q: number, m: number, j: number): number {
  return Number((m * Math.log2(q) - j).toFixed(6));
}

/** The fields of `glidepath census --json`. */
export function censusJson(c: CensusResult) {
  const q = c.map.q;
  const cells = (t: bigint[][]) =>
    t.flatMap((row, j) =>
      row.flatMap((count, m) => (count > 0n ? [{ depth: j, odd: m, count, log2Coefficient: log2Coefficient(q, m, j) }] : [])),
    );
  return {
    map: c.map.name,
    depth: c.depth,
    levels: c.levels,
    agreesWithExactCounter: c.agreesWithExactCounter,
    vectors: cells(c.vectors),
    peaks: cells(c.peak),
    ratioBins: c.ratioBins.map((b) => ({ bin: b.bin, from: b.bin / 4, to: (b.bin + 1) / 4, count: b.count })),
    nonpositiveImages: c.nonpositive,
    exceptions: c.exceptions.map((e) => ({ n: e.n, residue: e.residue, classDepth: e.classDepth })),
    exceptionCount: c.exceptionCount,
    differ: c.differ,
    maxRatio: { n: c.maxRatio.n, step: c.maxRatio.step, value: c.maxRatio.value, classDepth: c.depth },
    nodes: c.nodes,
    seconds: Number(c.seconds.toFixed(3)),
  };
}

/** The head of `glidepath counts --json` (levels and byOdd follow, streamed). */
export function countsHeadJson(map: CollatzMap, depth: number) {
  return { map: map.name, depth };
}

/** One entry of `levels`. */
export function levelJson(l: Level) {
  return { depth: l.depth, survivors: l.survivors, stopped: l.stopped };
}

/** One entry of `byOdd`: classes alive and stopping at (depth, odd). */
export function countsOddJson(depth: number, odd: number, live: bigint, stopped: bigint) {
  return { depth, odd, live, stopped };
}

/** The fields of `glidepath cycles --json`. */
export function cyclesJson(r: CycleSearchResult) {
  return {
    map: r.map.name,
    maxPeriod: r.maxPeriod,
    width: r.width,
    cycles: r.cycles.map((c) => ({
      representative: c.representative,
      min: c.min,
      max: c.max,
      period: c.period,
      odd: c.odd,
      elements: c.elements,
    })),
    candidates: r.candidates,
    nodes: r.nodes,
    seconds: Number(r.seconds.toFixed(3)),
  };
}

/** The fields of `glidepath conjugacy --json`. */
export function conjugacyJson(r: ConjugacyResult) {
  return {
    map: r.map.name,
    depth: r.depth,
    cycles: r.cycles,
    fixedPoints: r.fixedPoints,
    lengths: r.lengths,
    seconds: Number(r.seconds.toFixed(3)),
  };
}

/** The cycles as CSV: one row a cycle (sign, minimum, representative, period, odd steps, elements space-separated). */
export function cyclesCsv(r: CycleSearchResult): string {
  const rows = r.cycles.map((c) =>
    [c.representative > 0n ? "positive" : "negative", c.min, c.representative, c.period, c.odd, c.elements.join(" ")].join(","),
  );
  return `sign,minimum,representative,period,odd_steps,elements\n${rows.map((x) => `${x}\n`).join("")}`;
}

/** The fields of `glidepath tree --json`: per inverse depth, with the growth over the level above and its heuristic. */
export function treeJson(r: TreeResult) {
  return {
    map: r.map.name,
    n: r.n,
    depth: r.depth,
    steps: r.steps,
    below: r.below,
    engine: r.engine,
    heuristicGrowth: Number(heuristicGrowth(r.map.q, r.steps).toFixed(6)),
    levels: r.levels.map((l, j) => ({ ...l, growth: j === 0 ? null : growth(l.nodes, r.levels[j - 1]!.nodes) })),
    total: r.total,
    totalBelowX: r.totalBelowX,
    seconds: Number(r.seconds.toFixed(3)),
  };
}

/** nodes / previous to 6 decimals, for reading only (null when the level above is empty). */
export function growth(nodes: bigint, previous: bigint): number | null {
  return previous === 0n ? null : Number((nodes * 1_000_000n) / previous) / 1e6;
}

/** The fields of `glidepath class --json`. */
export function classJson(map: CollatzMap, card: Card) {
  return { map: map.name, ...card };
}

/** The fields of `glidepath periodic --json`. */
export function periodicJson(map: CollatzMap, p: PeriodicPoint, digits: string) {
  return { map: map.name, pre: p.pre, word: p.word, numerator: p.num, denominator: p.den, digits, integer: p.integer, cycle: p.cycle };
}
