// Text rendering of per-depth tables (no arithmetic beyond display: densities are exact BigInt
// quotients, the stopping m comes from exact bit lengths).
import type { Level } from "../core/exact.js";
import type { CollatzMap } from "../core/map.js";
import { stoppingOdds } from "../core/map.js";
import type { SieveResult } from "../jobs/sieve/sieve.js";
import { density, group } from "../outputs/format.js";

const HEAD = ["depth", "survivors", "stopped", "density", "std steps"] as const;
/** Columns are padded to at most this width; longer numbers (depths in the hundreds) just run on. */
const MAX_PAD = 20;

export type Widths = readonly number[];

/** Column widths for counts up to `widest` (capped, so huge depths do not pad every line). */
export function levelWidths(depth: number, widest: bigint): Widths {
  const n = Math.min(MAX_PAD, group(widest).length);
  return [Math.max(5, String(depth).length), Math.max(9, n), Math.max(7, n), 10, 9];
}

export function levelHeader(w: Widths): string {
  return line(w, [...HEAD]);
}

/** One row; `stoppedOdd` is the m of the classes stopping at this depth (null when none). */
export function levelLine(w: Widths, l: Level, stoppedOdd: number | null): string {
  const std = l.stopped > 0n && stoppedOdd !== null ? String(l.depth + stoppedOdd) : "";
  return line(w, [String(l.depth), group(l.survivors), group(l.stopped), density(l.survivors, l.depth), std]);
}

function line(w: Widths, cells: string[]): string {
  return cells
    .map((c, i) => (i >= 3 ? c.padEnd(w[i]!) : c.padStart(w[i]!)))
    .join("  ")
    .trimEnd();
}

/** The whole table for levels held in memory. */
export function levelTable(map: CollatzMap, levels: readonly Level[]): string {
  const depth = levels.length - 1;
  const odds = stoppingOdds(map.q, depth);
  const widest = levels.reduce((s, l) => (l.survivors > s ? l.survivors : l.stopped > s ? l.stopped : s), 0n);
  const w = levelWidths(depth, widest);
  return [levelHeader(w), ...levels.map((l) => levelLine(w, l, odds[l.depth] ?? null))].join("\n");
}

/** The sieve's exceptions as text: the count, the smallest `listed` of them, and how many more. */
export function exceptionLines(r: Pick<SieveResult, "exceptions" | "exceptionCount" | "exceptionLimit">, listed: number): string[] {
  const shown = r.exceptions.slice(0, listed);
  const more = r.exceptionCount - BigInt(shown.length);
  return [
    `exceptions (positive members that do not descend at their class's stopping depth): ${group(r.exceptionCount)}`,
    ...shown.map((e) => `  n = ${e.n}   class ${e.residue} mod 2^${e.classDepth}`),
    ...(more > 0n ? [`  ... and ${group(more)} more (the smallest are listed; --json lists up to ${group(r.exceptionLimit)})`] : []),
  ];
}
