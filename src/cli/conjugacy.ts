// glidepath conjugacy: the cycle structure of a -> Q_K(a), the first K parities read as a number.
import type { Command } from "commander";
import { conjugacy, conjugacyJob, MAX_CONJUGACY_DEPTH } from "../jobs/conjugacy.js";
import type { ConjugacyParams, ConjugacyResult } from "../jobs/conjugacy.js";
import type { BatchJob } from "./batch.js";
import { toExactJson } from "../core/json.js";
import { conjugacyJson } from "../outputs/summary.js";
import { withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print } from "./print.js";

function conjugacyOptions(cmd: Command): Command {
  return cmd.option("--depth <K>", `depth: 1 to ${MAX_CONJUGACY_DEPTH}`);
}

function conjugacyParams(o: RawOptions): ConjugacyParams {
  return { map: mapOption(o.map), depth: intOption("depth", o.depth, 1, MAX_CONJUGACY_DEPTH) };
}

/** The conjugacy structure on a cluster (its parts are the (a, Q(a)) pairs of their residues). */
export const conjugacyBatch: BatchJob<ConjugacyParams, ConjugacyResult> = {
  job: conjugacyJob,
  options: conjugacyOptions,
  params: conjugacyParams,
  json: conjugacyJson,
};

export function conjugacyCommand(program: Command): Command {
  return conjugacyOptions(
    jobCommand(program, "conjugacy", "cycle structure of the permutation a -> Q_K(a) (the first K parities as a number)"),
  ).action((o: RawOptions) => run(o));
}

async function run(o: RawOptions): Promise<void> {
  const { map, depth } = conjugacyParams(o);
  const workers = workersOption(o.workers);
  const r = await withPool(workers, `conjugacy ${map.name} 2^${depth}`, (pool, onProgress) => conjugacy(pool, map, depth, { onProgress }));
  if (o.json) return print(`${toExactJson(conjugacyJson(r))}\n`);
  print(
    [
      `conjugacy permutation a -> Q_${depth}(a) (first ${depth} parities read as a ${depth}-bit number, first step lowest) of ` +
        `${map.name} on the residues mod 2^${depth}`,
      `cycles: ${r.cycles}, fixed points: ${r.fixedPoints}, ${r.seconds.toFixed(2)} s`,
      "cycle lengths (length: how many cycles):",
      ...r.lengths.map((l) => `  ${String(l.length).padStart(9)}: ${l.count}`),
      "",
    ].join("\n"),
  );
}
