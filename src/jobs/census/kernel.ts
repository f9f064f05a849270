// The census's kernel adapter: the tables assembly/census.ts reads (drop tables, the per-m bound of
// the fast log2 bin, the ratio bounds), one shard's run, and its tallies and channels copied out.
import { bitLength } from "../../core/arith.js";
import type { Kernel } from "../../engine/loader.js";
import type { WorkerContext } from "../../engine/worker.js";
import { collector, concat } from "../../engine/loader.js";
import type { CensusShard, CensusShardResult } from "./messages.js";
import { checkTallyStride, writeDropTables } from "../../engine/tables.js";
import { makeMap } from "../../core/map.js";
import { classFromWord } from "../../core/padic.js";

/**
 * Runs one shard of the census.
 * @example censusShard(kernel, { q: 3, r: 1, depth: 16, prefixBits: 0, prefix: 0n, vectors: false }).nodes // 131071n
 */
export function censusShard(kernel: Kernel, req: CensusShard): CensusShardResult {
  const { q, r, depth } = req;
  const L = (name: string) => kernel.layout(name);
  const tables = kernel.region("tables", L("TABLE_BYTES"));
  const tallies = kernel.region("census.tallies", L("CENSUS_TALLY_BYTES"));
  const scratch = kernel.region("census.scratch", L("CENSUS_SCRATCH_BYTES"));
  kernel.tablesFor("tables", `census ${q} ${r} ${depth}`, () => {
    // the same for every shard of a run: written once
    checkTallyStride(kernel);
    writeDropTables(kernel, tables, q, depth);
    const entries = L("TABLE_ENTRIES");
    const binMin = new BigUint64Array(kernel.memory, tables + L("TABLE_BINMIN"), entries).fill((1n << 64n) - 1n);
    binMin.set(coefficientBins(q, r, depth).map((x) => x.min));
    writeRatioBounds(new Float64Array(kernel.memory, scratch + L("CENSUS_RATIO_AT"), entries), q, r, depth);
    new Float64Array(kernel.memory, scratch + L("CENSUS_SEED_AT"), 1)[0] = ratioSeed(q, r, depth);
    writeReach(new BigUint64Array(kernel.memory, scratch + L("CENSUS_REACH_AT"), entries * entries), binMin);
  });
  const region = (channel: string) => scratch + (L(channel) - L("CHANNEL_AMBIGUOUS")) * L("CENSUS_REGION_BYTES");
  const ambiguous = collector(kernel, region("CHANNEL_AMBIGUOUS"));
  const differ = collector(kernel, region("CHANNEL_DIFFER"));
  const ratio = collector(kernel, region("CHANNEL_RATIO"));
  const vectors = pairCollector(kernel, region("CHANNEL_VECTORS"));
  const exceptions = collector(kernel, scratch + L("CENSUS_EXCEPTIONS_AT"));
  const sinks = new Map<number, { take(count: number): void }>([
    [L("CHANNEL_AMBIGUOUS"), ambiguous],
    [L("CHANNEL_DIFFER"), differ],
    [L("CHANNEL_RATIO"), ratio],
    [L("CHANNEL_VECTORS"), vectors],
    [L("CHANNEL_EXCEPTIONS"), exceptions],
  ]);
  const nodes = kernel.call(
    "census",
    [q, r, depth, req.prefixBits, req.prefix, tables, tallies, scratch, req.vectors ? 1 : 0],
    (channel, count) => sinks.get(channel)?.take(count),
  );
  const buf = kernel.memory;
  const rows = (depth + 1) * L("TALLY_STRIDE");
  const table = (i: number) => new BigUint64Array(buf, tallies + i * L("TALLY_TABLE_BYTES"), rows).slice();
  return {
    nodes: BigInt.asUintN(64, BigInt(nodes)),
    live: table(0),
    stopped: table(1),
    bins: new BigUint64Array(buf, tallies + L("CENSUS_BINS_AT"), L("CENSUS_BINS")).slice(),
    binOffset: L("CENSUS_BIN_OFFSET"),
    ...censusCounts(new BigUint64Array(buf, tallies + L("CENSUS_COUNTS_AT"), L("CENSUS_COUNTS")), L),
    ambiguous: ambiguous.all(),
    differ: differ.all(),
    ratio: ratio.all(),
    exceptionClasses: exceptions.all(),
    ...(req.vectors ? { leafVectors: vectors.all() } : {}),
  };
}

/** Per m = 0..depth, the bin of the coefficient q^m/2^depth and the fast-path bound (coefficientBin). */
export function coefficientBins(q: number, r: number, depth: number): { k: number; min: bigint }[] {
  return Array.from({ length: depth + 1 }, (_, m) => coefficientBin(q, r, m, depth));
}

function isqrt(n: bigint): bigint {
  if (n < 2n) return n;
  let x = 1n << BigInt(Math.ceil(bitLength(n) / 2));
  for (;;) {
    const y = (x + n / x) >> 1n;
    if (y >= x) return x;
    x = y;
  }
}

/**
 * The quarter-unit bin k of the coefficient q^m/2^K (k = floor(4 log2(q^m / 2^K)), exactly:
 * bitlen(q^(4m)) - 1 - 4K), and a bound `min` such that every least member a > min of a class with
 * m odd steps has T^K(a)/a in bin k. T^K(a)/a = q^m/2^K + c/(2^K a) with c = r S, 0 <= S <= S_max
 * = (q^m - 2^m) 2^(K-m) / (q - 2). For r > 0, b/a only rises above q^m/2^K, and stays below the
 * edge 2^((k+1)/4) while c/a < G = 2^((k+1)/4 + K) - q^m; G is bounded below by the integer 4th root
 * of 2^(k+1+4K) minus q^m (floor(sqrt(floor(sqrt(N)))) = floor(N^(1/4))). For r < 0 the same with
 * the lower edge 2^(k/4). A bound of 2^64 - 1 turns the fast path off for that m.
 */
function coefficientBin(q: number, r: number, m: number, K: number): { k: number; min: bigint } {
  const qm = BigInt(q) ** BigInt(m);
  const k = bitLength(qm ** 4n) - 1 - 4 * K;
  const never = (1n << 64n) - 1n;
  const cMax = (BigInt(Math.abs(r)) * (qm - (1n << BigInt(m))) * (1n << BigInt(K - m)) + BigInt(q - 3)) / BigInt(q - 2) + 1n;
  let gap: bigint;
  if (r > 0) {
    const e = k + 1 + 4 * K;
    if (e < 0) return { k, min: never };
    gap = isqrt(isqrt(1n << BigInt(e))) - qm; // <= the true gap
  } else {
    const e = k + 4 * K;
    if (e < 0) return { k, min: never };
    const root = isqrt(isqrt(1n << BigInt(e)));
    // the true lower edge 2^(e/4) is at most root + 1
    gap = qm - (root + 1n);
  }
  if (gap < 1n) return { k, min: never };
  const min = cMax / gap + 1n;
  return { k, min: min >= never ? never : min };
}

/**
 * bound[m] >= T^j(u)/u for every member u >= 1 of a class with m odd steps at any depth j >= m:
 * T^j(u) = (q^m u + r S) / 2^j with 0 <= S / 2^j <= E(m) = ((q/2)^m - 1) / (q - 2), so the ratio is
 * at most (q/2)^m + max(r, 0) E(m). Rounded up generously (x (1 + 2^-30)): it only lets the kernel
 * skip candidates that cannot win.
 */
function writeRatioBounds(out: Float64Array, q: number, r: number, depth: number): void {
  for (let m = 0; m <= depth; m++) {
    const e = ((q / 2) ** m - 1) / (q - 2);
    out[m] = ((q / 2) ** m + Math.max(r, 0) * e) * (1 + 2 ** -30) + 1e-300;
  }
}

/**
 * A lower bound on the largest T^K(u)/u, from a real member: the class of the all-odd parity
 * vector (for 3x+1, u = 2^K - 1), whose ratio is near the bound (q/2)^K. Rounded down generously:
 * the kernel reports every candidate at or above it, and the host decides exactly.
 */
function ratioSeed(q: number, r: number, depth: number): number {
  const c = classFromWord(makeMap(q, r), "1".repeat(depth));
  return c.residue > 0n && c.image > 0n ? (Number(c.image) / Number(c.residue)) * (1 - 2 ** -20) : 0;
}

/** The kernel's census counters by name (their positions: assembly/layout.ts CENSUS_COUNT_*). */
function censusCounts(counts: BigUint64Array, L: (name: string) => number) {
  const slow = L("CENSUS_COUNT_SLOW");
  return {
    nonpositive: counts[L("CENSUS_COUNT_NONPOSITIVE")]!,
    differCount: counts[L("CENSUS_COUNT_DIFFER")]!,
    early: counts[L("CENSUS_COUNT_EARLY")]!,
    slow: counts.slice(slow), // per m, to the end of the counts (CENSUS_COUNTS)
  };
}

/** reach[m * E + top] = max(binMin[m..top]) (E = TABLE_ENTRIES): the slow-bin bound of every m a subtree can reach. */
function writeReach(reach: BigUint64Array, binMin: BigUint64Array): void {
  const E = binMin.length;
  for (let m = 0; m < E; m++) {
    let most = 0n;
    for (let top = m; top < E; top++) {
      if (binMin[top]! > most) most = binMin[top]!;
      reach[m * E + top] = most;
    }
  }
}

/** CHANNEL_VECTORS chunks of (a, vector) with both below 2^32, as u32 pairs (the low halves of an entry's words 0 and 1). */
function pairCollector(kernel: Kernel, base: number) {
  const parts: Uint32Array[] = [];
  const stride = 2 * kernel.layout("ENTRY_WORDS"); // u32 halves per entry
  return {
    take(count: number) {
      const words = new Uint32Array(kernel.memory, base, count * stride);
      const out = new Uint32Array(count * 2);
      for (let i = 0; i < count; i++) {
        out[2 * i] = words[stride * i]!;
        out[2 * i + 1] = words[stride * i + 2]!;
      }
      parts.push(out);
    },
    all: () => concat(parts, (n) => new Uint32Array(n)),
  };
}

/** What this job asks of its workers. */
export const censusHandlers = {
  runCensus: (ctx: WorkerContext, req: CensusShard): CensusShardResult => censusShard(ctx.kernel(), req),
};
