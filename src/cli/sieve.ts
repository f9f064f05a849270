// glidepath sieve: the coefficient-stopping-time sieve mod 2^K on the kernel pool, with its report
// and, on request, the class table of survivors (raw, CSV or Arrow, with its manifest).
import type { Command } from "commander";
import { UsageError } from "../core/errors.js";
import { exactCounts } from "../core/exact.js";
import { checkKernelDepth, MAX_KERNEL_DEPTH } from "../core/map.js";
import type { KernelPool } from "../engine/pool.js";
import { runSieve, sieveJob, sieveParams } from "../jobs/sieve/sieve.js";
import type { SieveParams, SieveResult } from "../jobs/sieve/sieve.js";
import { runWhole } from "../engine/plan.js";
import { mergeSortedTables } from "../jobs/sieve/merge.js";
import { withPartTables } from "../node/cluster/parts.js";
import type { BatchJob } from "./batch.js";
import { classTableArrow } from "../outputs/arrow.js";
import type { ToolStamp } from "../outputs/manifest.js";
import { group, plural } from "../outputs/format.js";
import { toExactJson } from "../core/json.js";
import { tableManifest } from "../outputs/manifest.js";
import { sieveJson } from "../outputs/summary.js";
import { collectRows, CSV_ROW_GUARD, csvLines } from "../outputs/tables.js";
import type { CsvRow, TableFormat } from "../outputs/tables.js";
import type { AtomicFile } from "../node/files.js";
import { withManifestOutput } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, outputOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { confirmOutput, print } from "./print.js";
import { levelTable, exceptionLines } from "./report.js";

/** Exceptions listed in the text report (the smallest; --json lists up to the library's cap). */
const TEXT_EXCEPTIONS = 50;

/** The sieve's own options, for `sieve` and `batch sieve`. */
function sieveOptions(cmd: Command): Command {
  return cmd.option("--depth <K>", `depth: steps of T (0 to the map's exact 64-bit limit, 40 for 3x+1)`);
}

function sieveParamsOf(o: RawOptions, table: boolean): SieveParams {
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 0, MAX_KERNEL_DEPTH);
  checkKernelDepth(map, depth);
  return sieveParams({ map, depth, mode: "survivors" }, table);
}

/** The sieve on a cluster: its shards write sorted parts of the class table; merge --out joins them. */
export const sieveBatch: BatchJob<SieveParams, SieveResult> = {
  job: sieveJob,
  options: sieveOptions,
  params: (o) => sieveParamsOf(o, true),
  json: sieveJson,
  table: true,
  out: {
    formats: ["raw"],
    what: "the class table (raw)",
    async write(_pool, result, out, stamp, tables) {
      const rows = result.levels[result.depth]!.survivors;
      await withManifestOutput(
        out.path,
        async (file) => {
          const n = await withPartTables(tables, (sources) => mergeSortedTables(sources, result.depth, file!));
          if (n !== rows) throw new Error(`internal error: the parts hold ${n} residues, the tallies say ${rows}`);
        },
        (_r, data) => tableManifest(result.map, result.depth, rows, "raw", data, stamp),
      );
    },
  },
};

export function sieveCommand(program: Command): Command {
  return sieveOptions(
    jobCommand(
      program,
      "sieve",
      "the classes mod 2^K whose coefficient q^m/2^j has not dropped below 1, stopped classes and exceptions; export the table",
    ),
  )
    .option("--out <FILE>", "write the survivors' class table, with FILE.json beside it")
    .option("--format <raw|csv|arrow>", "table format (default: from the name's ending, else raw)")
    .option("--force", `allow CSV or Arrow above ${group(CSV_ROW_GUARD)} rows`)
    .action((o: RawOptions) => sieve(o));
}

async function sieve(o: RawOptions): Promise<void> {
  const params = sieveParamsOf(o, o.out !== undefined);
  const { map, depth } = params;
  const workers = workersOption(o.workers);
  const out = outputOption<TableFormat>(o, ["raw", "csv", "arrow"], "raw");
  const rows = exactCounts(map, depth).levels[depth]!.survivors;
  if (out && out.format !== "raw" && rows > BigInt(CSV_ROW_GUARD) && !o.force) {
    throw new UsageError(
      `a ${out.format === "csv" ? "CSV" : "full Arrow"} table of ${group(rows)} rows is over the ` +
        `${group(CSV_ROW_GUARD)}-row guard: use --format raw, or --force`,
    );
  }
  const stamp = await toolStamp();
  const result = await withPool(workers, `sieve ${map.name} mod 2^${depth}`, (pool, onProgress) =>
    withManifestOutput(
      out?.path,
      (file) =>
        file && out ? writeTable(pool, params, out.format, stamp, file, onProgress) : runWhole(pool, sieveJob, params, { onProgress }),
      (_r, data) => tableManifest(map, depth, rows, out!.format, data, stamp),
    ),
  );
  print(o.json ? `${toExactJson(sieveJson(result))}\n` : sieveText(result, workers));
  if (out) confirmOutput(o.json, `class table of ${plural(rows, "residue")} (${out.format})`, out.path);
}

/** Runs the sieve and writes its table: raw through the job's own sorted output, CSV or Arrow from collected rows. */
async function writeTable(
  pool: KernelPool,
  params: SieveParams,
  format: TableFormat,
  stamp: ToolStamp,
  file: AtomicFile,
  onProgress: (done: number, total: number) => void,
): Promise<SieveResult> {
  if (format === "raw") return runWhole(pool, sieveJob, params, { onProgress, out: file });
  const collected: CsvRow[] = [];
  const result = await runSieve(pool, { ...params, onLeaves: (c) => collectRows(collected, c) }, { onProgress });
  if (format === "arrow") await file.write(classTableArrow(collected, params.map, params.depth, stamp));
  else for (const line of csvLines(collected)) await file.write(line);
  return result;
}

function sieveText(r: SieveResult, workers: number): string {
  const lines = [
    `sieve of ${r.map.name} mod 2^${r.depth}: a class is cut when its coefficient q^m/2^j drops below 1`,
    "(depth = steps of T; std steps = the same stopping time with odd steps counted twice)",
    "",
    levelTable(r.map, r.levels),
    "",
    `survivors mod 2^${r.depth}: ${group(r.levels[r.depth]!.survivors)}`,
    ...exceptionLines(r, TEXT_EXCEPTIONS),
    `nodes visited: ${group(r.nodes)} in ${r.seconds.toFixed(2)} s (${plural(workers, "worker")})`,
    "",
  ];
  return lines.join("\n");
}
