// Text rendering of results (no arithmetic beyond display: densities are exact BigInt quotients).
import type { Level } from "../exact.js";
import type { CollatzMap } from "../map.js";
import { dropDepth } from "../map.js";
import { group } from "../format.js";

/** survivors / 2^depth to `digits` decimals, truncated, from exact integers. */
export function density(survivors: bigint, depth: number, digits = 8): string {
  const scaled = (survivors * 10n ** BigInt(digits)) >> BigInt(depth);
  const s = scaled.toString().padStart(digits + 1, "0");
  return `${s.slice(0, -digits)}.${s.slice(-digits)}`;
}

/** Odd steps m of the classes stopping at depth j: the unique m with bitlen(q^m) = j, if any. */
export function stoppingOdd(map: CollatzMap, j: number): number | null {
  for (let m = 0; m <= j; m++) {
    const d = dropDepth(map.q, m);
    if (d === j) return m;
    if (d > j) break;
  }
  return null;
}

export function levelTable(map: CollatzMap, levels: readonly Level[]): string {
  const head = ["depth", "survivors", "stopped", "density", "std steps"];
  const rows = levels.map((l) => {
    const m = l.stopped > 0n ? stoppingOdd(map, l.depth) : null;
    return [String(l.depth), group(l.survivors), group(l.stopped), density(l.survivors, l.depth), m === null ? "" : String(l.depth + m)];
  });
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (r: string[]) => r.map((c, i) => (i === 3 || i === 4 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join("  ").trimEnd();
  return [line(head), ...rows.map(line)].join("\n");
}
