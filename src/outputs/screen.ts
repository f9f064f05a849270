// What the page's views show, as files: CSV (a header line, then one row a line, exact integers as
// digits) and JSON in the CLI's --json shapes, each with a manifest (outputs/manifest.ts). The
// formats live here, beside the CLI's, so the page only names the files and hands them over.
import type { Level } from "../core/exact.js";
import { standardPeak } from "../core/orbit.js";
import type { CensusResult } from "../jobs/census/census.js";
import type { TreeResult } from "../jobs/tree/tree.js";
import type { VerifyResult } from "../jobs/verify/merge.js";
import { paramsJson, verifyFindings } from "../jobs/verify/certificate.js";
import type { GlideRecord, PathRecord } from "../jobs/verify/block.js";

/** CSV text from a header and rows (no cell holds a comma, a quote or a line break: numbers and words only). */
function csv(header: readonly string[], rows: readonly (readonly (string | number | bigint | null)[])[]): string {
  return [header, ...rows].map((r) => `${r.map((c) => (c === null ? "" : String(c))).join(",")}\n`).join("");
}

/** The sieve's (or census's) table by depth: survivors mod 2^j and classes stopped at depth j. */
export function levelsCsv(levels: readonly Level[]): string {
  return csv(
    ["depth", "survivors", "stopped"],
    levels.map((l) => [l.depth, l.survivors, l.stopped]),
  );
}

/**
 * One census tally a row, the long form of the census's Arrow file (arrow.ts censusArrow): tally
 * (live, stopped, vectors, peak, log2_ratio_quarter, nonpositive_image), depth, odd_steps, bin, count;
 * unused coordinates are -1.
 */
export function censusTallies(c: CensusResult): { tally: string; depth: number; odd: number; bin: number; count: bigint }[] {
  const out: { tally: string; depth: number; odd: number; bin: number; count: bigint }[] = [];
  for (const [tally, table] of [
    ["live", c.live],
    ["stopped", c.stopped],
    ["vectors", c.vectors],
    ["peak", c.peak],
  ] as const)
    table.forEach((row, depth) => {
      row.forEach((count, odd) => {
        if (count > 0n) out.push({ tally, depth, odd, bin: -1, count });
      });
    });
  for (const b of c.ratioBins) out.push({ tally: "log2_ratio_quarter", depth: c.depth, odd: -1, bin: b.bin, count: b.count });
  if (c.nonpositive > 0n) out.push({ tally: "nonpositive_image", depth: c.depth, odd: -1, bin: -1, count: c.nonpositive });
  return out;
}

/** The census tallies as CSV, the columns of its Arrow file. */
export function censusCsv(c: CensusResult): string {
  return csv(
    ["tally", "depth", "odd_steps", "bin", "count"],
    censusTallies(c).map((t) => [t.tally, t.depth, t.odd, t.bin, t.count]),
  );
}

/** The inverse tree's levels, as the page's table shows them (least and largest empty for an empty level). */
export function treeLevelsCsv(r: TreeResult): string {
  return csv(
    ["depth", "nodes", "odd_predecessor", "zero_mod_q", "least", "largest", "below_n"],
    r.levels.map((l) => [l.depth, l.nodes, l.withOdd, l.zeroModQ, l.min, l.max, l.belowN]),
  );
}

/** Glide (or delay) records: n, its glide in standard steps and in steps of T. */
export function glideRecordsCsv(records: readonly GlideRecord[]): string {
  return csv(
    ["n", "standard_steps", "steps_of_T"],
    records.map((g) => [g.n, g.standardSteps, g.steps]),
  );
}

/** Path records: n and its highest value under T and in standard steps (core/orbit.ts standardPeak). */
export function pathRecordsCsv(records: readonly PathRecord[]): string {
  return csv(
    ["n", "highest_T", "highest_standard"],
    records.map((p) => [p.n, p.peakT, standardPeak(p.n, p.peakT)]),
  );
}

/** A verification's sieved numbers by the depth at which their class is cut (depths with none left out). */
export function cutDepthsCsv(r: VerifyResult): string {
  return csv(
    ["depth", "sieved"],
    r.counts.sievedByDepth.flatMap((count, depth) => (count > 0n ? [[depth, count]] : [])),
  );
}

/** The record lists of a verification in `verify --json`'s key names, with the run's parameters. */
export function recordsJson(r: VerifyResult, which: "glideRecords" | "pathRecords" | "delayRecords") {
  const f = verifyFindings(r);
  const records = which === "delayRecords" ? (f.delay?.records ?? []) : f[which];
  return { ...paramsJson(r), [which]: records };
}

/** The sieved counts by cut depth in `verify --json`'s key names, with the run's parameters. */
export function cutDepthsJson(r: VerifyResult) {
  return { ...paramsJson(r), sieved: r.counts.sieved, sievedByDepth: verifyFindings(r).counts.sievedByDepth };
}
