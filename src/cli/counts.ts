// glidepath counts: the exact counter (BigInt dynamic programming, no kernel), any depth to 10,000.
import { exactCounts, MAX_EXACT_DEPTH } from "../exact.js";
import type { ExactCounts } from "../exact.js";
import type { CollatzMap } from "../map.js";
import { toExactJson } from "../json.js";
import { intOption, mapOption, parseOptions } from "./args.js";
import { progressBar } from "./progress.js";
import { levelTable } from "./report.js";

export const COUNTS_USAGE = "glidepath counts [--map 3x+1] --depth K [--by-odd] [--json]";

export function countsCommand(argv: string[]): void {
  const o = parseOptions(argv, {
    map: { type: "string" },
    depth: { type: "string" },
    "by-odd": { type: "boolean" },
    json: { type: "boolean" },
  });
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 0, MAX_EXACT_DEPTH);
  const byOdd = o["by-odd"] === true;
  const bar = progressBar(`counts ${map.name} to depth ${depth}`);
  const started = performance.now();
  const counts = exactCounts(map, depth, { byOdd, onProgress: (done) => bar.update(done, depth) });
  bar.stop();
  const seconds = (performance.now() - started) / 1000;
  process.stdout.write(o.json ? toExactJson(countsJson(map, depth, counts, seconds)) + "\n" : countsText(map, depth, counts, seconds));
}

/** The (j, m) entries with a nonzero live or stopped count. */
function oddTable(counts: ExactCounts) {
  const rows: { depth: number; odd: number; live: bigint; stopped: bigint }[] = [];
  counts.byOdd?.forEach((row, j) => {
    row.live.forEach((live, i) => {
      const stopped = row.stopped[i] ?? 0n;
      if (live !== 0n || stopped !== 0n) rows.push({ depth: j, odd: row.mLow + i, live, stopped });
    });
  });
  return rows;
}

export function countsJson(map: CollatzMap, depth: number, counts: ExactCounts, seconds: number) {
  return {
    map: map.name,
    depth,
    levels: counts.levels.map((l) => ({ depth: l.depth, survivors: l.survivors, stopped: l.stopped })),
    ...(counts.byOdd ? { byOdd: oddTable(counts) } : {}),
    seconds: Number(seconds.toFixed(3)),
  };
}

function countsText(map: CollatzMap, depth: number, counts: ExactCounts, seconds: number): string {
  const lines = [`exact counts for ${map.name} to depth ${depth} (lattice-path dynamic programming)`, "", levelTable(map, counts.levels), ""];
  if (counts.byOdd) {
    lines.push("by odd steps m: depth j, m, classes alive at (j, m), classes stopping at (j, m)");
    for (const r of oddTable(counts)) lines.push(`  j=${r.depth} m=${r.odd} live=${r.live}${r.stopped ? ` stopped=${r.stopped}` : ""}`);
    lines.push("");
  }
  lines.push(`computed in ${seconds.toFixed(2)} s`, "");
  return lines.join("\n");
}
