// The conjugacy permutation: reading the first k parities of n as the k-bit number
// Q_k(n) = sum p_i 2^i permutes the residues mod 2^k (Terras). Its cycle structure.
import type { CollatzMap } from "../core/map.js";
import type { KernelPool, RunOptions } from "../engine/pool.js";
import { censusTasks, fullTreeLayout } from "./census/census.js";
import { concat } from "../engine/loader.js";
import { largestShare, makePlan, runWhole, shardEstimate } from "../engine/plan.js";
import type { JobKind, PartBase } from "../engine/plan.js";
import { UsageError } from "../core/errors.js";
import type { JobApi } from "../engine/worker.js";
import type { censusHandlers } from "./census/kernel.js";
import { intField, mapField, paramsCodec } from "../engine/codec.js";

export const MAX_CONJUGACY_DEPTH = 26;

export interface ConjugacyResult {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly cycles: number;
  readonly fixedPoints: number;
  /** Cycle length -> number of cycles of that length, ascending by length. */
  readonly lengths: { readonly length: number; readonly count: number }[];
  readonly seconds: number;
}

/** Cycle structure of a permutation of 0..n-1 given as perm[x]. */
export function cycleStructure(perm: Uint32Array): { cycles: number; fixedPoints: number; lengths: Map<number, number> } {
  const seen = new Uint8Array(perm.length);
  const lengths = new Map<number, number>();
  let cycles = 0;
  for (let s = 0; s < perm.length; s++) {
    if (seen[s]) continue;
    let len = 0;
    for (let x = s; !seen[x]; x = perm[x]!) {
      seen[x] = 1;
      len++;
    }
    cycles++;
    lengths.set(len, (lengths.get(len) ?? 0) + 1);
  }
  return { cycles, fixedPoints: lengths.get(1) ?? 0, lengths };
}

export interface ConjugacyParams {
  readonly map: CollatzMap;
  readonly depth: number;
}

/** A shard's (a, Q_k(a)) pairs as u32, for the residues its prefixes cover. */
export interface ConjugacyPart extends PartBase {
  readonly pairs: Uint32Array;
}

export const conjugacyJob: JobKind<ConjugacyParams, ConjugacyPart, ConjugacyResult> = {
  name: "conjugacy",
  describe: (p) => `conjugacy ${p.map.name} mod 2^${p.depth}`,
  codec: paramsCodec<ConjugacyParams>({ map: mapField, depth: intField }),
  estimate(plan, cpus) {
    const tasks = BigInt(largestShare(plan).tasks);
    const leaves = tasks << BigInt(plan.params.depth - plan.prefixBits);
    // the (a, Q(a)) pairs, 8 bytes each, held twice while they are joined and written
    return shardEstimate(leaves * 2n, 1.5e7, cpus, Number(leaves) * 16 + 2 ** 26);
  },
  async layout(_pool, p, parallelism) {
    if (!Number.isInteger(p.depth) || p.depth < 1 || p.depth > MAX_CONJUGACY_DEPTH)
      throw new UsageError(`conjugacy depth must be between 1 and ${MAX_CONJUGACY_DEPTH}`);
    return fullTreeLayout(p.map, p.depth, parallelism, true);
  },
  async runShard(pool, plan, shard, options = {}) {
    const started = performance.now();
    const parts: Uint32Array[] = [];
    await pool.run(
      censusTasks(plan, shard, true),
      (api: JobApi<typeof censusHandlers>, s) => api.runCensus(s),
      (_s, out) => parts.push(out.leafVectors!),
      options,
    );
    return { pairs: concat(parts, (n) => new Uint32Array(n)), seconds: (performance.now() - started) / 1000 };
  },
  async merge(_pool, plan, parts) {
    const { map, depth } = plan.params;
    const perm = new Uint32Array(2 ** depth);
    const filled = new Uint8Array(2 ** depth);
    for (const { pairs } of parts) {
      for (let i = 0; i < pairs.length; i += 2) {
        if (filled[pairs[i]!]) throw new Error(`the parts give residue ${pairs[i]} twice`);
        perm[pairs[i]!] = pairs[i + 1]!;
        filled[pairs[i]!] = 1;
      }
    }
    if (!filled.every((x) => x === 1)) throw new Error("internal error: the census did not reach every residue");
    const s = cycleStructure(perm);
    const lengths = [...s.lengths.entries()].sort((x, y) => x[0] - y[0]).map(([length, count]) => ({ length, count }));
    return { map, depth, cycles: s.cycles, fixedPoints: s.fixedPoints, lengths, seconds: parts.reduce((t, p) => t + p.seconds, 0) };
  },
};

/**
 * The permutation a -> Q_k(a) mod 2^k from the kernel's full tree (each leaf's path is its parity vector).
 * @example const p = await conjugacyPermutation(pool, parseMap("3x+1"), 3); // Uint32Array [0, 3, 1, 2, ...]
 */
export async function conjugacyPermutation(
  pool: KernelPool,
  map: CollatzMap,
  depth: number,
  options: RunOptions = {},
): Promise<Uint32Array> {
  const plan = await makePlan(pool, conjugacyJob, { map, depth }, 1, pool.size);
  const { pairs } = await conjugacyJob.runShard(pool, plan, 0, options);
  const perm = new Uint32Array(2 ** depth);
  for (let i = 0; i < pairs.length; i += 2) perm[pairs[i]!] = pairs[i + 1]!;
  return perm;
}

/** @example (await conjugacy(pool, parseMap("3x+1"), 10)).cycles */
export function conjugacy(pool: KernelPool, map: CollatzMap, depth: number, options: RunOptions = {}): Promise<ConjugacyResult> {
  return runWhole(pool, conjugacyJob, { map, depth }, options);
}
