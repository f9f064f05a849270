// glidepath cycles: every integer cycle of period <= K, complete by construction.
import type { Command } from "commander";
import { cycleJob, MAX_CYCLE_PERIOD, searchCycles } from "../jobs/cycles/cycles.js";
import type { CycleParams, CycleSearchResult } from "../jobs/cycles/cycles.js";
import type { DataFile, ToolStamp } from "../outputs/manifest.js";
import type { AtomicFile } from "../node/files.js";
import type { BatchJob } from "./batch.js";
import { cyclesArrow } from "../outputs/arrow.js";
import { group, plural } from "../outputs/format.js";
import { toExactJson } from "../core/json.js";
import { manifest } from "../outputs/manifest.js";
import { cyclesJson } from "../outputs/summary.js";
import { withManifestOutput } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, outputOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { confirmOutput, print } from "./print.js";

interface CyclesOptions extends RawOptions {
  readonly maxPeriod?: string;
}

function cyclesOptions(cmd: Command): Command {
  return cmd.option("--max-period <K>", `largest period in steps of T: 1 to ${MAX_CYCLE_PERIOD}, within the 128-bit range`);
}

function cyclesParams(o: CyclesOptions): CycleParams {
  return { map: mapOption(o.map), maxPeriod: intOption("max-period", o.maxPeriod, 1, MAX_CYCLE_PERIOD) };
}

async function writeCycles(file: AtomicFile | null, r: CycleSearchResult): Promise<CycleSearchResult> {
  await file?.write(cyclesArrow(r));
  return r;
}

const cyclesManifest = (r: CycleSearchResult, data: DataFile, stamp: ToolStamp) =>
  manifest("glidepath cycles", r.map, "arrow", data, stamp, { maxPeriod: r.maxPeriod, rows: r.cycles.length });

/** The cycle search on a cluster; merge --out writes its Arrow list. */
export const cyclesBatch: BatchJob<CycleParams, CycleSearchResult> = {
  job: cycleJob,
  options: cyclesOptions,
  params: cyclesParams,
  json: cyclesJson,
  out: {
    formats: ["arrow"],
    what: "the cycles (arrow)",
    async write(_pool, result, out, stamp) {
      await withManifestOutput(
        out.path,
        (file) => writeCycles(file, result),
        (r, data) => cyclesManifest(r, data, stamp),
      );
    },
  },
};

export function cyclesCommand(program: Command): Command {
  return cyclesOptions(
    jobCommand(program, "cycles", "every integer cycle (positive and negative) of period <= K, complete by construction"),
  )
    .option("--out <FILE>", "write the cycles as an Arrow file, with FILE.json beside it")
    .option("--format <arrow>", "output format (arrow)")
    .action((o: CyclesOptions) => cycles(o));
}

async function cycles(o: CyclesOptions): Promise<void> {
  const { map, maxPeriod } = cyclesParams(o);
  const workers = workersOption(o.workers);
  const out = outputOption(o, ["arrow"], "arrow");
  const stamp = await toolStamp();
  const r = await withPool(workers, `cycles ${map.name} <= ${maxPeriod}`, (pool, onProgress) =>
    withManifestOutput(
      out?.path,
      async (file) => writeCycles(file, await searchCycles(pool, map, maxPeriod, { onProgress })),
      (r, data) => cyclesManifest(r, data, stamp),
    ),
  );
  print(o.json ? `${toExactJson(cyclesJson(r))}\n` : cyclesText(r, workers));
  if (out) confirmOutput(o.json, `${plural(r.cycles.length, "cycle")} (arrow)`, out.path);
}

function cyclesText(r: CycleSearchResult, workers: number): string {
  const pos = r.cycles.filter((c) => c.representative > 0n);
  const neg = r.cycles.filter((c) => c.representative < 0n);
  const row = (c: CycleSearchResult["cycles"][number]) => {
    const els = c.elements.length <= 12 ? c.elements.join(" ") : `${c.elements.slice(0, 12).join(" ")} ... (${c.elements.length})`;
    return (
      `  ${String(c.representative).padStart(10)}  period ${String(c.period).padStart(2)}  odd ${String(c.odd).padStart(2)}  max ` +
      `${c.max}  elements: ${els}`
    );
  };
  return [
    `integer cycles of ${r.map.name} with period <= ${r.maxPeriod} (complete: every node of the full tree tested, ` +
      `${group(r.nodes)} nodes, ${r.width}-bit, ${r.seconds.toFixed(2)} s, ${plural(workers, "worker")})`,
    `positive cycles: ${pos.length} (listed by minimum)`,
    ...pos.map(row),
    `negative cycles: ${neg.length} (listed by the element of least |x|)`,
    ...neg.map(row),
    "",
  ].join("\n");
}
