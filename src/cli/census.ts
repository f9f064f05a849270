// glidepath census: every 2^K parity vector at once, its tallies as text, JSON or an Arrow file.
import type { Command } from "commander";
import { censusJob, MAX_CENSUS_DEPTH, runCensus } from "../jobs/census/census.js";
import type { CensusParams, CensusResult } from "../jobs/census/census.js";
import type { DataFile, ToolStamp } from "../outputs/manifest.js";
import type { AtomicFile } from "../node/files.js";
import type { BatchJob } from "./batch.js";
import { censusArrow } from "../outputs/arrow.js";
import { group, plural, ratioText } from "../outputs/format.js";
import { toExactJson } from "../core/json.js";
import { manifest } from "../outputs/manifest.js";
import { censusJson, log2Coefficient } from "../outputs/summary.js";
import { withManifestOutput } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, outputOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { confirmOutput, print } from "./print.js";
import { levelTable, exceptionLines } from "./report.js";

const TEXT_DIFFER = 20;

function censusOptions(cmd: Command): Command {
  return cmd.option("--depth <K>", `depth: 1 to ${MAX_CENSUS_DEPTH}, within the signed 64-bit range`);
}

function censusParams(o: RawOptions): CensusParams {
  return { map: mapOption(o.map), depth: intOption("depth", o.depth, 1, MAX_CENSUS_DEPTH) };
}

async function writeCensus(file: AtomicFile | null, c: CensusResult): Promise<CensusResult> {
  await file?.write(censusArrow(c));
  return c;
}

const censusManifest = (c: CensusResult, data: DataFile, stamp: ToolStamp) =>
  manifest("glidepath census", c.map, "arrow", data, stamp, { depth: c.depth });

/** The census on a cluster; merge --out writes its Arrow tallies. */
export const censusBatch: BatchJob<CensusParams, CensusResult> = {
  job: censusJob,
  options: censusOptions,
  params: censusParams,
  json: censusJson,
  out: {
    formats: ["arrow"],
    what: "the census tallies (arrow)",
    async write(_pool, result, out, stamp) {
      await withManifestOutput(
        out.path,
        (file) => writeCensus(file, result),
        (c, data) => censusManifest(c, data, stamp),
      );
    },
  },
};

export function censusCommand(program: Command): Command {
  return censusOptions(
    jobCommand(
      program,
      "census",
      "all 2^K parity vectors: alive and dropping classes by (j, m), peak coefficients, log2(T^K(a)/a), descents that differ",
    ),
  )
    .option("--out <FILE>", "write the tallies as an Arrow file, with FILE.json beside it")
    .option("--format <arrow>", "output format (arrow)")
    .action((o: RawOptions) => census(o));
}

async function census(o: RawOptions): Promise<void> {
  const { map, depth } = censusParams(o);
  const workers = workersOption(o.workers);
  const out = outputOption(o, ["arrow"], "arrow");
  const stamp = await toolStamp();
  const c = await withPool(workers, `census ${map.name} 2^${depth}`, (pool, onProgress) =>
    withManifestOutput(
      out?.path,
      async (file) => writeCensus(file, await runCensus(pool, map, depth, { onProgress })),
      (c, data) => censusManifest(c, data, stamp),
    ),
  );
  print(o.json ? `${toExactJson(censusJson(c))}\n` : censusText(c, workers));
  if (out) confirmOutput(o.json, "census tallies (arrow)", out.path);
}

function censusText(c: CensusResult, workers: number): string {
  const peaks = c.peak
    .flatMap((row, j) => row.flatMap((n, m) => (n > 0n ? [{ j, m, n }] : [])))
    .sort((x, y) => (x.n > y.n ? -1 : x.n < y.n ? 1 : x.j - y.j || x.m - y.m));
  const maxBin = c.ratioBins.reduce((s, b) => (b.count > s ? b.count : s), 0n);
  const bar = (n: bigint) => "#".repeat(Number((n * 40n + maxBin - 1n) / (maxBin || 1n)));
  const shown = c.differ.listed.slice(0, TEXT_DIFFER);
  const more = c.differ.count - BigInt(shown.length);
  const lines = [
    `census of all 2^${c.depth} parity vectors of ${c.map.name} (full tree: ${group(c.nodes)} nodes, ${group(c.walked)} walked, ` +
      `${c.seconds.toFixed(2)} s, ${plural(workers, "worker")})`,
    "",
    "classes whose coefficient q^m/2^j has not dropped below 1, and first drops by depth:",
    levelTable(c.map, c.levels),
    `the kernel's walk agrees with the exact counter at every (j, m): ${c.agreesWithExactCounter ? "yes" : "NO"}`,
    "",
    `peak coefficient max_j q^(m_j)/2^j, by the (j, m) where it is reached (${peaks.length} distinct; the 12 most common):`,
    ...peaks
      .slice(0, 12)
      .map(
        (p) =>
          `  j=${String(p.j).padStart(2)} m=${String(p.m).padStart(2)}  log2 = ` +
          `${log2Coefficient(c.map.q, p.m, p.j).toFixed(3).padStart(8)}  ${group(p.n).padStart(14)} vectors`,
      ),
    "",
    `log2(T^${c.depth}(a)/a) of each class's least member a in [1, 2^${c.depth}), in quarter units:`,
    ...c.ratioBins.map(
      (b) =>
        `  [${(b.bin / 4).toFixed(2).padStart(7)}, ${((b.bin + 1) / 4).toFixed(2).padStart(7)})  ${group(b.count).padStart(13)}  ` +
        `${bar(b.count)}`,
    ),
    ...(c.nonpositive > 0n ? [`  T^${c.depth}(a) <= 0: ${group(c.nonpositive)}`] : []),
    "",
    `least members whose first descent differs from the coefficient stopping time: ${group(c.differ.count)} (early descents ` +
      `${group(c.differ.early)})`,
    ...shown.map(
      (d) =>
        `  a = ${d.n}: ${d.descent === null ? `does not descend within ${c.depth} steps` : `descends at step ${d.descent}`}, ` +
        `coefficient stopping time ${d.stoppingTime ?? `> ${c.depth}`}`,
    ),
    ...(more > 0n ? [`  ... and ${group(more)} more (the smallest are listed; --json lists up to ${group(c.differ.limit)})`] : []),
    ...exceptionLines(c, TEXT_DIFFER),
    `largest T^j(a)/a: T^${c.maxRatio.step}(${c.maxRatio.n}) = ${c.maxRatio.value}, a ratio of ` +
      `${ratioText(c.maxRatio.value, c.maxRatio.n)} (class ${c.maxRatio.n} mod 2^${c.depth})`,
    "",
  ];
  return lines.join("\n");
}
