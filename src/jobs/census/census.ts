// Census of all 2^K parity vectors. What depends on the parity vector alone (alive and stopped
// classes, vectors and peak coefficients by (j, m)) is a lattice-path count (core/exact.ts); what
// depends on the residue (log2 bins, descents that differ, the largest ratio) comes from the kernel
// (assembly/census.ts), merged and finished exactly here: ambiguous bins and the ratio in BigInt.
import type { CollatzMap } from "../../core/map.js";
import { kernelDepthLimit } from "../../core/map.js";
import { TALLY_STRIDE } from "../../engine/messages.js";
import type { Mode } from "../../engine/messages.js";
import type { CensusShard, CensusShardResult } from "./messages.js";
import { concat, threadKernel } from "../../engine/loader.js";
import { decodeExceptionClasses, EXCEPTION_LIMIT, expandExceptions } from "../sieve/exceptions.js";
import type { SieveException } from "../sieve/exceptions.js";
import { choosePrefixBits, largestShare, runWhole, shardEstimate, shardPrefixes } from "../../engine/plan.js";
import type { JobKind, PartBase, Plan } from "../../engine/plan.js";
import { coefficientBins } from "./kernel.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { exactCounts, pathCounts, peakCounts } from "../../core/exact.js";
import type { Level } from "../../core/exact.js";
import { classFromResidue, firstDescent } from "../../core/padic.js";
import { LimitError, UsageError } from "../../core/errors.js";
import { bitLength } from "../../core/arith.js";
import { Smallest } from "../../core/smallest.js";
import type { JobApi } from "../../engine/worker.js";
import type { censusHandlers } from "./kernel.js";
import { intField, mapField, paramsCodec } from "../../engine/codec.js";

export const MAX_CENSUS_DEPTH = 32;

/**
 * The deepest run of a map the page and CLI allow: the sieve (survivors) to its exact 64-bit limit,
 * the census (full) to MAX_CENSUS_DEPTH within the signed limit.
 * @example runDepthLimit(parseMap("3x+1"), "survivors") // 40
 */
export function runDepthLimit(map: CollatzMap, mode: Mode): number {
  return mode === "full" ? Math.min(MAX_CENSUS_DEPTH, kernelDepthLimit(map, "i64")) : kernelDepthLimit(map);
}

/** Least members listed among those whose descent differs (the smallest; the count is exact). */
export const DIFFER_LISTED = 1000;

export interface CensusResult {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly levels: Level[];
  /** [j][m], m = 0..j: alive classes, first drops, all vectors (C(j, m) nodes), peaks of q^m/2^j. */
  readonly live: bigint[][];
  readonly stopped: bigint[][];
  readonly vectors: bigint[][];
  readonly peak: bigint[][];
  /** Least members a in [1, 2^K) by floor(4 log2(T^K(a)/a)): bin k holds log2 in [k/4, (k+1)/4). */
  readonly ratioBins: { readonly bin: number; readonly count: bigint }[];
  /** Least members with T^K(a) <= 0 (possible only when r < 0). */
  readonly nonpositive: bigint;
  /** Least members whose first descent differs from their coefficient stopping time (within K). */
  readonly differ: {
    readonly count: bigint;
    readonly early: bigint;
    /** The smallest of them, ascending, at most `limit`. */
    readonly listed: { readonly n: bigint; readonly descent: number | null; readonly stoppingTime: number | null }[];
    readonly limit: number;
  };
  /** The sieve's exceptions (positive members that do not descend at their class's stopping depth,
   * any size): the smallest, ascending, at most exceptionLimit; the count is exact. */
  readonly exceptions: SieveException[];
  readonly exceptionCount: bigint;
  readonly exceptionLimit: number;
  /** The largest T^j(a)/a over a in [1, 2^K), j <= K, with its class a mod 2^K. */
  readonly maxRatio: { readonly n: bigint; readonly step: number; readonly value: bigint };
  /** The kernel's live and stopped tables (the live part of its walk) equal the exact counter's. */
  readonly agreesWithExactCounter: boolean;
  /** Nodes of the full tree: 2^(K+1) - 1 (every vector of length <= K). */
  readonly nodes: bigint;
  /** Nodes the kernel walked (the rest lie in subtrees shown to hold nothing residue-dependent;
   * depends on how the run was split). */
  readonly walked: bigint;
  readonly seconds: number;
}

/** Exact floor(4 log2(b / a)) for positive a, b. */
export function quarterLog2(a: bigint, b: bigint): number {
  const num = b ** 4n,
    den = a ** 4n;
  let k = bitLength(num) - bitLength(den);
  const fits = (t: number) => (t >= 0 ? den << BigInt(t) <= num : den <= num << BigInt(-t));
  while (!fits(k)) k--;
  while (fits(k + 1)) k++;
  return k;
}

function rows(flat: BigUint64Array, depth: number): bigint[][] {
  return Array.from({ length: depth + 1 }, (_, j) => Array.from(flat.subarray(j * TALLY_STRIDE, j * TALLY_STRIDE + j + 1)));
}

function addInto(acc: BigUint64Array, x: BigUint64Array): void {
  // class counts <= 2^K <= 2^32 each: sums cannot wrap. Most entries are zero: test the words
  // first, so that only the nonzero ones cost a BigInt addition.
  const w = new Uint32Array(x.buffer, x.byteOffset, x.length * 2);
  for (let i = 0; i < acc.length; i++) if ((w[2 * i]! | w[2 * i + 1]!) !== 0) acc[i] = acc[i]! + x[i]!;
}

export interface CensusParams {
  readonly map: CollatzMap;
  readonly depth: number;
}

/** The largest T^j(a)/a seen so far: T^step(n) = value. */
interface Ratio {
  readonly n: bigint;
  readonly value: bigint;
  readonly step: number;
}

/** A shard's census tallies, summed over its tasks, with its ambiguous bins already decided. */
export interface CensusPart
  extends PartBase,
    Pick<CensusShardResult, "nodes" | "live" | "stopped" | "binOffset" | "nonpositive" | "differCount" | "early" | "slow"> {
  /** bins[k + binOffset]: least members binned by the kernel or decided exactly here. */
  readonly bins: BigUint64Array;
  /** The smallest least members whose descent differs, ascending (at most DIFFER_LISTED). */
  readonly differ: BigUint64Array;
  /** Dropping classes with b >= a, 4 u64 each (a, b raw bits, j, m). */
  readonly exceptionClasses: BigUint64Array;
  readonly best: Ratio;
}

/** Exact comparison: does T^step(u) = v beat the best ratio (ties: the smaller member, then the earlier step)? */
function beats(u: bigint, v: bigint, step: number, best: Ratio): boolean {
  const lhs = v * best.n,
    rhs = best.value * u;
  return lhs > rhs || (lhs === rhs && (u < best.n || (u === best.n && step < best.step)));
}

/** Sums kernel results and parts alike (associative: sums, the smallest members, the best ratio). */
class CensusTally {
  nodes = 0n;
  readonly live: BigUint64Array;
  readonly stopped: BigUint64Array;
  readonly bins: BigUint64Array;
  readonly slow: BigUint64Array;
  nonpositive = 0n;
  differCount = 0n;
  early = 0n;
  private readonly differ = new Smallest<bigint>(DIFFER_LISTED, (n) => n);
  private readonly exceptionClasses: BigUint64Array[] = [];
  // T^0(1)/1 = 1 is always a candidate (the kernel reports members from step 1 and a > 0 classes)
  best: Ratio = { n: 1n, value: 1n, step: 0 };

  constructor(
    private readonly depth: number,
    binCount: number,
    readonly binOffset: number,
  ) {
    const n = (depth + 1) * TALLY_STRIDE;
    this.live = new BigUint64Array(n);
    this.stopped = new BigUint64Array(n);
    this.bins = new BigUint64Array(binCount);
    this.slow = new BigUint64Array(depth + 1);
  }

  private addTables(x: Pick<CensusPart, "live" | "stopped" | "bins" | "nodes">): void {
    addInto(this.live, x.live);
    addInto(this.stopped, x.stopped);
    addInto(this.bins, x.bins);
    this.nodes += x.nodes;
  }

  /** One kernel task's result; its ambiguous bins are decided here, in BigInt. */
  addShard(out: CensusShardResult, signed: boolean): void {
    if (out.binOffset !== this.binOffset || out.bins.length !== this.bins.length) throw new Error("internal error: census bins differ");
    this.addTables(out);
    this.nonpositive += out.nonpositive;
    this.differCount += out.differCount;
    this.early += out.early;
    for (let m = 0; m <= this.depth; m++) this.slow[m] = this.slow[m]! + out.slow[m]!;
    for (let i = 0; i < out.ambiguous.length; i += 4) {
      const b = signed ? BigInt.asIntN(64, out.ambiguous[i + 1]!) : out.ambiguous[i + 1]!;
      this.bins[quarterLog2(out.ambiguous[i]!, b) + this.binOffset]!++;
    }
    for (let i = 0; i < out.differ.length; i += 4) this.differ.add(out.differ[i]!);
    this.exceptionClasses.push(out.exceptionClasses);
    for (let i = 0; i < out.ratio.length; i += 4) {
      const u = out.ratio[i]!,
        v = out.ratio[i + 1]!,
        step = Number(out.ratio[i + 2]!);
      if (beats(u, v, step, this.best)) this.best = { n: u, value: v, step };
    }
  }

  addPart(p: CensusPart): void {
    if (p.binOffset !== this.binOffset || p.bins.length !== this.bins.length) throw new Error("census parts of another layout");
    this.addTables(p);
    this.nonpositive += p.nonpositive;
    this.differCount += p.differCount;
    this.early += p.early;
    for (let m = 0; m <= this.depth; m++) this.slow[m] = this.slow[m]! + p.slow[m]!;
    for (const n of p.differ) this.differ.add(n);
    this.exceptionClasses.push(p.exceptionClasses);
    if (beats(p.best.n, p.best.value, p.best.step, this.best)) this.best = p.best;
  }

  part(seconds: number): CensusPart {
    const { nodes, live, stopped, bins, binOffset, nonpositive, differCount, early, slow, best } = this;
    const differ = BigUint64Array.from(this.differ.sorted());
    const exceptionClasses = concat(this.exceptionClasses, (n) => new BigUint64Array(n));
    return { nodes, live, stopped, bins, binOffset, nonpositive, differCount, early, slow, differ, exceptionClasses, best, seconds };
  }

  /** The census itself: the lattice-path tables, the fast-path bins, the exact counter's cross-check, the lists. */
  finish(map: CollatzMap, seconds: number): CensusResult {
    const depth = this.depth;
    const binsOf = this.bins.slice();
    // The fast-path leaves: with m odd steps, all leaves (nodes at depth K) but the slow ones and a = 0.
    const vectors = pathCounts(depth, () => true); // C(j, m)
    coefficientBins(map.q, map.r, depth).forEach(({ k }, m) => {
      const fast = vectors[depth]![m]! - this.slow[m]! - (m === 0 ? 1n : 0n);
      binsOf[k + this.binOffset] = binsOf[k + this.binOffset]! + fast;
    });
    const ratioBins: CensusResult["ratioBins"] = [];
    binsOf.forEach((count, i) => {
      if (count > 0n) ratioBins.push({ bin: i - this.binOffset, count });
    });
    const live = rows(this.live, depth),
      stopped = rows(this.stopped, depth);
    const exact = exactCounts(map, depth, { byOdd: true }).byOdd!;
    const agrees =
      live.every((row, j) => row.every((c, m) => c === at(exact[j]!, "live", m))) &&
      stopped.every((row, j) => row.every((c, m) => c === at(exact[j]!, "stopped", m)));
    const levels = live.map((row, j) => ({
      depth: j,
      survivors: row.reduce((s, x) => s + x, 0n),
      stopped: stopped[j]!.reduce((s, x) => s + x, 0n),
    }));
    const classes = this.exceptionClasses.flatMap((raw) => decodeExceptionClasses(raw, map.r < 0));
    const exceptions = expandExceptions(map, classes, EXCEPTION_LIMIT);
    const listed = this.differ
      .sorted()
      .map((n) => ({ n, descent: firstDescent(map, n, depth), stoppingTime: classFromResidue(map, n, depth).stoppingTime }));
    return {
      map,
      depth,
      levels,
      live,
      stopped,
      vectors,
      peak: peakCounts(map.q, depth),
      ratioBins,
      nonpositive: this.nonpositive,
      differ: { count: this.differCount, early: this.early, listed, limit: DIFFER_LISTED },
      exceptions: exceptions.list,
      exceptionCount: exceptions.count,
      exceptionLimit: EXCEPTION_LIMIT,
      maxRatio: this.best,
      agreesWithExactCounter: agrees,
      nodes: (2n << BigInt(depth)) - 1n,
      walked: this.nodes,
      seconds,
    };
  }
}

/** Checks a census depth for the map: one clear error. */
function checkCensusDepth(map: CollatzMap, depth: number, max: number, what: string): void {
  if (!Number.isInteger(depth) || depth < 1 || depth > max) throw new UsageError(`${what} depth must be between 1 and ${max}`);
  const limit = kernelDepthLimit(map, "i64");
  if (depth > limit)
    throw new LimitError(`${what} depth ${depth} is beyond the exact signed 64-bit range for ${map.name} (at most ${limit})`);
}

/**
 * The layout of a full-tree job (census, conjugacy): all 2^d prefixes, d chosen for `parallelism`
 * (census nodes cost several times a sieve's: larger tasks keep the host's merging small).
 */
export function fullTreeLayout(map: CollatzMap, depth: number, parallelism: number, vectors: boolean) {
  const d = Math.min(choosePrefixBits(map, depth, "full", parallelism, vectors, 2n ** 24n), depth);
  return { prefixBits: d, prefixes: null, tasks: 2 ** d };
}

/** The kernel tasks of one shard of a full-tree plan. */
export function censusTasks(plan: Plan<CensusParams>, shard: number, vectors: boolean): CensusShard[] {
  const { map, depth } = plan.params;
  return shardPrefixes(plan, shard).map((prefix) => ({ q: map.q, r: map.r, depth, prefixBits: plan.prefixBits, prefix, vectors }));
}

export const censusJob: JobKind<CensusParams, CensusPart, CensusResult> = {
  name: "census",
  describe: (p) => `census ${p.map.name} 2^${p.depth}`,
  codec: paramsCodec<CensusParams>({ map: mapField, depth: intField }),
  estimate(plan, cpus) {
    const share = BigInt(largestShare(plan).tasks) << BigInt(plan.params.depth + 1 - plan.prefixBits);
    return shardEstimate(share, 1.5e7, cpus, 2 ** 26);
  },
  async layout(_pool, p, parallelism) {
    checkCensusDepth(p.map, p.depth, MAX_CENSUS_DEPTH, "census");
    return fullTreeLayout(p.map, p.depth, parallelism, false);
  },
  async runShard(pool, plan, shard, options = {}) {
    const started = performance.now();
    const tasks = censusTasks(plan, shard, false);
    const kernel = await threadKernel(pool.module);
    const tally = new CensusTally(plan.params.depth, kernel.layout("CENSUS_BINS"), kernel.layout("CENSUS_BIN_OFFSET"));
    const signed = plan.params.map.r < 0;
    await pool.run(
      tasks,
      (api: JobApi<typeof censusHandlers>, s) => api.runCensus(s),
      (_s, out) => tally.addShard(out, signed),
      options,
    );
    return tally.part((performance.now() - started) / 1000);
  },
  async merge(pool, plan, parts) {
    const kernel = await threadKernel(pool.module);
    const tally = new CensusTally(plan.params.depth, kernel.layout("CENSUS_BINS"), kernel.layout("CENSUS_BIN_OFFSET"));
    for (const p of parts) tally.addPart(p);
    return tally.finish(
      plan.params.map,
      parts.reduce((s, p) => s + p.seconds, 0),
    );
  },
};

/**
 * Runs the census of all 2^depth parity vectors: one shard of the plan layer, merged.
 * @example const c = await runCensus(pool, parseMap("3x+1"), 20); c.agreesWithExactCounter // true
 */
export function runCensus(pool: KernelPool, map: CollatzMap, depth: number, options: RunOptions = {}): Promise<CensusResult> {
  return runWhole(pool, censusJob, { map, depth }, options);
}

function at(row: { mLow: number; live: bigint[]; stopped: bigint[] }, key: "live" | "stopped", m: number): bigint {
  return m < row.mLow ? 0n : (row[key][m - row.mLow] ?? 0n);
}
