// A run folder on disk, for `batch`, `shard`, `batch-status` and `merge`: RUN/plan.json (the plan
// layer's plan, hashed), RUN/job.sbatch (slurm.ts), RUN/parts (shard.ts writes a shard's part there,
// parts.ts checks them) and RUN/logs (Slurm's output).
import { existsSync, statSync } from "node:fs";
import { mkdir, readFile } from "node:fs/promises";
import { dirname, join } from "node:path";
import { UsageError } from "../../core/errors.js";
import { packData, unpackData } from "../../core/json.js";
import { PLAN_KIND, planHash } from "../../engine/plan.js";
import type { JobKind, PartBase, Plan, ShardEstimate } from "../../engine/plan.js";
import { writeFileAtomic } from "../files.js";
import { toolVersion } from "../version.js";
import { LOGS, sbatchScript } from "./slurm.js";
import type { ScriptOptions } from "./slurm.js";

const PLAN_FILE = "plan.json";
export const SCRIPT_FILE = "job.sbatch";
export const PARTS = "parts";

export interface RunDir<P = unknown> {
  readonly dir: string;
  readonly plan: Plan<P>;
  readonly cpusPerTask: number;
  readonly estimate: ShardEstimate;
}

export interface RunDir<P = unknown> {
  readonly dir: string;
  readonly plan: Plan<P>;
  readonly cpusPerTask: number;
  readonly estimate: ShardEstimate;
}

function planJson(plan: Plan<unknown>, job: JobKind<unknown, PartBase, unknown>): unknown {
  // prefixes and weights as packed u64 arrays (compact); the parameters as the job encodes them
  const u64 = (xs: readonly bigint[] | null | undefined) => (xs ? BigUint64Array.from(xs) : null);
  return packData({ ...plan, params: job.codec.encode(plan.params), prefixes: u64(plan.prefixes), weights: u64(plan.weights) });
}

/**
 * Writes RUN/plan.json and RUN/job.sbatch (and the parts and logs folders). A folder that holds
 * another plan is refused; the same plan again is harmless.
 */
export async function createRun(
  dir: string,
  job: JobKind<unknown, PartBase, unknown>,
  plan: Plan<unknown>,
  o: ScriptOptions,
): Promise<void> {
  const planPath = join(dir, PLAN_FILE);
  if (existsSync(planPath)) {
    const old = await readRun(dir, () => job).catch(() => null);
    if (!old || old.plan.hash !== plan.hash)
      throw new UsageError(`${dir} already holds another plan: choose a new --dir, or remove ${planPath}`);
  }
  // one level at a time, in a folder that exists (a recursive mkdir can spin forever on /proc)
  for (const d of [dir, join(dir, PARTS), join(dir, LOGS)]) {
    try {
      await mkdir(d);
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      if (code === "EEXIST" && statSync(d).isDirectory()) continue;
      const parent = statSync(dirname(d), { throwIfNoEntry: false });
      const why =
        code === "EEXIST"
          ? "a file of that name is in the way"
          : !parent?.isDirectory()
            ? `${dirname(d)} is not a folder`
            : (code ?? String(e));
      throw new UsageError(`cannot create ${d}: ${why}`);
    }
  }
  const stored = {
    kind: PLAN_KIND,
    plan: planJson(plan, job),
    tool: toolVersion(),
    created: new Date().toISOString(),
    cpusPerTask: o.cpusPerTask,
    estimate: o.estimate,
  };
  await writeFileAtomic(join(dir, SCRIPT_FILE), sbatchScript(dir, plan, job.describe(plan.params), o));
  await writeFileAtomic(planPath, `${JSON.stringify(stored, null, 1)}\n`);
}

/** Reads RUN/plan.json back, checking its hash: an edited plan is refused. */
export async function readRun(dir: string, jobOf: (name: string) => JobKind<unknown, PartBase, unknown>): Promise<RunDir> {
  const path = join(dir, PLAN_FILE);
  let raw: Record<string, unknown>;
  try {
    raw = JSON.parse(await readFile(path, "utf8")) as Record<string, unknown>;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(code ? `${dir} is not a glidepath run: cannot read ${path} (${code})` : `${path} is not JSON`);
  }
  if (raw.kind !== PLAN_KIND) throw new UsageError(`${path} is not a glidepath plan`);
  let plan: Plan<unknown>;
  let job: JobKind<unknown, PartBase, unknown>;
  try {
    ({ plan, job } = decodePlan(raw, jobOf));
  } catch (e) {
    throw new UsageError(`${path} is damaged: ${e instanceof Error ? e.message : String(e)}`);
  }
  const { hash: _stored, ...body } = plan;
  if ((await planHash(job, body)) !== plan.hash) throw new UsageError(`${path} was changed after it was written: its hash does not match`);
  return { dir, plan, cpusPerTask: Number(raw.cpusPerTask), estimate: storedEstimate(raw.estimate) };
}

/** The estimate plan.json keeps (seconds and MiB a shard; NaN where a field is not a number, as Number() reads it). */
function storedEstimate(x: unknown): ShardEstimate {
  const e = (x ?? {}) as Record<string, unknown>;
  return { seconds: Number(e.seconds), memoryMiB: Number(e.memoryMiB) };
}

/** The plan of a stored plan.json (throws on a malformed one). */
function decodePlan(
  raw: Record<string, unknown>,
  jobOf: (name: string) => JobKind<unknown, PartBase, unknown>,
): { plan: Plan<unknown>; job: JobKind<unknown, PartBase, unknown> } {
  const p = unpackData(raw.plan) as Record<string, unknown>;
  if (p === null || typeof p !== "object" || typeof p.job !== "string" || !Array.isArray(p.shards) || typeof p.params !== "object")
    throw new Error("it does not hold a plan (job, params, shards)");
  const job = jobOf(String(p.job));
  const list = (xs: unknown) => (xs instanceof BigUint64Array ? Array.from(xs) : null);
  const plan: Plan<unknown> = {
    kind: PLAN_KIND,
    job: job.name,
    params: job.codec.decode(p.params as Record<string, unknown>),
    prefixBits: Number(p.prefixBits),
    prefixes: list(p.prefixes),
    tasks: Number(p.tasks),
    weights: list(p.weights),
    shards: p.shards as Plan<unknown>["shards"],
    kernelBuild: String(p.kernelBuild),
    hash: String(p.hash),
  };
  return { plan, job };
}

export const partPath = (dir: string, shard: number, suffix: string) => join(dir, PARTS, `${shard}.${suffix}`);

/** The shard numbers a command line names, checked against the plan. */
export function checkShard(run: RunDir, text: string): number {
  if (!/^\d+$/.test(text)) throw new UsageError(`the shard must be a whole number from 0 to ${run.plan.shards.length - 1}, got "${text}"`);
  const i = Number(text);
  if (i >= run.plan.shards.length) throw new UsageError(`shard ${i} is not in the plan of ${run.dir} (0 to ${run.plan.shards.length - 1})`);
  return i;
}
