// Plain BigInt references written for the tests, independent of src/ arithmetic.
import type { CollatzMap } from "../src/core/map.js";
import { Kernel } from "../src/engine/loader.js";
import type { CensusShard, CensusShardResult } from "../src/jobs/census/messages.js";
import type { CycleShard, CycleShardResult } from "../src/jobs/cycles/messages.js";
import type { LeafChunk, ShardRequest, ShardResult } from "../src/jobs/sieve/messages.js";
import { enumerateShard } from "../src/jobs/sieve/kernel.js";
import { censusShard } from "../src/jobs/census/kernel.js";
import { cycleShard } from "../src/jobs/cycles/kernel.js";
import { loadKernelModule } from "../src/node/kernel.js";
import type { Flavour } from "../src/node/kernel.js";

/** T on BigInt, written out again here rather than imported. */
export function T(q: bigint, r: bigint, n: bigint): bigint {
  return n % 2n === 0n ? n / 2n : (q * n + r) / 2n;
}

/** The first `k` parities of n, first step first. */
export function parities(map: CollatzMap, n: bigint, k: number): number[] {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  const out: number[] = [];
  for (let i = 0; i < k; i++) {
    const p = ((n % 2n) + 2n) % 2n;
    out.push(Number(p));
    n = T(q, r, n);
  }
  return out;
}

/**
 * Coefficient stopping time of n's class within `k` steps, by iterating n itself: the least j with
 * q^m < 2^j (m = odd steps among the first j), with T^j(n); null if none within k.
 */
export function coefficientStop(map: CollatzMap, n: bigint, k: number): { j: number; m: number; image: bigint } | null {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let m = 0;
  let v = n;
  for (let j = 1; j <= k; j++) {
    if (((v % 2n) + 2n) % 2n === 1n) m++;
    v = T(q, r, v);
    if (q ** BigInt(m) < 2n ** BigInt(j)) return { j, m, image: v };
  }
  return null;
}

/** One kernel instance with the three jobs' adapters, as the workers call them. */
export interface KernelInstance {
  enumerate(req: ShardRequest, onLeaves?: (chunk: LeafChunk) => void): ShardResult;
  census(req: CensusShard): CensusShardResult;
  cycles(req: CycleShard): CycleShardResult;
}

export async function kernelOf(flavour: Flavour): Promise<KernelInstance> {
  const k = await Kernel.instantiate(await loadKernelModule(flavour));
  return {
    enumerate: (req, onLeaves) => enumerateShard(k, req, onLeaves),
    census: (req) => censusShard(k, req),
    cycles: (req) => cycleShard(k, req),
  };
}

/** One whole-tree kernel run with its leaves collected. */
export function runAll(
  kernel: KernelInstance,
  req: Omit<ShardRequest, "prefixBits" | "prefix" | "walkTallies"> & Partial<ShardRequest>,
): { res: ShardResult; leaves: LeafChunk[] } {
  const leaves: LeafChunk[] = [];
  const res = kernel.enumerate({ prefixBits: 0, prefix: 0n, walkTallies: true, ...req }, (c) => leaves.push(c));
  return { res, leaves };
}

export function rowSums(tally: BigUint64Array, depth: number): bigint[] {
  const out: bigint[] = [];
  for (let j = 0; j <= depth; j++) {
    let s = 0n;
    for (let m = 0; m < 64; m++) s += tally[j * 64 + m]!;
    out.push(s);
  }
  return out;
}

export function allResidues(leaves: LeafChunk[]): bigint[] {
  return leaves.flatMap((c) => Array.from(c.a));
}

export function sortBig(xs: bigint[]): bigint[] {
  return xs.sort((u, v) => (u < v ? -1 : u > v ? 1 : 0));
}
