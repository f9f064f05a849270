// glidepath sieve: the coefficient-stopping-time sieve mod 2^K on the kernel pool, with its report
// and, on request, the class table of survivors (raw + manifest, or CSV).
import { basename } from "node:path";
import { UsageError } from "../errors.js";
import { exactCounts } from "../exact.js";
import { checkKernelDepth, MAX_KERNEL_DEPTH } from "../map.js";
import type { CollatzMap } from "../map.js";
import { runSieve } from "../sieve.js";
import type { SieveResult } from "../sieve.js";
import { collectRows, csvLines, CSV_ROW_GUARD, passPlan, ResidueSorter, tableManifest } from "../tables.js";
import type { CsvRow, TableFormat } from "../tables.js";
import { toExactJson } from "../json.js";
import { classTableArrow } from "../arrow.js";
import { sieveJson } from "../summary.js";
import type { KernelPool } from "../pool.js";
import { intOption, mapOption, parseOptions, workersOption } from "./args.js";
import { AtomicFile, writeFileAtomic } from "./files.js";
import { kernelBuildId, withPool } from "./node-kernel.js";
import { levelTable } from "./report.js";
import { group } from "../format.js";
import { toolVersion } from "./version.js";

export const SIEVE_USAGE = "glidepath sieve [--map 3x+1] --depth K [--out FILE [--format raw|csv|arrow] [--force]] [--workers N] [--json]";

export async function sieveCommand(argv: string[]): Promise<void> {
  const o = parseOptions(argv, {
    map: { type: "string" },
    depth: { type: "string" },
    out: { type: "string" },
    format: { type: "string" },
    force: { type: "boolean" },
    workers: { type: "string" },
    json: { type: "boolean" },
  });
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 0, MAX_KERNEL_DEPTH);
  checkKernelDepth(map, depth);
  const workers = workersOption(o.workers);
  const out = typeof o.out === "string" ? o.out : undefined;
  if (o.format !== undefined && out === undefined) throw new UsageError("--format needs --out FILE");
  if (o.force && out === undefined) throw new UsageError("--force needs --out FILE");
  const format = tableFormat(o.format, out);
  const rows = exactCounts(map, depth).levels[depth]!.survivors;
  if (format !== "raw" && rows > BigInt(CSV_ROW_GUARD) && !o.force) {
    throw new UsageError(`a ${format === "csv" ? "CSV" : "full Arrow"} table of ${group(rows)} rows is over the ${group(BigInt(CSV_ROW_GUARD))}-row guard: use --format raw, or --force`);
  }

  const file = out ? await AtomicFile.create(out) : null;
  try {
    const result = await withPool(workers, `sieve ${map.name} mod 2^${depth}`, (pool, onProgress) =>
      file ? writeTable(pool, map, depth, format, file, rows, onProgress) : runSieve(pool, { map, depth, mode: "survivors" }, { onProgress }),
    );
    if (file) {
      const sha256 = await file.commit();
      const manifest = tableManifest(map, depth, rows, format, { file: basename(file.path), bytes: file.bytes, sha256 }, { version: toolVersion(), kernelBuild: await kernelBuildId() });
      await writeFileAtomic(`${file.path}.json`, toExactJson(manifest, 2) + "\n");
    }
    process.stdout.write(o.json ? toExactJson(sieveJson(result)) + "\n" : sieveText(result, workers, file?.path));
  } catch (e) {
    await file?.abort();
    throw e;
  }
}

function tableFormat(v: string | boolean | undefined, out: string | undefined): TableFormat {
  if (v === undefined) return out?.endsWith(".csv") ? "csv" : out?.endsWith(".arrow") ? "arrow" : "raw";
  if (v === "raw" || v === "csv" || v === "arrow") return v;
  throw new UsageError(`--format must be raw, csv or arrow, got "${String(v)}"`);
}

/** Enumerates (once per memory pass) and streams the sorted table into `file`. */
async function writeTable(
  pool: KernelPool, map: CollatzMap, depth: number, format: TableFormat, file: AtomicFile, rows: bigint,
  onProgress: (done: number, total: number) => void,
): Promise<SieveResult> {
  if (format !== "raw") {
    const collected: CsvRow[] = [];
    const result = await runSieve(pool, { map, depth, mode: "survivors", onLeaves: (c) => collectRows(collected, c) }, { onProgress });
    if (format === "arrow") await file.write(classTableArrow(collected, depth));
    else for (const line of csvLines(collected)) await file.write(line);
    return result;
  }
  const plan = passPlan(depth, rows);
  const buckets = 1 << plan.bucketBits;
  let first: SieveResult | null = null;
  let written = 0n;
  for (let p = 0; p < plan.passes; p++) {
    const from = Math.floor((p * buckets) / plan.passes);
    const to = Math.floor(((p + 1) * buckets) / plan.passes);
    const sorter = new ResidueSorter(depth, plan.bucketBits, from, to);
    const result = await runSieve(pool, { map, depth, mode: "survivors", onLeaves: (c) => sorter.add(c), residuesOnly: true }, {
      onProgress: (done, total) => onProgress(p * total + done, plan.passes * total),
    });
    first ??= result;
    for (const part of sorter.sorted()) await file.write(new Uint8Array(part.buffer, part.byteOffset, part.byteLength));
    written += BigInt(sorter.count);
  }
  if (written !== rows) throw new Error(`internal error: wrote ${written} residues, the exact counter says ${rows}`);
  return first!;
}

function sieveText(r: SieveResult, workers: number, out?: string): string {
  const lines = [
    `sieve of ${r.map.name} mod 2^${r.depth}: a class is cut when its coefficient q^m/2^j drops below 1`,
    "(depth = steps of T; std steps = the same stopping time with odd steps counted twice)",
    "",
    levelTable(r.map, r.levels),
    "",
    `survivors mod 2^${r.depth}: ${group(r.levels[r.depth]!.survivors)}`,
    `exceptions (positive members that do not descend at their class's stopping depth): ${group(r.exceptionCount)}`,
    ...r.exceptions.slice(0, 50).map((e) => `  n = ${e.n}   class ${e.residue} mod 2^${e.classDepth}`),
    ...(r.exceptionCount > 50n ? [`  ... ${group(r.exceptionCount - 50n)} more (use --json for the list)`] : []),
    `nodes visited: ${group(r.nodes)} in ${r.seconds.toFixed(2)} s (${workers} worker${workers === 1 ? "" : "s"})`,
    ...(out ? [`class table: ${out} (manifest ${out}.json)`] : []),
    "",
  ];
  return lines.join("\n");
}
