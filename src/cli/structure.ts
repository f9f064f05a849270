// glidepath census, cycles, conjugacy: the 2-adic structure commands over the full tree.
import { UsageError } from "../errors.js";
import { toExactJson } from "../json.js";
import { runCensus, MAX_CENSUS_DEPTH } from "../census.js";
import type { CensusResult } from "../census.js";
import { searchCycles, MAX_CYCLE_PERIOD } from "../cycles.js";
import type { CycleSearchResult } from "../cycles.js";
import { conjugacy, MAX_CONJUGACY_DEPTH } from "../conjugacy.js";
import { censusArrow, cyclesArrow } from "../arrow.js";
import { censusJson, log2Coefficient, vectorsAreBinomial } from "../summary.js";
import { intOption, mapOption, parseOptions, workersOption } from "./args.js";
import { withOutput } from "./files.js";
import { withPool } from "./node-kernel.js";
import { levelTable } from "./report.js";
import { group } from "../format.js";

export const CENSUS_USAGE = "glidepath census [--map 3x+1] --depth K [--out FILE.arrow] [--workers N] [--json]";
export const CYCLES_USAGE = "glidepath cycles [--map 3x+1] --max-period K [--out FILE.arrow] [--workers N] [--json]";
export const CONJUGACY_USAGE = "glidepath conjugacy [--map 3x+1] --depth K [--workers N] [--json]";

const common = { map: { type: "string" }, workers: { type: "string" }, json: { type: "boolean" }, out: { type: "string" }, format: { type: "string" } } as const;

function arrowOut(o: Record<string, string | boolean | undefined>): string | undefined {
  if (o.format !== undefined && o.format !== "arrow") throw new UsageError(`--format must be arrow here, got "${String(o.format)}"`);
  if (o.format !== undefined && o.out === undefined) throw new UsageError("--format needs --out FILE");
  return typeof o.out === "string" ? o.out : undefined;
}

function censusText(c: CensusResult, workers: number): string {
  const peaks = c.peak.flatMap((row, j) => row.flatMap((n, m) => (n > 0n ? [{ j, m, n }] : []))).sort((x, y) => (x.n > y.n ? -1 : x.n < y.n ? 1 : 0));
  const maxBin = c.ratioBins.reduce((s, b) => (b.count > s ? b.count : s), 0n);
  const bar = (n: bigint) => "#".repeat(Number((n * 40n + maxBin - 1n) / (maxBin || 1n)));
  const lines = [
    `census of all 2^${c.depth} parity vectors of ${c.map.name} (full tree: ${group(c.nodes)} nodes, ${c.seconds.toFixed(2)} s, ${workers} worker${workers === 1 ? "" : "s"})`,
    "",
    "classes whose coefficient q^m/2^j has not dropped below 1, and first drops by depth:",
    levelTable(c.map, c.levels),
    `agrees with the exact counter at every (j, m): ${c.agreesWithExactCounter ? "yes" : "NO"}`,
    `vectors with m odd steps among the first j are C(j, m) at every (j, m): ${vectorsAreBinomial(c) ? "yes" : "NO"}`,
    "",
    `peak coefficient max_j q^(m_j)/2^j, by the (j, m) where it is reached (${peaks.length} distinct; the 12 most common):`,
    ...peaks.slice(0, 12).map((p) => `  j=${String(p.j).padStart(2)} m=${String(p.m).padStart(2)}  log2 = ${log2Coefficient(c.map.q, p.m, p.j).toFixed(3).padStart(8)}  ${group(p.n).padStart(14)} vectors`),
    "",
    `log2(T^${c.depth}(a)/a) of each class's least member a in [1, 2^${c.depth}), in quarter units:`,
    ...c.ratioBins.map((b) => `  [${(b.bin / 4).toFixed(2).padStart(7)}, ${((b.bin + 1) / 4).toFixed(2).padStart(7)})  ${group(b.count).padStart(13)}  ${bar(b.count)}`),
    ...(c.nonpositive > 0n ? [`  T^${c.depth}(a) <= 0: ${group(c.nonpositive)}`] : []),
    "",
    `least members whose first descent differs from the coefficient stopping time: ${group(c.differ.count)} (early descents ${group(c.differ.early)})`,
    ...c.differ.listed.slice(0, 20).map((d) => `  a = ${d.n}: descends ${d.descent === null ? `not within ${c.depth} steps` : `at ${d.descent}`}, coefficient stopping time ${d.stoppingTime ?? `> ${c.depth}`}`),
    `largest T^j(a)/a: T^${c.maxRatio.step}(${c.maxRatio.n}) = ${c.maxRatio.value} (class ${c.maxRatio.n} mod 2^${c.depth})`,
    "",
  ];
  return lines.join("\n");
}

export async function censusCommand(argv: string[]): Promise<void> {
  const o = parseOptions(argv, { ...common, depth: { type: "string" } });
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 1, MAX_CENSUS_DEPTH);
  const workers = workersOption(o.workers);
  const out = arrowOut(o);
  const c = await withPool(workers, `census ${map.name} 2^${depth}`, (pool, onProgress) => withOutput(out, () => runCensus(pool, map, depth, { onProgress }), censusArrow));
  process.stdout.write(o.json ? toExactJson(censusJson(c)) + "\n" : censusText(c, workers));
}

export function cyclesJson(r: CycleSearchResult) {
  return {
    map: r.map.name,
    maxPeriod: r.maxPeriod,
    width: r.width,
    cycles: r.cycles.map((c) => ({ representative: c.representative, min: c.min, max: c.max, period: c.period, odd: c.odd, elements: c.elements })),
    candidates: r.candidates,
    nodes: r.nodes,
    seconds: Number(r.seconds.toFixed(3)),
  };
}

function cyclesText(r: CycleSearchResult, workers: number): string {
  const pos = r.cycles.filter((c) => c.representative > 0n), neg = r.cycles.filter((c) => c.representative < 0n);
  const row = (c: CycleSearchResult["cycles"][number]) => {
    const els = c.elements.length <= 12 ? c.elements.join(" ") : `${c.elements.slice(0, 12).join(" ")} ... (${c.elements.length})`;
    return `  ${String(c.representative).padStart(10)}  period ${String(c.period).padStart(2)}  odd ${String(c.odd).padStart(2)}  max ${c.max}  elements: ${els}`;
  };
  return [
    `integer cycles of ${r.map.name} with period <= ${r.maxPeriod} (complete: every node of the full tree tested, ${group(r.nodes)} nodes, ${r.width}-bit, ${r.seconds.toFixed(2)} s, ${workers} worker${workers === 1 ? "" : "s"})`,
    `positive cycles: ${pos.length} (listed by minimum)`,
    ...pos.map(row),
    `negative cycles: ${neg.length} (listed by the element of least |x|)`,
    ...neg.map(row),
    "",
  ].join("\n");
}

export async function cyclesCommand(argv: string[]): Promise<void> {
  const o = parseOptions(argv, { ...common, "max-period": { type: "string" } });
  const map = mapOption(o.map);
  const maxPeriod = intOption("max-period", o["max-period"], 1, MAX_CYCLE_PERIOD);
  const workers = workersOption(o.workers);
  const out = arrowOut(o);
  const r = await withPool(workers, `cycles ${map.name} <= ${maxPeriod}`, (pool, onProgress) => withOutput(out, () => searchCycles(pool, map, maxPeriod, { onProgress }), cyclesArrow));
  process.stdout.write(o.json ? toExactJson(cyclesJson(r)) + "\n" : cyclesText(r, workers));
}

export async function conjugacyCommand(argv: string[]): Promise<void> {
  const o = parseOptions(argv, { map: { type: "string" }, workers: { type: "string" }, json: { type: "boolean" }, depth: { type: "string" } });
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 1, MAX_CONJUGACY_DEPTH);
  const workers = workersOption(o.workers);
  const r = await withPool(workers, `conjugacy ${map.name} 2^${depth}`, (pool, onProgress) => conjugacy(pool, map, depth, { onProgress }));
  if (o.json) {
    process.stdout.write(toExactJson({ map: map.name, depth, cycles: r.cycles, fixedPoints: r.fixedPoints, lengths: r.lengths, seconds: Number(r.seconds.toFixed(3)) }) + "\n");
    return;
  }
  process.stdout.write(
    [
      `conjugacy permutation a -> Q_${depth}(a) (first ${depth} parities read as a ${depth}-bit number, first step lowest) of ${map.name} on the residues mod 2^${depth}`,
      `cycles: ${r.cycles}, fixed points: ${r.fixedPoints}, ${r.seconds.toFixed(2)} s`,
      "cycle lengths (length: how many cycles):",
      ...r.lengths.map((l) => `  ${String(l.length).padStart(9)}: ${l.count}`),
      "",
    ].join("\n"),
  );
}
