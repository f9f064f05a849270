// Convergence verification of a range [from, to): every n is shown to reach a value below n (by
// induction over n this leaves no divergent trajectory and no new cycle in the range, given the
// numbers below it: the method of the published verification runs, common practice), or is found on
// a cycle, or is listed as unresolved past a step cap. The range is split into blocks of
// consecutive n (aligned to the sieve's period where it can be); blocks run on the pool and merge
// in order: counts add, and the record lists of the union are the entries that beat the running
// maximum of everything before them.
import { LimitError, UsageError } from "../../core/errors.js";
import { exactCounts } from "../../core/exact.js";
import type { CollatzMap } from "../../core/map.js";
import { dropDepth, kernelDepthLimit, parseMap, step, stoppingOdds } from "../../core/map.js";
import { shardEstimate } from "../../engine/plan.js";
import type { JobKind, PartBase } from "../../engine/plan.js";
import type { VerifyBlock, VerifyBlockResult, VerifyTables } from "../../engine/messages.js";
import { CancelledError } from "../../engine/pool.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { stepTableRaw } from "../../outputs/manifest.js";
import { ResidueSorter } from "../../outputs/tables.js";
import { EXCEPTION_LIMIT } from "../sieve/exceptions.js";
import { expandExceptions } from "../sieve/exceptions.js";
import { runSieve } from "../sieve/sieve.js";
import { stepTable } from "../steps.js";

export const MAX_VERIFY_SIEVE_DEPTH = 30;
export const MAX_VERIFY_STEP_DEPTH = 20;
export const DEFAULT_MAX_STEPS = 100_000;
/** Numbers a run may take through BigInt alone (maps with r < 0, n >= 2^64): it is slow. */
export const MAX_BIGINT_NUMBERS = 1n << 22n;
/** Exceptions a run may carry (they are listed and iterated one by one). */
const MAX_EXCEPTIONS = 1n << 24n;
/** Numbers per ranged block (partial periods, iterated one by one). */
const RANGE_BLOCK = 1n << 20n;
/** Numbers per block on the BigInt engine (about a tenth of a second each). */
const BIGINT_BLOCK = 1n << 12n;
const TWO64 = 1n << 64n;

export interface VerifyRequest {
  readonly map: CollatzMap;
  readonly from: bigint;
  readonly to: bigint;
  /** Sieve depth K (default 26) and table step depth KS (default 16). */
  readonly sieveDepth?: number;
  readonly stepDepth?: number;
  readonly maxSteps?: number;
  /** About how many blocks (default: from the range's size); the result does not depend on it. */
  readonly blocks?: number;
  /** Values at or above 2^limitBits are finished in BigInt (128; lower it only to test that path). */
  readonly limitBits?: number;
  /** Also the delay of every n (its total stopping time: the steps to reach 1) and its records. */
  readonly delay?: boolean;
}

/** Delays of a run: the records (steps to reach 1, in standard steps and steps of T) and the n that do not reach 1. */
export interface DelayResult {
  readonly records: GlideRecord[];
  readonly max: GlideRecord | null;
  /** n that did not reach 1 within maxSteps (on another cycle, or unresolved): their count and the smallest. */
  readonly unreached: bigint;
  readonly unreachedList: bigint[];
}

/**
 * A number of any size: decimal digits, or a sum of terms each decimal or b^e (2^50+2^32).
 * @example parseBound("--from", "2^40+5") // 1099511627781n
 */
export function parseBound(name: string, text: string | undefined): bigint {
  if (text === undefined) throw new UsageError(`${name} is required`);
  const t = text.replace(/\s+/g, "");
  if (!/^(\d+(\^\d+)?)(\+\d+(\^\d+)?)*$/.test(t))
    throw new UsageError(`${name} must be a whole number (digits, or powers such as 2^50+2^32), got "${text}"`);
  return t.split("+").reduce((s, term) => {
    const [b, e] = term.split("^");
    if (e !== undefined && Number(e) > 100_000) throw new UsageError(`${name}: exponent ${e} is too large`);
    return s + (e === undefined ? BigInt(b!) : BigInt(b!) ** BigInt(e));
  }, 0n);
}

/** One n, iterated in BigInt: the reference for handoffs, checks and the BigInt path. */
export interface Trace {
  readonly outcome: "descent" | "cycle" | "unresolved";
  /** Steps of T to the first value below n (descent), or back to n (cycle). */
  readonly steps: number;
  readonly odd: number;
  /** The largest value before the descent (n itself for a cycle member). */
  readonly path: bigint;
  /** The depth at which n's class coefficient q^m / 2^j first drops below 1, within `depth`. */
  readonly cutDepth: number | null;
}

/**
 * n iterated step by step in BigInt until it goes below n, returns to n, or passes maxSteps.
 * @example traceBig(parseMap("3x+1"), 27n, 1000, 24) // { outcome: "descent", steps: 59, odd: 37, path: 4616n, ... }
 */
export function traceBig(map: CollatzMap, n: bigint, maxSteps: number, depth: number): Trace {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  let v = n;
  let odd = 0;
  let path = n;
  let cutDepth: number | null = null;
  let qm = 1n;
  for (let steps = 1; steps <= maxSteps; steps++) {
    if ((v & 1n) === 1n) {
      v = (q * v + r) >> 1n;
      odd++;
      qm *= q;
    } else v >>= 1n;
    if (cutDepth === null && steps <= depth && qm >> BigInt(steps) === 0n) cutDepth = steps;
    if (v > path) path = v;
    if (v < n) return { outcome: "descent", steps, odd, path, cutDepth };
    if (v === n) return { outcome: "cycle", steps, odd, path: n, cutDepth };
  }
  return { outcome: "unresolved", steps: maxSteps, odd, path, cutDepth };
}

/**
 * Whether n's trajectory enters a cycle (without going below n: the cycle's elements are all above
 * n), by Brent's method within `budget` steps while its values stay below 2^maxBits: the cycle's
 * least element and period, exactly, or null when that is not shown.
 * @example cycleEntry(parseMap("3x+5"), 3n, 1000) // { min: 19n, period: 5 }
 */
export function cycleEntry(map: CollatzMap, n: bigint, budget: number, maxBits = 256): { min: bigint; period: number } | null {
  const T = (v: bigint) => step(map, v);
  const limit = 1n << BigInt(maxBits);
  let power = 1;
  let lam = 1;
  let tortoise = n;
  let hare = T(n);
  for (let steps = 1; tortoise !== hare; steps++) {
    if (steps > budget || hare >= limit || hare <= -limit) return null;
    if (power === lam) {
      tortoise = hare;
      power *= 2;
      lam = 0;
    }
    hare = T(hare);
    lam++;
  }
  let min = hare;
  for (let v = T(hare); v !== hare; v = T(v)) if (v < min) min = v;
  return { min, period: lam };
}

export interface GlideRecord {
  readonly n: bigint;
  /** Glide in standard steps (an odd step counts twice) and in steps of T. */
  readonly standardSteps: number;
  readonly steps: number;
}

export interface PathRecord {
  readonly n: bigint;
  readonly value: bigint;
}

export interface VerifyCounts {
  readonly numbers: bigint;
  /** Survivors of the sieve iterated to their descent. */
  readonly checked: bigint;
  /** n in classes cut by the sieve at depth j (they descend at step j): by depth, and in all. */
  readonly sievedByDepth: bigint[];
  readonly sieved: bigint;
  /** The sieve's exceptions, iterated to their descent. */
  readonly exceptions: bigint;
  readonly cycleMembers: bigint;
  /** n whose trajectory enters a cycle of larger numbers (shown by Brent's method) instead of descending. */
  readonly cycleEntrants: bigint;
  readonly unresolved: bigint;
}

export interface VerifyResult {
  readonly map: CollatzMap;
  readonly from: bigint;
  readonly to: bigint;
  readonly sieveDepth: number;
  readonly stepDepth: number;
  readonly maxSteps: number;
  /** "kernel" (u128 in wasm, BigInt for the rare values past 128 bits) or "bigint" (all of it). */
  readonly engine: "kernel" | "bigint";
  readonly counts: VerifyCounts;
  /** Each n whose glide (standard steps), or path, beats every smaller n of the range. */
  readonly glideRecords: GlideRecord[];
  readonly pathRecords: PathRecord[];
  /** The largest glide and path with their n (the smallest n on ties); null for an empty range. */
  readonly maxGlide: GlideRecord | null;
  readonly maxPath: PathRecord | null;
  /** n on a cycle (each is its cycle's least element in the range checked), with the period. */
  readonly cycleMembers: { readonly n: bigint; readonly period: number }[];
  /** n that enter a cycle of larger numbers: the cycle's least element and period (the smallest 100,000 n). */
  readonly cycleEntrants: { readonly n: bigint; readonly cycleMin: bigint; readonly period: number }[];
  /** n that neither descended, returned nor were shown to enter a cycle within maxSteps (exact). */
  readonly unresolvedList: bigint[];
  /** With `delay`: the delays' records. */
  readonly delay: DelayResult | null;
  /** Numbers the kernel handed to BigInt (values past 2^limitBits). */
  readonly handoffs: bigint;
  readonly blocks: number;
  readonly seconds: number;
}

/** A checked request with its defaults filled in. */
export interface VerifyPlan {
  readonly map: CollatzMap;
  readonly from: bigint;
  readonly to: bigint;
  readonly sieveDepth: number;
  readonly stepDepth: number;
  readonly maxSteps: number;
  readonly limitBits: number;
  readonly engine: "kernel" | "bigint";
  readonly delay: boolean;
  /** Names the parameters: checkpoints of another plan are refused. */
  readonly key: string;
  readonly blocks: readonly Omit<VerifyBlock, "exceptions">[];
}

/**
 * Checks a request and splits it into blocks: the partial periods of the sieve at both ends as
 * ranged blocks, whole periods in between as aligned blocks.
 */
export function planVerify(req: VerifyRequest): VerifyPlan {
  const { map, from, to } = req;
  if (from < 1n) throw new UsageError(`--from must be at least 1, got ${from}`);
  if (to <= from) throw new UsageError(`--to must be above --from (the range is [from, to)), got from ${from} to ${to}`);
  const sieveDepth = req.sieveDepth ?? 26;
  const stepDepth = req.stepDepth ?? 16;
  const maxSteps = req.maxSteps ?? DEFAULT_MAX_STEPS;
  const limitBits = req.limitBits ?? 128;
  const depthLimit = Math.min(MAX_VERIFY_SIEVE_DEPTH, kernelDepthLimit(map));
  if (!Number.isInteger(sieveDepth) || sieveDepth < 1 || sieveDepth > depthLimit)
    throw new LimitError(`sieve depth ${sieveDepth} is out of range for ${map.name}: 1 to ${depthLimit} (the sieve table's exact limit)`);
  if (!Number.isInteger(stepDepth) || stepDepth < 1 || stepDepth > Math.min(MAX_VERIFY_STEP_DEPTH, kernelDepthLimit(map)))
    throw new LimitError(`step depth ${stepDepth} is out of range: 1 to ${Math.min(MAX_VERIFY_STEP_DEPTH, kernelDepthLimit(map))}`);
  if (!Number.isInteger(maxSteps) || maxSteps < 1 || maxSteps > 100_000_000)
    throw new UsageError(`--max-steps must be from 1 to 100000000`);
  if (!Number.isInteger(limitBits) || limitBits < 8 || limitBits > 128) throw new UsageError("limitBits must be from 8 to 128");
  const engine = map.r > 0 && to <= TWO64 ? "kernel" : "bigint";
  if (engine === "bigint" && to - from > MAX_BIGINT_NUMBERS) {
    const why = map.r < 0 ? `maps with r < 0 (${map.name})` : "numbers at or above 2^64";
    throw new LimitError(`${why} are verified in BigInt, one by one: at most ${MAX_BIGINT_NUMBERS} numbers a run, got ${to - from}`);
  }
  const delay = req.delay === true;
  const key = `${map.name}|${from}|${to}|${sieveDepth}|${stepDepth}|${maxSteps}|${limitBits}${delay ? "|delay" : ""}`;
  const base = { key, maxSteps, limitBits, h0: 0n, periods: 0n } as const;
  const blocks: Omit<VerifyBlock, "exceptions">[] = [];
  const ranged = (first: bigint, last: bigint) => {
    for (let s = first; s <= last; s += RANGE_BLOCK) {
      const e = s + RANGE_BLOCK - 1n < last ? s + RANGE_BLOCK - 1n : last;
      blocks.push({ ...base, index: blocks.length, kind: "range", first: s, last: e });
    }
  };
  const delays = (size: bigint) => {
    if (!delay) return;
    for (let s = from; s < to; s += size)
      blocks.push({ ...base, index: blocks.length, kind: "delay", first: s, last: s + size <= to ? s + size - 1n : to - 1n });
  };
  if (engine === "bigint") {
    for (let s = from; s < to; s += BIGINT_BLOCK)
      blocks.push({
        ...base,
        index: blocks.length,
        kind: "range",
        first: s,
        last: s + BIGINT_BLOCK <= to ? s + BIGINT_BLOCK - 1n : to - 1n,
      });
    delays(BIGINT_BLOCK);
    return { map, from, to, sieveDepth, stepDepth, maxSteps, limitBits, engine, delay, key, blocks };
  }
  const period = 1n << BigInt(sieveDepth);
  // aligned periods: [hA 2^K, hB 2^K), below 2^64 - 2^K so that no period's end wraps
  const hA = (from + period - 1n) / period;
  let hB = to / period;
  const hMax = TWO64 / period - 1n;
  if (hB > hMax) hB = hMax;
  if (hB <= hA) {
    ranged(from, to - 1n);
  } else {
    if (from < hA * period) ranged(from, hA * period - 1n);
    const periods = hB - hA;
    const target = BigInt(Math.max(1, req.blocks ?? Math.max(16, Math.min(4096, Number((periods * period) >> 26n)))));
    const per = (periods + target - 1n) / target;
    for (let h = hA; h < hB; h += per) {
      const count = h + per <= hB ? per : hB - h;
      blocks.push({
        ...base,
        index: blocks.length,
        kind: "aligned",
        first: h * period,
        last: (h + count) * period - 1n,
        h0: h,
        periods: count,
      });
    }
    if (hB * period < to) ranged(hB * period, to - 1n);
  }
  delays(RANGE_BLOCK);
  return { map, from, to, sieveDepth, stepDepth, maxSteps, limitBits, engine, delay, key, blocks };
}

/** ceil(r (q/2)^L), at most 2^64 - 1. */
function slack(map: CollatzMap, L: number): bigint {
  const v = (BigInt(map.r) * BigInt(map.q) ** BigInt(L) + (1n << BigInt(L)) - 1n) >> BigInt(L);
  return v >= TWO64 ? TWO64 - 1n : v;
}

/** What the tables of a run are made of, for certificates: the raw bytes of each as its file would hold it. */
export interface VerifyTableData {
  readonly tables: VerifyTables;
  /** The sieve's survivors as little-endian u32 (as `glidepath sieve --out` writes them). */
  readonly sieveBytes: Uint8Array;
  /** The step table as `glidepath steps --out` writes it (odd_steps u8, padding, image u64). */
  readonly stepBytes: Uint8Array;
  /** The sieve's exceptions, ascending, with their class depths. */
  readonly exceptions: { readonly n: bigint; readonly classDepth: number }[];
  /** Classes mod 2^j stopping at j, j = 0..K (the exact counter). */
  readonly stoppedClasses: bigint[];
}

/**
 * Builds the sieve and step tables of a plan once (on the pool).
 * @example const data = await verifyTables(pool, planVerify({ map, from: 1n, to: 1000n }));
 */
export async function verifyTables(pool: KernelPool, plan: VerifyPlan, options: RunOptions = {}): Promise<VerifyTableData> {
  const { map, sieveDepth: K, stepDepth: KS } = plan;
  const levels = exactCounts(map, K).levels;
  const rows = levels[K]!.survivors;
  const sorter = new ResidueSorter(K, Math.min(K, 10), 0, 1 << Math.min(K, 10));
  const sieve = await runSieve(
    pool,
    { map, depth: K, mode: "survivors", onLeaves: (c) => sorter.add(c), residuesOnly: true, exceptionLimit: 0 },
    { signal: options.signal },
  );
  if (sieve.exceptionCount > MAX_EXCEPTIONS)
    throw new LimitError(
      `the depth-${K} sieve of ${map.name} has ${sieve.exceptionCount} exceptions, over the ${MAX_EXCEPTIONS} a run iterates: use another depth`,
    );
  const exceptions = expandExceptions(map, sieve.exceptionClasses, Number(sieve.exceptionCount)).list.map((e) => ({
    n: e.n,
    classDepth: e.classDepth,
  }));
  const residues = new Uint32Array(Number(rows));
  let at = 0;
  for (const part of sorter.sorted()) {
    residues.set(part, at);
    at += part.length;
  }
  if (BigInt(at) !== rows) throw new Error(`internal error: ${at} survivors sorted, the exact counter says ${rows}`);
  const stepParts = stepTableRaw(await stepTable(pool, map, KS, { signal: options.signal }));
  const stepBytes = new Uint8Array(stepParts.reduce((s, p) => s + p.length, 0));
  let offset = 0;
  for (const part of stepParts) {
    stepBytes.set(part, offset);
    offset += part.length;
  }
  // the deepest cut within K, and the most odd steps a class cut by K can have before its cut
  const odds = stoppingOdds(map.q, K);
  let sievedGlide = 0;
  odds.forEach((m, j) => {
    if (m !== null) sievedGlide = Math.max(sievedGlide, j + m);
  });
  let sievedPeak = 0;
  while (dropDepth(map.q, sievedPeak + 1) <= K) sievedPeak++;
  const tables: VerifyTables = {
    key: plan.key,
    q: map.q,
    r: map.r,
    depth: K,
    stepDepth: KS,
    residues,
    sievedGlide,
    sievedPeak,
    sievedSlack: slack(map, sievedPeak),
    survivorSlack: slack(map, K),
    slacks: BigUint64Array.from({ length: KS + 1 }, (_, d) => slack(map, d)),
  };
  return { tables, sieveBytes: new Uint8Array(residues.buffer), stepBytes, exceptions, stoppedClasses: levels.map((l) => l.stopped) };
}

/** A block result that can be written to a checkpoint and read back (BigInt arrays as digits). */
export type StoredBlock = VerifyBlockResult;

/** Per block: what the BigInt side needs beyond the kernel (the exceptions in it and their depths). */
function exceptionsIn(data: VerifyTableData, first: bigint, last: bigint) {
  const list = data.exceptions;
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (list[mid]!.n < first) lo = mid + 1;
    else hi = mid;
  }
  const out: { n: bigint; classDepth: number }[] = [];
  for (let i = lo; i < list.length && list[i]!.n <= last; i++) out.push(list[i]!);
  return out;
}

/** n's delay in BigInt: steps of T to reach 1 and the odd steps among them, or null past maxSteps. */
export function delayBig(map: CollatzMap, n: bigint, maxSteps: number): { steps: number; odd: number } | null {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  let v = n;
  let odd = 0;
  for (let steps = 0; steps <= maxSteps; steps++) {
    if (v === 1n) return { steps, odd };
    if ((v & 1n) === 1n) {
      v = (q * v + r) >> 1n;
      odd++;
    } else v >>= 1n;
  }
  return null;
}

/** A delay block in BigInt (the BigInt engine). */
function bigintDelayBlock(plan: VerifyPlan, block: Omit<VerifyBlock, "exceptions">): VerifyBlockResult {
  const counts = new BigUint64Array(8 + 64);
  const records: bigint[] = [];
  const unreached: bigint[] = [];
  let best = -1;
  for (let n = block.first; n <= block.last; n++) {
    const d = delayBig(plan.map, n, plan.maxSteps);
    if (d === null) {
      counts[3]!++;
      unreached.push(n, 0n, 0n, 0n);
    } else {
      counts[0]!++;
      if (d.steps + d.odd > best) {
        best = d.steps + d.odd;
        records.push(n, BigInt(d.steps), BigInt(d.steps + d.odd), 0n);
      }
    }
  }
  const u64 = (xs: bigint[]) => BigUint64Array.from(xs, (x) => BigInt.asUintN(64, x));
  const empty = new BigUint64Array(0);
  return {
    index: block.index,
    visited: block.last - block.first + 1n,
    counts,
    glideRecords: u64(records),
    pathRecords: empty,
    handoffs: empty,
    cycleMembers: empty,
    unresolved: u64(unreached),
  };
}

/** A block done on the host in BigInt (the BigInt engine), in the form the kernel gives its results. */
function bigintBlock(plan: VerifyPlan, block: Omit<VerifyBlock, "exceptions">): VerifyBlockResult {
  if (block.kind === "delay") return bigintDelayBlock(plan, block);
  const counts = new BigUint64Array(8 + 64);
  const glides: bigint[] = [];
  const paths: bigint[] = [];
  const cycles: bigint[] = [];
  const unresolved: bigint[] = [];
  let bestGlide = -1;
  let bestPath = -1n;
  for (let n = block.first; n <= block.last; n++) {
    const t = traceBig(plan.map, n, plan.maxSteps, plan.sieveDepth);
    if (t.outcome === "descent") {
      if (t.cutDepth !== null && t.steps === t.cutDepth) counts[8 + t.cutDepth]!++;
      else counts[t.cutDepth !== null ? 1 : 0]!++;
      if (t.steps + t.odd > bestGlide) {
        bestGlide = t.steps + t.odd;
        glides.push(n, BigInt(t.steps), BigInt(t.steps + t.odd), 0n);
      }
    } else if (t.outcome === "cycle") {
      counts[2]!++;
      cycles.push(n, BigInt(t.steps), 0n, 0n);
    } else {
      counts[3]!++;
      unresolved.push(n, 0n, 0n, 0n);
      continue;
    }
    if (t.path > bestPath) {
      bestPath = t.path;
      paths.push(n, t.path & (TWO64 - 1n), t.path >> 64n, 0n);
    }
  }
  const u64 = (xs: bigint[]) => BigUint64Array.from(xs, (x) => BigInt.asUintN(64, x));
  if (bestPath >= 1n << 128n) throw new LimitError("a path above 2^128 on the BigInt path: not representable in a block result");
  return {
    index: block.index,
    visited: block.last - block.first + 1n,
    counts,
    glideRecords: u64(glides),
    pathRecords: u64(paths),
    handoffs: new BigUint64Array(0),
    cycleMembers: u64(cycles),
    unresolved: u64(unresolved),
  };
}

/** Options of a run: progress and cancel, and blocks already done (a resumed run) with a callback per block. */
export interface VerifyOptions extends RunOptions {
  /** The plan's tables, when the caller built them already (verifyTables). */
  readonly tables?: VerifyTableData;
  readonly done?: ReadonlyMap<number, StoredBlock>;
  readonly onBlock?: (result: StoredBlock, done: number, total: number) => void | Promise<void>;
}

/**
 * Runs blocks of a plan (on the pool, or in BigInt for the BigInt engine); `onResult` sees each
 * result once, one call after another (a checkpoint is written whole each time); a failure among
 * them fails the run once the pool has stopped.
 */
async function executeBlocks(
  pool: KernelPool,
  plan: VerifyPlan,
  data: VerifyTableData | null,
  todo: readonly Omit<VerifyBlock, "exceptions">[],
  onResult: (res: StoredBlock) => void | Promise<void>,
  signal?: AbortSignal,
): Promise<void> {
  if (plan.engine === "bigint" || !data) {
    for (const b of todo) {
      if (signal?.aborted) throw new CancelledError();
      const res = bigintBlock(plan, b);
      await new Promise((resolve) => setTimeout(resolve, 0)); // let a signal or a cancel in
      await onResult(res);
    }
    return;
  }
  const prepared = new WeakSet<object>();
  const blocks: VerifyBlock[] = todo.map((b) => ({
    ...b,
    exceptions: b.kind === "aligned" ? BigUint64Array.from(exceptionsIn(data, b.first, b.last), (e) => e.n) : new BigUint64Array(0),
  }));
  let chain: Promise<void> = Promise.resolve();
  let failed: unknown = null;
  await pool.run(
    blocks,
    async (api, block) => {
      if (!prepared.has(api)) {
        await api.verifyPrepare(data.tables);
        prepared.add(api);
      }
      return api.verifyBlock(block);
    },
    (_block, out) => {
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

/** What plan.json keeps of a verification run: its request. */
export type VerifyParams = VerifyRequest;

/** A shard's block results, ascending by block. */
export interface VerifyPart extends PartBase {
  readonly blocks: StoredBlock[];
}

export const verifyJob: JobKind<VerifyParams, VerifyPart, VerifyResult> = {
  name: "verify",
  describe: (p) => `verify ${p.map.name} over [${p.from}, ${p.to})`,
  encodeParams: (p) => ({
    map: p.map.name,
    from: p.from,
    to: p.to,
    sieveDepth: p.sieveDepth ?? null,
    stepDepth: p.stepDepth ?? null,
    maxSteps: p.maxSteps ?? null,
    delay: p.delay === true,
  }),
  decodeParams: (s) => {
    const num = (v: unknown) => (v === null || v === undefined ? undefined : Number(v));
    return {
      map: parseMap(String(s.map)),
      from: BigInt(s.from as bigint),
      to: BigInt(s.to as bigint),
      sieveDepth: num(s.sieveDepth),
      stepDepth: num(s.stepDepth),
      maxSteps: num(s.maxSteps),
      delay: s.delay === true,
    };
  },
  estimate(plan, cpus) {
    const vplan = planVerify(plan.params);
    let numbers = 0n;
    for (const r of plan.shards) {
      const n = vplan.blocks.slice(r.first, r.end).reduce((s, b) => s + (b.last - b.first + 1n), 0n);
      if (n > numbers) numbers = n;
    }
    // each worker and the host keep the sieve table (4 bytes a survivor) and the step table (9 bytes a residue)
    const K = vplan.sieveDepth;
    const tables = Number(exactCounts(plan.params.map, K).levels[K]!.survivors) * 4 + 9 * 2 ** vplan.stepDepth;
    return shardEstimate(numbers, vplan.engine === "kernel" ? 1e8 : 2e5, cpus, tables * (cpus + 2));
  },
  async layout(_pool, p) {
    return { prefixBits: 0, prefixes: null, tasks: planVerify(p).blocks.length };
  },
  async runShard(pool, plan, shard, options = {}) {
    const started = performance.now();
    const vplan = planVerify(plan.params);
    const range = plan.shards[shard];
    if (!range) throw new RangeError(`shard ${shard} is not in the plan (0 to ${plan.shards.length - 1})`);
    const todo = vplan.blocks.slice(range.first, range.end);
    const data = vplan.engine === "kernel" && todo.length > 0 ? await verifyTables(pool, vplan, options) : null;
    const blocks: StoredBlock[] = [];
    const size = (b: { first: bigint; last: bigint }) => Number(b.last - b.first + 1n); // progress only
    const total = todo.reduce((s, b) => s + size(b), 0);
    let done = 0;
    await executeBlocks(
      pool,
      vplan,
      data,
      todo,
      (res) => {
        blocks.push(res);
        done += size(vplan.blocks[res.index]!);
        options.onProgress?.(done, total);
      },
      options.signal,
    );
    blocks.sort((u, v) => u.index - v.index);
    return { blocks, seconds: (performance.now() - started) / 1000 };
  },
  async merge(pool, plan, parts) {
    const vplan = planVerify(plan.params);
    const data = vplan.engine === "kernel" ? await verifyTables(pool, vplan) : null;
    const results = new Map<number, StoredBlock>();
    for (const p of parts) for (const b of p.blocks) results.set(b.index, b);
    return mergeVerify(
      vplan,
      data,
      results,
      parts.reduce((s, p) => s + p.seconds, 0),
    );
  },
};

/**
 * Verifies the range on the pool.
 * @example const r = await runVerify(pool, { map: parseMap("3x+1"), from: 1n, to: 1n << 20n }); r.maxGlide?.n // 77671n
 */
export async function runVerify(pool: KernelPool, req: VerifyRequest, options: VerifyOptions = {}): Promise<VerifyResult> {
  const started = performance.now();
  const plan = planVerify(req);
  const data = plan.engine === "kernel" ? (options.tables ?? (await verifyTables(pool, plan, options))) : null;
  const results = new Map<number, StoredBlock>(options.done ?? []);
  const todo = plan.blocks.filter((b) => !results.has(b.index));
  let completed = results.size;
  const total = plan.blocks.length;
  // progress in numbers (display only: a double is close enough to show a share and a rate)
  const sizeOf = (b: { first: bigint; last: bigint }) => Number(b.last - b.first + 1n);
  const numbersTotal = plan.blocks.reduce((s, b) => s + sizeOf(b), 0);
  let numbersDone = plan.blocks.filter((b) => results.has(b.index)).reduce((s, b) => s + sizeOf(b), 0);
  const byIndex = new Map(plan.blocks.map((b) => [b.index, b]));
  const progress = (index: number) => {
    numbersDone += sizeOf(byIndex.get(index)!);
    options.onProgress?.(numbersDone, numbersTotal);
  };
  await executeBlocks(
    pool,
    plan,
    data,
    todo,
    async (res) => {
      results.set(res.index, res);
      completed++;
      progress(res.index);
      await options.onBlock?.(res, completed, total);
    },
    options.signal,
  );
  return mergeVerify(plan, data, results, (performance.now() - started) / 1000);
}

/**
 * Merges block results in range order: counts add; a record of the union is an entry that beats
 * the running maximum of every block before it (the blocks' own lists are supersets of their
 * records, handoffs aside, so the sweep is exact). Equal for any split of the range.
 */
export function mergeVerify(
  plan: VerifyPlan,
  data: VerifyTableData | null,
  results: ReadonlyMap<number, StoredBlock>,
  seconds: number,
): VerifyResult {
  const { map, sieveDepth: K } = plan;
  const sievedByDepth = new Array<bigint>(K + 1).fill(0n);
  let checked = 0n;
  let exceptions = 0n;
  let cycles = 0n;
  let unresolved = 0n;
  let handoffCount = 0n;
  const cycleMembers: { n: bigint; period: number }[] = [];
  const unresolvedList: bigint[] = [];
  const glideRecords: GlideRecord[] = [];
  const pathRecords: PathRecord[] = [];
  let bestGlide = -1;
  let bestPath = -1n;
  const delayRecords: GlideRecord[] = [];
  const unreachedList: bigint[] = [];
  let unreached = 0n;
  let bestDelay = -1;
  for (const block of plan.blocks) {
    const res = results.get(block.index);
    if (!res) throw new Error(`internal error: block ${block.index} has no result`);
    if (block.kind === "delay") {
      // delays: the kernel's records, and its handoffs finished here, swept in n order
      const found: GlideRecord[] = [];
      for (let i = 0; i < res.glideRecords.length; i += 4)
        found.push({ n: res.glideRecords[i]!, steps: Number(res.glideRecords[i + 1]!), standardSteps: Number(res.glideRecords[i + 2]!) });
      for (let i = 0; i < res.unresolved.length; i += 4) unreachedList.push(res.unresolved[i]!);
      unreached += res.counts[3]!;
      for (let i = 0; i < res.handoffs.length; i += 4) {
        const n = res.handoffs[i]!;
        handoffCount++;
        const d = delayBig(map, n, plan.maxSteps);
        if (d === null) {
          unreached++;
          unreachedList.push(n);
        } else found.push({ n, steps: d.steps, standardSteps: d.steps + d.odd });
      }
      found.sort((u, v) => (u.n < v.n ? -1 : u.n > v.n ? 1 : 0));
      for (const g of found) {
        if (g.standardSteps > bestDelay) {
          bestDelay = g.standardSteps;
          delayRecords.push(g);
        }
      }
      continue;
    }
    const c = res.counts;
    checked += c[0]!;
    exceptions += c[1]!;
    cycles += c[2]!;
    unresolved += c[3]!;
    if (block.kind === "aligned" && data) {
      // whole periods: classes mod 2^j stopping at j are 2^(K-j) classes mod 2^K each; the
      // exceptions among them were iterated apart
      const inBlock = exceptionsIn(data, block.first, block.last);
      for (let j = 1; j <= K; j++) sievedByDepth[j]! += block.periods * data.stoppedClasses[j]! * (1n << BigInt(K - j));
      for (const e of inBlock) sievedByDepth[e.classDepth]!--;
    } else for (let j = 1; j <= K; j++) sievedByDepth[j]! += c[8 + j]!;
    // the block's candidates, and its handoffs finished here in BigInt, in n order
    const glides: GlideRecord[] = [];
    const paths: PathRecord[] = [];
    for (let i = 0; i < res.glideRecords.length; i += 4)
      glides.push({ n: res.glideRecords[i]!, steps: Number(res.glideRecords[i + 1]!), standardSteps: Number(res.glideRecords[i + 2]!) });
    for (let i = 0; i < res.pathRecords.length; i += 4)
      paths.push({ n: res.pathRecords[i]!, value: (res.pathRecords[i + 2]! << 64n) | res.pathRecords[i + 1]! });
    for (let i = 0; i < res.cycleMembers.length; i += 4)
      cycleMembers.push({ n: res.cycleMembers[i]!, period: Number(res.cycleMembers[i + 1]!) });
    for (let i = 0; i < res.unresolved.length; i += 4) unresolvedList.push(res.unresolved[i]!);
    for (let i = 0; i < res.handoffs.length; i += 4) {
      const n = res.handoffs[i]!;
      const countedAsSieved = res.handoffs[i + 1]! === 1n;
      handoffCount++;
      const t = traceBig(map, n, plan.maxSteps, K);
      if (!countedAsSieved) {
        if (t.cutDepth !== null && t.outcome === "descent" && t.steps === t.cutDepth) sievedByDepth[t.cutDepth]!++;
        else if (t.outcome === "descent") {
          if (t.cutDepth !== null) exceptions++;
          else checked++;
        } else if (t.outcome === "cycle") {
          cycles++;
          cycleMembers.push({ n, period: t.steps });
        } else {
          unresolved++;
          unresolvedList.push(n);
        }
      }
      if (t.outcome === "descent") {
        glides.push({ n, steps: t.steps, standardSteps: t.steps + t.odd });
        paths.push({ n, value: t.path });
      } else if (t.outcome === "cycle") paths.push({ n, value: n });
    }
    glides.sort((u, v) => (u.n < v.n ? -1 : u.n > v.n ? 1 : 0));
    paths.sort((u, v) => (u.n < v.n ? -1 : u.n > v.n ? 1 : 0));
    for (const g of glides) {
      if (g.standardSteps > bestGlide) {
        bestGlide = g.standardSteps;
        glideRecords.push(g);
      }
    }
    for (const p of paths) {
      if (p.value > bestPath) {
        bestPath = p.value;
        pathRecords.push(p);
      }
    }
  }
  cycleMembers.sort((u, v) => (u.n < v.n ? -1 : 1));
  unresolvedList.sort((u, v) => (u < v ? -1 : 1));
  // what passed the cap may still be shown to enter a cycle (of numbers above it: it never went below)
  const cycleEntrants: { n: bigint; cycleMin: bigint; period: number }[] = [];
  const stillUnresolved: bigint[] = [];
  for (const n of unresolvedList) {
    const c = cycleEntry(map, n, 2 * plan.maxSteps);
    if (c) cycleEntrants.push({ n, cycleMin: c.min, period: c.period });
    else stillUnresolved.push(n);
  }
  unresolved -= BigInt(cycleEntrants.length);
  const entrants = BigInt(cycleEntrants.length);
  const sieved = sievedByDepth.reduce((s, x) => s + x, 0n);
  const numbers = plan.to - plan.from;
  if (checked + sieved + exceptions + cycles + entrants + unresolved !== numbers)
    throw new Error(
      `internal error: ${checked} + ${sieved} + ${exceptions} + ${cycles} + ${entrants} + ${unresolved} numbers accounted for, the range has ${numbers}`,
    );
  return {
    map,
    from: plan.from,
    to: plan.to,
    sieveDepth: K,
    stepDepth: plan.stepDepth,
    maxSteps: plan.maxSteps,
    engine: plan.engine,
    counts: { numbers, checked, sievedByDepth, sieved, exceptions, cycleMembers: cycles, cycleEntrants: entrants, unresolved },
    glideRecords,
    pathRecords,
    maxGlide: glideRecords.at(-1) ?? null,
    maxPath: pathRecords.at(-1) ?? null,
    cycleMembers,
    cycleEntrants: cycleEntrants.slice(0, EXCEPTION_LIMIT),
    unresolvedList: stillUnresolved.slice(0, EXCEPTION_LIMIT),
    delay: plan.delay
      ? {
          records: delayRecords,
          max: delayRecords.at(-1) ?? null,
          unreached,
          unreachedList: unreachedList.sort((u, v) => (u < v ? -1 : 1)).slice(0, EXCEPTION_LIMIT),
        }
      : null,
    handoffs: handoffCount,
    blocks: plan.blocks.length,
    seconds,
  };
}
