// glidepath batch | shard | batch-status | merge: any long job as shards of the plan layer, run as a
// Slurm job array (or here, one after another, with --local), checked and merged into exactly the
// result of the one-machine command.
import { join } from "node:path";
import type { Command } from "commander";
import { UsageError } from "../core/errors.js";
import { makePlan } from "../engine/plan.js";
import type { JobKind, PartBase, Plan } from "../engine/plan.js";
import { group, plural } from "../outputs/format.js";
import { toExactJson } from "../core/json.js";
import { checkParts, inspectParts } from "../node/cluster/parts.js";
import { checkShard, createRun, PARTS, readRun, SCRIPT_FILE } from "../node/cluster/rundir.js";
import type { RunDir } from "../node/cluster/rundir.js";
import { runShardToDisk } from "../node/cluster/shard.js";
import { arrayList } from "../node/cluster/slurm.js";
import { kernelBuildId, toolStamp, withPool } from "../node/kernel.js";
import { censusBatch } from "./census.js";
import { conjugacyBatch } from "./conjugacy.js";
import { cyclesBatch } from "./cycles.js";
import { intOption, outputOption, workersOption } from "./options.js";
import type { FileFormat, OutputChoice, RawOptions } from "./options.js";
import { print } from "./print.js";
import { sieveBatch } from "./sieve.js";
import { verifyBatch } from "./verify.js";
import { treeBatch } from "./tree.js";
import type { BatchJob } from "./batch.js";

/** A job of the table, whatever its parameter and result types (the commands pass them through unread). */
type AnyBatchJob = BatchJob<unknown, unknown>;

const JOBS: Record<string, AnyBatchJob> = {
  sieve: sieveBatch,
  census: censusBatch,
  cycles: cyclesBatch,
  conjugacy: conjugacyBatch,
  verify: verifyBatch,
  tree: treeBatch,
};

function batchJob(name: string): AnyBatchJob {
  const j = JOBS[name];
  if (!j) throw new UsageError(`the plan names an unknown job "${name}"`);
  return j;
}

const jobOf = (name: string) => batchJob(name).job as JobKind<unknown, PartBase, unknown>;

interface BatchOptions extends RawOptions {
  readonly shards?: string;
  readonly dir?: string;
  readonly cpusPerTask?: string;
  readonly partition?: string;
  readonly local?: boolean;
}

export const MAX_SHARDS = 100_000;

export function clusterCommands(program: Command): Command {
  const batch = program
    .command("batch")
    .description("plan a long job as N shards in RUN (plan.json, job.sbatch: a Slurm job array); --local runs them here")
    .helpCommand(false);
  for (const [name, spec] of Object.entries(JOBS)) {
    const cmd = batch
      .command(name)
      .description(`plan ${name} as shards (its options as for glidepath ${name})`)
      .option("--map <qx+r>", "the map", "3x+1");
    spec
      .options(cmd)
      .option("--shards <N>", `number of shards (Slurm array tasks): 1 to ${group(MAX_SHARDS)}`)
      .option("--dir <RUN>", "the run's folder (created; it must not hold another plan)")
      .option("--cpus-per-task <C>", "cores each task asks for (and the workers it runs)", "2")
      .option("--partition <P>", "the Slurm partition to ask for")
      .option("--local", "run every shard here, one after another, through the same files")
      .option("--workers <N>", "with --local: worker threads per shard (default: --cpus-per-task)")
      .action((o: BatchOptions) => planBatch(name, spec, o));
  }
  program
    .command("shard")
    .description("run shard I of RUN (what each Slurm array task runs) and write RUN/parts/I.*")
    .argument("<RUN>", "the run's folder")
    .argument("<I>", "the shard (0 to N-1)")
    .option("--workers <N>", "worker threads (default: $SLURM_CPUS_PER_TASK, else the available cores)")
    .action((dir: string, index: string, o: RawOptions) => shard(dir, index, o));
  program
    .command("batch-status")
    .description("which shards of RUN are done, failed (with their error) or missing, and the sbatch line that reruns the rest")
    .argument("<RUN>", "the run's folder")
    .option("--json", "print JSON")
    .action((dir: string, o: RawOptions) => status(dir, o));
  return program
    .command("merge")
    .description("check every part of RUN against the plan and merge them: the one-machine command's JSON, and its --out file")
    .argument("<RUN>", "the run's folder")
    .option("--out <FILE>", "write what the one-machine command's --out writes (sieve: the class table, raw)")
    .option("--format <raw|arrow>", "output format (as the one-machine command)")
    .option("--workers <N>", "worker threads for the checks that rebuild tables (default: the available cores)")
    .action((dir: string, o: RawOptions) => merge(dir, o));
}

async function planBatch(name: string, spec: AnyBatchJob, o: BatchOptions): Promise<void> {
  const params = spec.params(o);
  const shards = intOption("shards", o.shards, 1, MAX_SHARDS);
  if (o.dir === undefined) throw new UsageError("--dir RUN is required");
  const cpus = intOption("cpus-per-task", o.cpusPerTask, 1, 1024);
  if (o.workers !== undefined && !o.local) throw new UsageError("--workers is for --local (array tasks run --cpus-per-task workers)");
  if (o.partition !== undefined && !/^[\w.,-]+$/.test(o.partition))
    throw new UsageError(`--partition "${o.partition}" is not a partition name`);
  const workers = o.workers === undefined ? cpus : workersOption(o.workers);
  const dir = o.dir;
  const plan = await withPool(workers, `plan ${name}`, (pool) => makePlan(pool, spec.job, params, shards, shards * cpus));
  const estimate = spec.job.estimate(plan, cpus);
  if (plan.shards.length < shards)
    process.stderr.write(
      `asked for ${plural(shards, "shard")}, but only ${plan.shards.length} would have work (${plural(plan.tasks, "kernel task")}): planned ${plan.shards.length}\n`,
    );
  await createRun(dir, spec.job, plan, { cpusPerTask: cpus, partition: o.partition, estimate });
  const head =
    `planned ${spec.job.describe(plan.params)} as ${plural(plan.shards.length, "shard")} of ${plural(plan.tasks, "kernel task")} ` +
    `in ${dir} (plan ${plan.hash.slice(0, 16)})\n` +
    `each task: ${cpus} cores, at most ${estimate.memoryMiB} MiB, about ${Math.ceil(estimate.seconds)} s of work (the script asks for more)\n`;
  if (!o.local) {
    print(`${head}submit: sbatch ${dir}/${SCRIPT_FILE}\nthen: glidepath batch-status ${dir}; glidepath merge ${dir}\n`);
    return;
  }
  print(head);
  const run = await readRun(dir, jobOf);
  await withPool(workers, `${name} shards`, async (pool, onProgress) => {
    for (let i = 0; i < plan.shards.length; i++) {
      const r = await runShardToDisk(run, spec.job, i, pool, { table: spec.table });
      onProgress(i + 1, plan.shards.length);
      process.stderr.write(`shard ${i}: ${r.seconds.toFixed(2)} s\n`);
    }
  });
  print(`ran ${plural(plan.shards.length, "shard")} here; next: glidepath merge ${dir}\n`);
}

async function shard(dir: string, index: string, o: RawOptions): Promise<void> {
  const run = await readRun(dir, jobOf);
  const i = checkShard(run, index);
  const slurm = process.env.SLURM_CPUS_PER_TASK;
  const workers = o.workers === undefined && slurm && /^\d+$/.test(slurm) ? Number(slurm) : workersOption(o.workers);
  const spec = batchJob(run.plan.job);
  const r = await withPool(workers, `shard ${i}`, (pool, onProgress) =>
    runShardToDisk(run, spec.job, i, pool, { onProgress, table: spec.table }),
  );
  print(
    `shard ${i} of ${dir}: done in ${r.seconds.toFixed(2)} s on ${plural(workers, "worker")} (${plural(r.files.length, "file")} beside its part)\n`,
  );
}

/**
 * What is done, failed, missing or damaged, with the same checks as merge (digests, hashes, plan);
 * the lines that rerun the rest on Slurm and here; exit 1 while the run is not complete and sound.
 */
async function status(dir: string, o: RawOptions): Promise<void> {
  const run = await readRun(dir, jobOf);
  const shards = run.plan.shards.length;
  const inspected = await inspectParts(run, await kernelBuildId());
  const { failed, missing } = inspected;
  const rerun = [...failed.map((f) => f.shard), ...missing, ...inspected.bad].sort((a, b) => a - b);
  const complete = rerun.length === 0 && inspected.problems.length === 0;
  const slurmLine = rerun.length > 0 ? `sbatch --array=${arrayList(rerun)} ${dir}/${SCRIPT_FILE}` : null;
  const localLine =
    rerun.length === 0
      ? null
      : rerun.length === 1
        ? `glidepath shard ${dir} ${rerun[0]}`
        : `for i in ${rerun.join(" ")}; do glidepath shard ${dir} $i; done`;
  const spec = batchJob(run.plan.job);
  const checkLine = complete && spec.check ? checkCommand(dir, spec) : null;
  if (o.json) {
    print(
      `${toExactJson({
        shards,
        done: inspected.parts.length,
        failed,
        missing,
        damaged: inspected.bad,
        extra: inspected.extra,
        problems: inspected.problems,
        complete,
        rerun: slurmLine,
        rerunHere: localLine,
        check: checkLine,
      })}\n`,
    );
  } else {
    print(
      [
        `${spec.job.describe(run.plan.params)}: ${plural(shards, "shard")} (plan ${run.plan.hash.slice(0, 16)})`,
        `done ${inspected.parts.length}, failed ${failed.length}, missing ${missing.length}, damaged ${inspected.bad.length}` +
          (inspected.extra.length > 0 ? `, not in the plan ${inspected.extra.length}` : ""),
        ...failed.map((f) => `  failed: shard ${f.shard}: ${f.error}`),
        ...(missing.length > 0 ? [`  missing: ${arrayList(missing)} (not run yet, running, or killed before it could say)`] : []),
        ...inspected.damaged.map((p) => `  damaged: ${p}`),
        ...(slurmLine
          ? [`rerun what is not done: ${slurmLine}`, `  or here: ${localLine}`]
          : complete
            ? completeLines(dir, spec)
            : [`not complete: remove the parts not in the plan: rm ${inspected.extra.map((name) => join(dir, PARTS, name)).join(" ")}`]),
        "",
      ].join("\n"),
    );
  }
  if (!complete)
    throw new Error(
      `${dir} is not complete: ${[
        ...(rerun.length > 0 ? [`${plural(rerun.length, "shard")} to rerun`] : []),
        ...(inspected.extra.length > 0 ? [`${plural(inspected.extra.length, "file")} not in the plan to remove`] : []),
      ].join(", ")}`,
    ); // exit 1, after the report
}

/** `merge --out` and the check of what it writes, for a job that has a check (verify). */
function checkCommand(dir: string, spec: AnyBatchJob): string {
  const file = join(dir, spec.check!.file);
  return `glidepath merge ${dir} --out ${file}; ${spec.check!.command(file)}`;
}

/** What batch-status says of a complete run: the merge, and the check to run on what it writes. */
function completeLines(dir: string, spec: AnyBatchJob): string[] {
  if (!spec.check) return [`complete: glidepath merge ${dir}`];
  return [`complete: ${checkCommand(dir, spec)}`, `  (${PART_DIGEST_NOTE})`];
}

/** What the parts' checks prove, and what they do not: said wherever the check line is printed. */
const PART_DIGEST_NOTE =
  "a part's digest finds accidental damage, not a node that lies; the check runs the blocks again: --full all of them, --sample N some";

async function merge(dir: string, o: RawOptions): Promise<void> {
  const run: RunDir = await readRun(dir, jobOf);
  const spec = batchJob(run.plan.job);
  let out: OutputChoice<FileFormat> | null = null;
  if (o.out !== undefined || o.format !== undefined) {
    if (!spec.out) throw new UsageError(`merge of ${run.plan.job} writes no file: its JSON goes to stdout`);
    out = outputOption(o, spec.out.formats, spec.out.formats[0]!, spec.out.writes);
  }
  const stamp = await toolStamp();
  await withPool(workersOption(o.workers), `merge ${run.plan.job}`, async (pool) => {
    const parts = await checkParts<unknown, PartBase>(run, pool.build);
    const result = await spec.job.merge(
      pool,
      run.plan as Plan<unknown>,
      parts.map((p) => p.part),
    );
    if (out && spec.out)
      await spec.out.write(
        pool,
        result,
        out,
        stamp,
        parts.flatMap((p) => (p.table ? [p.table] : [])),
        {
          started: parts.map((p) => p.started).reduce((a, b) => (b < a ? b : a)),
          finished: parts.map((p) => p.finished).reduce((a, b) => (b > a ? b : a)),
        },
        run.plan.params,
      );
    print(`${toExactJson(spec.json(result, run.plan.params))}\n`);
    if (out) process.stderr.write(`wrote ${spec.out!.what} to ${out.path}\n`);
    if (spec.check)
      process.stderr.write(
        out
          ? `check it: ${spec.check.command(out.path)}\n  (${PART_DIGEST_NOTE})\n`
          : `to check it, write it and run the check: ${checkCommand(dir, spec)}\n  (${PART_DIGEST_NOTE})\n`,
      );
  });
}
