// The plan layer, one for every job: a job's parameters split into shards of kernel tasks, each shard
// a plain serialisable description that any process can run, its result a serialisable part, and one
// merge per job whose output equals the single-process run's. The same plan serves the worker pool
// (one shard for the whole run), `batch --local` and a Slurm job array (one shard per array task).
import { exactCounts } from "../core/exact.js";
import type { CollatzMap } from "../core/map.js";
import type { ParamsCodec } from "./codec.js";
import type { Mode } from "./messages.js";
import type { KernelPool, RunOptions } from "./pool.js";

export type JobName = "sieve" | "census" | "cycles" | "conjugacy" | "verify" | "tree";

/** Tasks first..end-1 of a plan (end excluded): one shard. */
export interface TaskRange {
  readonly first: number;
  readonly end: number;
}

/** How a job's work is cut into kernel tasks. */
export interface TaskLayout {
  /** Prefix depth of the tasks (0 where the tasks are not prefixes, as for verification blocks). */
  readonly prefixBits: number;
  /** Task t is prefixes[t] (the live prefixes of a sieve), or prefix t when null. */
  readonly prefixes: readonly bigint[] | null;
  readonly tasks: number;
  /** Exact size of each task (a sieve's leaves below each prefix), when known: shards balance it. */
  readonly weights?: readonly bigint[] | null;
}

/** A job split into shards: what plan.json holds. Plain data; `hash` names all of it but itself. */
export interface Plan<P> extends TaskLayout {
  readonly kind: typeof PLAN_KIND;
  readonly job: JobName;
  readonly params: P;
  readonly shards: readonly TaskRange[];
  /** The kernel build that made the plan: parts of another build are refused. */
  readonly kernelBuild: string;
  readonly hash: string;
}

export const PLAN_KIND = "glidepath plan";

/** Where a shard streams its bulk output (a sieve's sorted table), when the caller asks for it. */
export interface ByteSink {
  write(bytes: Uint8Array): Promise<void>;
}

export interface ShardOptions extends RunOptions {
  readonly out?: ByteSink;
}

/** A shard's part always says how long it ran. */
export interface PartBase {
  readonly seconds: number;
}

/**
 * One job of the plan layer: how it lays out its tasks, runs one shard, and merges the parts.
 * `merge` sees the parts in shard order; it is associative (sums, unions, sweeps in range order).
 */
export interface JobKind<P, Part extends PartBase, R, O extends ShardOptions = ShardOptions> {
  readonly name: JobName;
  /** Checks the parameters (one clear error) and cuts the work for `parallelism` workers in all. */
  layout(pool: KernelPool, params: P, parallelism: number): Promise<TaskLayout>;
  runShard(pool: KernelPool, plan: Plan<P>, shard: number, options?: O): Promise<Part>;
  merge(pool: KernelPool, plan: Plan<P>, parts: readonly Part[]): Promise<R>;
  /**
   * The parameters as plain JSON values (bigints allowed) and back, field by field: what plan.json
   * stores and what the plan hash names. Its field table has every key of P (codec.ts).
   */
  readonly codec: ParamsCodec<P>;
  /** One line naming the run, for logs and status (e.g. "sieve 3x+1 mod 2^30"). */
  describe(params: P): string;
  /** What the largest shard needs with `cpus` workers (conservative: for a scheduler's limits). */
  estimate(plan: Plan<P>, cpus: number): ShardEstimate;
}

/** Time and memory of one shard, rounded up. */
export interface ShardEstimate {
  readonly seconds: number;
  readonly memoryMiB: number;
}

/** Memory every shard process holds: Node, the kernel in each worker, and its buffers. */
const BASE_MIB = 256;
const WORKER_MIB = 96;

/**
 * An estimate from the largest shard's work: `units` of work at `rate` units a second per worker,
 * and `extraBytes` held at once beside the process and its workers.
 * @example shardEstimate(2n ** 30n, 2e7, 2, 0) // { seconds: 27, memoryMiB: 448 }
 */
export function shardEstimate(units: bigint, rate: number, cpus: number, extraBytes: number): ShardEstimate {
  return {
    seconds: Math.ceil(Number(units) / (rate * cpus)),
    memoryMiB: BASE_MIB + WORKER_MIB * cpus + Math.ceil(extraBytes / 2 ** 20),
  };
}

/** The largest of a value over the shards of a plan (task counts, or weights where known). */
export function largestShare(plan: TaskLayout & { shards: readonly TaskRange[] }): { tasks: number; weight: bigint } {
  let tasks = 0;
  let weight = 0n;
  for (const r of plan.shards) {
    tasks = Math.max(tasks, r.end - r.first);
    const w = (plan.weights ?? []).slice(r.first, r.end).reduce((s, x) => s + x, 0n);
    if (w > weight) weight = w;
  }
  return { tasks, weight };
}

/** sha256 as hex (Web Crypto: the same in Node and the browser). */
export async function sha256Hex(bytes: Uint8Array | ArrayBuffer | string): Promise<string> {
  const data = typeof bytes === "string" ? new TextEncoder().encode(bytes) : bytes;
  const d = await crypto.subtle.digest("SHA-256", data as Uint8Array<ArrayBuffer>);
  return Array.from(new Uint8Array(d), (x) => x.toString(16).padStart(2, "0")).join("");
}

/** Canonical text of a plan's content (everything but its hash), for hashing. */
function planText(p: Omit<Plan<unknown>, "hash">, encodedParams: Record<string, unknown>): string {
  const big = (v: unknown): unknown => (typeof v === "bigint" ? `${v}n` : v);
  return JSON.stringify(
    {
      kind: p.kind,
      job: p.job,
      params: encodedParams,
      prefixBits: p.prefixBits,
      prefixes: p.prefixes,
      tasks: p.tasks,
      weights: p.weights ?? null,
      shards: p.shards,
      kernelBuild: p.kernelBuild,
    },
    (_k, v: unknown) => big(v),
  );
}

/**
 * The hash a plan must carry (checked when a stored plan is read back), over the parameters as the
 * job's codec stores them: what a shard decodes is what the hash names.
 */
export function planHash<P>(job: JobKind<P, PartBase, unknown>, p: Omit<Plan<P>, "hash">): Promise<string> {
  return sha256Hex(planText(p, job.codec.encode(p.params)));
}

/**
 * Tasks 0..tasks-1 cut into `shards` contiguous ranges: of nearly equal total weight when weights
 * are given (boundary i is the first task whose preceding weights reach i/shards of the total),
 * else of sizes that differ by at most one. Shards that would get no work (no task, or tasks of
 * weight 0) are not made: fewer shards come back.
 * @example splitTasks(4, 2) // [{ first: 0, end: 2 }, { first: 2, end: 4 }]
 */
export function splitTasks(tasks: number, shards: number, weights?: readonly bigint[] | null): TaskRange[] {
  const bounds = [0];
  if (weights) {
    const total = weights.reduce((s, w) => s + w, 0n);
    let t = 0;
    let acc = 0n;
    for (let i = 1; i < shards; i++) {
      while (t < tasks && acc * BigInt(shards) < total * BigInt(i)) acc += weights[t++]!;
      bounds.push(t);
    }
  } else for (let i = 1; i < shards; i++) bounds.push(Math.floor((i * tasks) / shards));
  bounds.push(tasks);
  // a shard with no task, or with tasks of no weight, would run for nothing: its tasks join a neighbour
  const ranges = Array.from({ length: shards }, (_, i) => ({ first: bounds[i]!, end: bounds[i + 1]! }));
  const weightOf = (r: TaskRange) => (weights ? weights.slice(r.first, r.end).reduce((s, w) => s + w, 0n) : BigInt(r.end - r.first));
  const kept: TaskRange[] = [];
  for (const r of ranges) {
    if (r.end === r.first) continue;
    const last = kept.at(-1);
    if (last && (weightOf(r) === 0n || weightOf(last) === 0n)) kept[kept.length - 1] = { first: last.first, end: r.end };
    else kept.push(r);
  }
  return kept.length > 0 ? kept : [{ first: 0, end: tasks }];
}

/**
 * Plans a job in `shards` shards for `parallelism` workers in all (default: the pool's).
 * @example const plan = await makePlan(pool, sieveJob, { map, depth: 30, mode: "survivors" }, 16, 32);
 */
export async function makePlan<P>(
  pool: KernelPool,
  job: JobKind<P, PartBase, unknown>,
  params: P,
  shards: number,
  parallelism = pool.size * shards,
): Promise<Plan<P>> {
  if (!Number.isInteger(shards) || shards < 1) throw new RangeError("shards must be a positive integer");
  const layout = await job.layout(pool, params, parallelism);
  const body = {
    kind: PLAN_KIND,
    job: job.name,
    params,
    prefixBits: layout.prefixBits,
    prefixes: layout.prefixes,
    tasks: layout.tasks,
    weights: layout.weights ?? null,
    shards: splitTasks(layout.tasks, shards, layout.weights),
    kernelBuild: pool.build,
  } as const;
  return { ...body, hash: await planHash(job, body) };
}

/**
 * The whole job on this pool: one shard, merged, exactly as a cluster's parts would be.
 * @example const r = await runWhole(pool, censusJob, { map: parseMap("3x+1"), depth: 20 });
 */
export async function runWhole<P, Part extends PartBase, R, O extends ShardOptions>(
  pool: KernelPool,
  job: JobKind<P, Part, R, O>,
  params: P,
  options: O = {} as O,
): Promise<R> {
  const plan = await makePlan(pool, job, params, 1, pool.size);
  const part = await job.runShard(pool, plan, 0, options);
  return job.merge(pool, plan, [part]);
}

/** The prefixes (as task values) of a shard. */
export function shardPrefixes(plan: TaskLayout & { shards: readonly TaskRange[] }, shard: number): bigint[] {
  const range = plan.shards[shard];
  if (!range) throw new RangeError(`shard ${shard} is not in the plan (0 to ${plan.shards.length - 1})`);
  const out: bigint[] = [];
  for (let t = range.first; t < range.end; t++) out.push(plan.prefixes ? plan.prefixes[t]! : BigInt(t));
  return out;
}

/** Live classes per task and nodes per task that the layout aims below. */
const TASK_NODES = 2n ** 22n;
const TASK_LEAVES = 2n ** 18n;
const MAX_PREFIX_BITS = 20;

/**
 * The prefix depth d of a job's tasks: the least d with at least 16 live prefixes per worker and
 * tasks of bounded size, using the exact counter's survivor counts (full mode: 2^d prefixes).
 */
export function choosePrefixBits(
  map: CollatzMap,
  depth: number,
  mode: Mode,
  workers: number,
  withLeaves: boolean,
  taskNodes = TASK_NODES,
): number {
  const levels = exactCounts(map, depth).levels;
  const live = (d: number) => (mode === "full" ? 1n << BigInt(d) : levels[d]!.survivors);
  const nodes = mode === "full" ? (1n << BigInt(depth + 1)) - 1n : levels.reduce((s, l) => s + l.survivors, 0n);
  const leaves = live(depth);
  const top = Math.min(depth, MAX_PREFIX_BITS);
  for (let d = 0; d < top; d++) {
    const n = live(d);
    if (n === 0n) return d;
    if (n >= BigInt(16 * workers) && nodes / n <= taskNodes && (!withLeaves || leaves / n <= TASK_LEAVES)) return d;
  }
  return top;
}
