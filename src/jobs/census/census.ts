// Census of all 2^K parity vectors: the kernel's full-tree tallies (assembly/census.ts) merged and
// finished exactly here: ambiguous log2 bins and the largest ratio are decided in BigInt.
import type { CollatzMap } from "../../core/map.js";
import { kernelDepthLimit } from "../../core/map.js";
import { TALLY_STRIDE } from "../../engine/messages.js";
import type { CensusShard, CensusShardResult } from "../../engine/messages.js";
import { choosePrefixBits } from "../../engine/plan.js";
import { coefficientBins } from "./kernel.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { exactCounts } from "../../core/exact.js";
import type { Level } from "../../core/exact.js";
import { classFromResidue, firstDescent } from "../../core/padic.js";
import { LimitError, UsageError } from "../../core/errors.js";
import { bitLength } from "../../core/arith.js";
import { Smallest } from "../../core/smallest.js";

export const MAX_CENSUS_DEPTH = 32;
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
  /** The largest T^j(a)/a over a in [1, 2^K), j <= K, with its class a mod 2^K. */
  readonly maxRatio: { readonly n: bigint; readonly step: number; readonly value: bigint };
  /** The live and stopped tables equal the exact counter's. */
  readonly agreesWithExactCounter: boolean;
  readonly nodes: bigint;
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

/** The census shards: 2^d prefixes (the kernel tallies each ancestor in the shard that owns it). */
export function censusShards(map: CollatzMap, depth: number, workers: number, vectors: boolean): CensusShard[] {
  // census nodes cost several times a sieve's: larger shards keep the host's merging small
  const d = Math.min(choosePrefixBits(map, depth, "full", workers, vectors, 2n ** 24n), depth);
  const shards: CensusShard[] = [];
  for (let s = 0n; s < 1n << BigInt(d); s++) shards.push({ q: map.q, r: map.r, depth, prefixBits: d, prefix: s, vectors });
  return shards;
}

/**
 * Runs the census of all 2^depth parity vectors.
 * @example const c = await runCensus(pool, parseMap("3x+1"), 20); c.agreesWithExactCounter // true
 */
export async function runCensus(pool: KernelPool, map: CollatzMap, depth: number, options: RunOptions = {}): Promise<CensusResult> {
  if (!Number.isInteger(depth) || depth < 1 || depth > MAX_CENSUS_DEPTH)
    throw new UsageError(`census depth must be between 1 and ${MAX_CENSUS_DEPTH}`);
  const limit = kernelDepthLimit(map, "i64");
  if (depth > limit)
    throw new LimitError(`census depth ${depth} is beyond the exact signed 64-bit range for ${map.name} (at most ${limit})`);
  const started = performance.now();
  const n = (depth + 1) * TALLY_STRIDE;
  const acc = { live: new BigUint64Array(n), stopped: new BigUint64Array(n), vectors: new BigUint64Array(n), peak: new BigUint64Array(n) };
  // sized and offset as the kernel's (binOffset)
  const acc2: { bins: BigUint64Array | null; binOffset: number } = { bins: null, binOffset: 0 };
  let nonpositive = 0n,
    differCount = 0n,
    early = 0n,
    nodes = 0n;
  const ambiguous: [bigint, bigint][] = [];
  const slow = new BigUint64Array(depth + 1);
  const differ = new Smallest<bigint>(DIFFER_LISTED, (n) => n);
  // T^0(1)/1 = 1 is always a candidate (the kernel reports members from step 1 and a > 0 classes)
  const top = { best: { n: 1n, value: 1n, step: 0 } };
  const signed = map.r < 0;
  const merge = (out: CensusShardResult) => {
    addInto(acc.live, out.live);
    addInto(acc.stopped, out.stopped);
    addInto(acc.vectors, out.vectors);
    addInto(acc.peak, out.peak);
    acc2.bins ??= new BigUint64Array(out.bins.length);
    acc2.binOffset = out.binOffset;
    addInto(acc2.bins, out.bins);
    nonpositive += out.counts[0]!;
    differCount += out.counts[1]!;
    early += out.counts[2]!;
    for (let m = 0; m <= depth; m++) slow[m] = slow[m]! + out.counts[4 + m]!;
    nodes += out.nodes;
    for (let i = 0; i < out.ambiguous.length; i += 4)
      ambiguous.push([out.ambiguous[i]!, signed ? BigInt.asIntN(64, out.ambiguous[i + 1]!) : out.ambiguous[i + 1]!]);
    for (let i = 0; i < out.differ.length; i += 4) differ.add(out.differ[i]!);
    for (let i = 0; i < out.ratio.length; i += 4) {
      const u = out.ratio[i]!,
        v = out.ratio[i + 1]!,
        step = Number(out.ratio[i + 2]!);
      // exact comparison v / u > best.value / best.n by cross multiplication (positive values);
      // ties go to the smaller member, then the earlier step
      const best = top.best;
      const lhs = v * best.n,
        rhs = best.value * u;
      if (lhs > rhs || (lhs === rhs && (u < best.n || (u === best.n && step < best.step)))) top.best = { n: u, value: v, step };
    }
  };
  await pool.run(
    censusShards(map, depth, pool.size, false),
    (api, s) => api.runCensus(s),
    (_s, out) => merge(out),
    options,
  );

  const binsOf = acc2.bins;
  const binOffset = acc2.binOffset;
  if (!binsOf) throw new Error("internal error: the census ran no shard");
  for (const [a, b] of ambiguous) binsOf[quarterLog2(a, b) + binOffset]!++;
  // The fast-path leaves: with m odd steps, all leaves (nodes at depth K) but the slow ones and a = 0.
  const vectors = nodesFromParents(rows(acc.vectors, depth));
  coefficientBins(map.q, map.r, depth).forEach(({ k }, m) => {
    const fast = vectors[depth]![m]! - slow[m]! - (m === 0 ? 1n : 0n);
    binsOf[k + binOffset] = binsOf[k + binOffset]! + fast;
  });
  const ratioBins: CensusResult["ratioBins"] = [];
  binsOf.forEach((count, i) => {
    if (count > 0n) ratioBins.push({ bin: i - binOffset, count });
  });
  const live = rows(acc.live, depth),
    stopped = rows(acc.stopped, depth);
  const exact = exactCounts(map, depth, { byOdd: true }).byOdd!;
  const agrees =
    live.every((row, j) => row.every((c, m) => c === at(exact[j]!, "live", m))) &&
    stopped.every((row, j) => row.every((c, m) => c === at(exact[j]!, "stopped", m)));
  const levels = live.map((row, j) => ({
    depth: j,
    survivors: row.reduce((s, x) => s + x, 0n),
    stopped: stopped[j]!.reduce((s, x) => s + x, 0n),
  }));
  const listed = differ
    .sorted()
    .map((n) => ({ n, descent: firstDescent(map, n, depth), stoppingTime: classFromResidue(map, n, depth).stoppingTime }));
  return {
    map,
    depth,
    levels,
    live,
    stopped,
    vectors,
    peak: rows(acc.peak, depth),
    ratioBins,
    nonpositive,
    differ: { count: differCount, early, listed, limit: DIFFER_LISTED },
    maxRatio: top.best,
    agreesWithExactCounter: agrees,
    nodes,
    seconds: (performance.now() - started) / 1000,
  };
}

/** Nodes at (j, m): the root, then the children of parents (j - 1, m) (even) and (j - 1, m - 1) (odd). */
function nodesFromParents(parents: bigint[][]): bigint[][] {
  return parents.map((row, j) => row.map((_, m) => (j === 0 ? 1n : (parents[j - 1]![m] ?? 0n) + (m > 0 ? parents[j - 1]![m - 1]! : 0n))));
}

function at(row: { mLow: number; live: bigint[]; stopped: bigint[] }, key: "live" | "stopped", m: number): bigint {
  return m < row.mLow ? 0n : (row[key][m - row.mLow] ?? 0n);
}
