// glidepath steps: the k-step acceleration table (m, b) for every residue mod 2^k.
import type { Command } from "commander";
import { UsageError } from "../core/errors.js";
import { MAX_STEP_DEPTH, stepTable, stepTableRaw } from "../jobs/steps.js";
import { stepTableArrow } from "../outputs/arrow.js";
import { group } from "../outputs/format.js";
import { stepManifest } from "../outputs/manifest.js";
import { withManifestOutput } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, outputOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { confirmOutput } from "./print.js";

export function stepsCommand(program: Command): Command {
  return jobCommand(program, "steps", "the table (m, b) with T^k(a + 2^k x) = q^m x + b for every a mod 2^k, for verification kernels", {
    json: false,
  })
    .option("--depth <k>", `steps per table lookup: 1 to ${MAX_STEP_DEPTH}`)
    .option("--out <FILE>", "the table file (required), with FILE.json beside it")
    .option("--format <raw|arrow>", "table format (default: from the name's ending, else raw)")
    .action((o: RawOptions) => steps(o));
}

async function steps(o: RawOptions): Promise<void> {
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 1, MAX_STEP_DEPTH);
  const workers = workersOption(o.workers);
  const out = outputOption<"raw" | "arrow">(o, ["raw", "arrow"], "raw");
  if (!out) throw new UsageError("--out FILE is required");
  const stamp = await toolStamp();
  await withPool(workers, `steps ${map.name} 2^${depth}`, (pool, onProgress) =>
    withManifestOutput(
      out.path,
      async (file) => {
        const t = await stepTable(pool, map, depth, { onProgress });
        for (const part of out.format === "arrow" ? [stepTableArrow(t)] : stepTableRaw(t)) await file!.write(part);
      },
      (_r, data) => stepManifest(map, depth, out.format, data, stamp),
    ),
  );
  confirmOutput(false, `step table of ${map.name} for k = ${depth}: ${group(2 ** depth)} residues (${out.format})`, out.path);
}
