// Convergence verification of a range [from, to): every n is shown to reach a value below n (by
// induction over n this leaves no divergent trajectory and no new cycle in the range, given the
// numbers below it: the method of the published verification runs, common practice), or is found on
// a cycle, or is listed as unresolved past a step cap. The plan cuts the range into blocks
// (plan.ts); each block runs in a worker and comes back finished (block.ts); the blocks merge in
// order (merge.ts). This file is the run: the scheduling of blocks, the preimage skip's fallback,
// and the job of the plan layer.
import { exactCounts } from "../../core/exact.js";
import type { VerifyBlock } from "./messages.js";
import { bigintField, boolField, intField, mapField, optional, paramsCodec } from "../../engine/codec.js";
import { shardEstimate } from "../../engine/plan.js";
import type { JobKind, PartBase, ShardOptions } from "../../engine/plan.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import type { BlockEntry } from "./block.js";
import { mergeVerify } from "./merge.js";
import type { VerifyResult } from "./merge.js";
import { blockSize, planVerify } from "./plan.js";
import type { BlockSpec, VerifyPlan, VerifyRequest } from "./plan.js";
import { exceptionsIn, verifyTables } from "./tables.js";
import type { VerifyTableData } from "./tables.js";
import { knownField } from "./certificate.js";
import type { KnownRecords } from "./known.js";
import type { JobApi } from "../../engine/worker.js";
import type { verifyHandlers } from "./kernel.js";

/** Where a run stands after a block: the request and plan the block belongs to, and that plan's blocks done so far. */
export interface VerifyRunState {
  readonly request: VerifyRequest;
  readonly plan: VerifyPlan;
  readonly done: ReadonlyMap<number, BlockEntry>;
}

/** Options of a run: progress and cancel, and blocks already done (a resumed run) with a callback per block. */
export interface VerifyOptions extends ShardOptions {
  /** The plan's tables, when the caller built them already (verifyTables). */
  readonly tables?: VerifyTableData;
  readonly done?: ReadonlyMap<number, BlockEntry>;
  /**
   * After each finished block, one call after another. `run` is what a checkpoint holds: every block
   * of `run.done` belongs to `run.plan` (after the preimage skip's fallback, the plan without the skip).
   */
  readonly onBlock?: (entry: BlockEntry, run: VerifyRunState) => void | Promise<void>;
}

/**
 * A block that ends the preimage skip: a number in it neither descends nor returns to itself, so a
 * leaf skipped because a smaller number reaches it may not descend either, and the lists would not be whole.
 */
export const breaksSkip = (e: BlockEntry): boolean => e.counts.unresolved > 0n || e.counts.cycleEntrants > 0n;

/**
 * A block that ends the skip of slices (skipReached): as breaksSkip, or a cycle member, whose cycle's
 * other members it reaches (they descend, onto it, but their glides are not bounded by its).
 */
export const breaksSliceSkip = (e: BlockEntry): boolean => breaksSkip(e) || e.counts.cycleMembers > 0n;

/** The blocks that end a plan's skip, or null when it has none. */
const skipBreaker = (plan: VerifyPlan) => (plan.skipReached ? breaksSliceSkip : plan.preimage ? breaksSkip : null);

/** The message a worker gets for one block of a plan. */
function blockMessage(plan: VerifyPlan, data: VerifyTableData | null, b: BlockSpec): VerifyBlock {
  const exc = (b.kind === "aligned" || b.kind === "range") && data ? exceptionsIn(data, b.first, b.last) : [];
  return {
    ...b,
    key: plan.key,
    engine: plan.engine,
    q: plan.map.q,
    r: plan.map.r,
    sieveDepth: plan.sieveDepth,
    maxSteps: plan.maxSteps,
    limitBits: plan.limitBits,
    skipReached: plan.skipReached,
    exceptions: BigUint64Array.from(exc, (e) => e.n),
    exceptionDepths: Uint8Array.from(exc, (e) => e.classDepth),
  };
}

/**
 * Runs blocks of a plan on the pool (kernel blocks on the run's tables, BigInt blocks as they are);
 * `onResult` sees each finished block once, one call after another (a checkpoint is written whole
 * each time); a failure among them fails the run once the pool has stopped.
 */
async function executeBlocks(
  pool: KernelPool,
  plan: VerifyPlan,
  data: VerifyTableData | null,
  todo: readonly BlockSpec[],
  onResult: (entry: BlockEntry) => void | Promise<void>,
  signal?: AbortSignal,
  stop: () => boolean = () => false,
): Promise<void> {
  const prepared = new WeakSet<object>();
  let chain: Promise<void> = Promise.resolve();
  let failed: unknown = null;
  await pool.run(
    todo.map((b) => blockMessage(plan, data, b)),
    async (api: JobApi<typeof verifyHandlers>, block): Promise<BlockEntry | null> => {
      if (stop()) return null; // the rest of the pass is of no use: its tasks end at once
      if (data && !prepared.has(api)) {
        await api.verifyPrepare(data.tables);
        prepared.add(api);
      }
      return api.verifyBlock(block);
    },
    (_block, out) => {
      if (out === null) return;
      chain = chain
        .then(() => onResult(out))
        .catch((e: unknown) => {
          failed ??= e;
        });
    },
    { signal },
  );
  await chain;
  if (failed !== null) throw failed;
}

/**
 * Runs the given blocks of a plan and returns their finished entries in plan order (verify --check
 * runs a sample of blocks again with it).
 */
export async function runBlocks(
  pool: KernelPool,
  plan: VerifyPlan,
  data: VerifyTableData | null,
  specs: readonly BlockSpec[],
  options: RunOptions = {},
): Promise<BlockEntry[]> {
  const out: BlockEntry[] = [];
  await executeBlocks(pool, plan, data, specs, (e) => void out.push(e), options.signal);
  return out.sort((u, v) => u.index - v.index);
}

/**
 * Runs the blocks of `mine` that `run.done` lacks, into `run.done`, each reported to onBlock. With
 * `watchSkip`, a block that breaks the preimage skip ends the pass: blocks not yet started are not
 * run, those that finish later are dropped, and it returns false (a resumed run whose blocks already
 * hold such a block returns false at once). Otherwise true, with every block of `mine` done. With
 * the tables it ran on (null when it ran no kernel block).
 */
async function runPass(
  pool: KernelPool,
  run: VerifyRunState & { readonly done: Map<number, BlockEntry> },
  mine: readonly BlockSpec[],
  options: VerifyOptions,
  watchSkip: ((e: BlockEntry) => boolean) | null,
): Promise<{ complete: boolean; data: VerifyTableData | null }> {
  const { plan, done } = run;
  if (watchSkip && [...done.values()].some(watchSkip)) return { complete: false, data: options.tables ?? null };
  const todo = mine.filter((b) => !done.has(b.index));
  const data = plan.engine === "kernel" && todo.length > 0 ? (options.tables ?? (await verifyTables(pool, plan, options))) : null;
  const progress = numberProgress(mine, (b) => done.has(b.index), options.onProgress);
  let broken = false;
  await executeBlocks(
    pool,
    plan,
    data,
    todo,
    async (entry) => {
      if (broken) return;
      done.set(entry.index, entry);
      progress(plan.blocks[entry.index]!);
      broken = watchSkip?.(entry) === true;
      await options.onBlock?.(entry, run);
    },
    options.signal,
    () => broken,
  );
  return { complete: !broken, data };
}

/** The tables of a run under the plan of its fallback: the same tables, the skip off (and the fallback's plan key). */
function withoutSkip(data: VerifyTableData, plan: VerifyPlan): VerifyTableData {
  const { classes } = data.tables;
  return { ...data, tables: { ...data.tables, key: plan.key, classes: classes && { ...classes, preimage: false } } };
}

/** Progress in numbers (display only: a double is close enough to show a share and a rate). */
function numberProgress(blocks: readonly BlockSpec[], done: (b: BlockSpec) => boolean, report?: (done: number, total: number) => void) {
  const size = (b: BlockSpec) => Number(blockSize(b));
  const total = blocks.reduce((s, b) => s + size(b), 0);
  let sofar = blocks.filter(done).reduce((s, b) => s + size(b), 0);
  return (b: BlockSpec) => {
    sofar += size(b);
    report?.(sofar, total);
  };
}

/**
 * The plan of a request, made once per request object: the front ends check a request with it, and
 * the run and every method of the job read the same plan.
 * @example planOf(req) === planOf(req) // true
 */
const plans = new WeakMap<VerifyRequest, VerifyPlan>();
export function planOf(req: VerifyRequest): VerifyPlan {
  let plan = plans.get(req);
  if (!plan) {
    plan = planVerify(req);
    plans.set(req, plan);
  }
  return plan;
}

/**
 * What plan.json keeps of a verification run: its request, every field of it, and the records known
 * below FROM when they were given (a cluster run's merge reports the new records among all n).
 */
export type VerifyParams = VerifyRequest & { readonly known?: KnownRecords };

/** The request's codec: a field of VerifyRequest missing here does not compile. */
export const verifyCodec = paramsCodec<VerifyParams>({
  map: mapField,
  from: bigintField,
  to: bigintField,
  sieveDepth: optional(intField),
  stepDepth: optional(intField),
  maxSteps: optional(intField),
  blocks: optional(intField),
  limitBits: optional(intField),
  delay: optional(boolField),
  classes: optional(boolField),
  preimage: optional(boolField),
  skipReached: optional(boolField),
  known: optional(knownField),
});

/** A shard's finished blocks, ascending by block. */
export interface VerifyPart extends PartBase {
  readonly blocks: BlockEntry[];
}

export const verifyJob: JobKind<VerifyParams, VerifyPart, VerifyResult, VerifyOptions> = {
  name: "verify",
  describe: (p) => `verify ${p.map.name} over [${p.from}, ${p.to})`,
  codec: verifyCodec,
  estimate(plan, cpus) {
    const vplan = planOf(plan.params);
    let numbers = 0n;
    for (const r of plan.shards) {
      const n = vplan.blocks.slice(r.first, r.end).reduce((s, b) => s + blockSize(b), 0n);
      if (n > numbers) numbers = n;
    }
    // each worker and the host keep the sieve table (4 bytes a survivor) and the step table (9 bytes a residue)
    const K = vplan.sieveDepth;
    const tables = Number(exactCounts(plan.params.map, K).levels[K]!.survivors) * 4 + 9 * 2 ** vplan.stepDepth;
    return shardEstimate(numbers, vplan.engine === "kernel" ? 1e8 : 2e5, cpus, tables * (cpus + 2));
  },
  async layout(_pool, p) {
    return { prefixBits: 0, prefixes: null, tasks: planOf(p).blocks.length };
  },
  async runShard(pool, plan, shard, options: VerifyOptions = {}) {
    const started = performance.now();
    const vplan = planOf(plan.params);
    const range = plan.shards[shard];
    if (!range) throw new RangeError(`shard ${shard} is not in the plan (0 to ${plan.shards.length - 1})`);
    const mine = vplan.blocks.slice(range.first, range.end);
    // blocks already done (a resumed run) are kept as they are
    const results = new Map<number, BlockEntry>([...(options.done ?? [])].filter(([i]) => i >= range.first && i < range.end));
    await runPass(pool, { request: plan.params, plan: vplan, done: results }, mine, options, null);
    const blocks = mine.map((b) => results.get(b.index)!);
    return { blocks, seconds: (performance.now() - started) / 1000 };
  },
  async merge(_pool, plan, parts) {
    const vplan = planOf(plan.params);
    const entries = parts.flatMap((p) => p.blocks).sort((u, v) => u.index - v.index);
    return mergeVerify(
      vplan,
      entries,
      parts.reduce((s, p) => s + p.seconds, 0),
    );
  },
};

/**
 * Verifies the range on the pool: the blocks not in `options.done`, then the merge of all of them.
 * A run by classes with the preimage skip watches its blocks: the first that breaks the skip
 * (breaksSkip) ends the pass, and the run goes on under the plan without the skip, every block of
 * classes again (the delay blocks done stand: the skip does not touch them); onBlock then reports
 * that plan's blocks only. The result's `seconds` is this call's wall time (both passes),
 * `blocksRun` and `numbersRun` what this call ran of the result's blocks (not those of `options.done`).
 * @example const r = await runVerify(pool, { map: parseMap("3x+1"), from: 1n, to: 1n << 20n }); r.maxGlide?.n // 77671n
 */
export async function runVerify(pool: KernelPool, req: VerifyRequest, options: VerifyOptions = {}): Promise<VerifyResult> {
  const started = performance.now();
  const given = new Set(options.done?.keys()); // now: a caller's onBlock may add to options.done
  const timed = (plan: VerifyPlan, done: ReadonlyMap<number, BlockEntry>, held: ReadonlySet<number>, firstPassSeconds: number | null) => {
    const r = mergeVerify(
      plan,
      plan.blocks.map((b) => done.get(b.index)!),
      0,
    );
    const ran = plan.blocks.filter((b) => !held.has(b.index));
    const numbersRun = ran.reduce((s, b) => s + blockSize(b), 0n);
    const seconds = (performance.now() - started) / 1000;
    const passes: 1 | 2 = firstPassSeconds === null ? 1 : 2;
    return { ...r, seconds, blocksRun: ran.length, numbersRun, passes, firstPassSeconds };
  };
  const plan = planOf(req);
  const first = { request: req, plan, done: new Map(options.done) };
  const pass = await runPass(pool, first, plan.blocks, options, skipBreaker(plan));
  if (pass.complete) return timed(plan, first.done, given, null);
  // the fallback: the plan without the skip, its tables those of the first pass with the skip off
  const firstPassSeconds = (performance.now() - started) / 1000;
  const request = plan.skipReached ? { ...req, skipReached: false } : { ...req, preimage: false };
  const second = planOf(request);
  const kept = new Map([...first.done].filter(([, e]) => e.kind === "delay"));
  const tables = pass.data ? withoutSkip(pass.data, second) : undefined;
  await runPass(pool, { request, plan: second, done: kept }, second.blocks, { ...options, tables }, null);
  return timed(second, kept, new Set([...given].filter((i) => second.blocks[i]?.kind === "delay")), firstPassSeconds);
}
