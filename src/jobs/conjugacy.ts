// The conjugacy permutation: reading the first k parities of n as the k-bit number
// Q_k(n) = sum p_i 2^i permutes the residues mod 2^k (Terras). Its cycle structure.
import type { CollatzMap } from "../core/map.js";
import type { KernelPool, RunOptions } from "../engine/pool.js";
import { censusShards } from "./census/census.js";
import { UsageError } from "../core/errors.js";

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
  if (!Number.isInteger(depth) || depth < 1 || depth > MAX_CONJUGACY_DEPTH)
    throw new UsageError(`conjugacy depth must be between 1 and ${MAX_CONJUGACY_DEPTH}`);
  const perm = new Uint32Array(2 ** depth);
  const filled = new Uint8Array(2 ** depth);
  await pool.run(
    censusShards(map, depth, pool.size, true),
    (api, s) => api.runCensus(s),
    (_s, out) => {
      const pairs = out.leafVectors!;
      for (let i = 0; i < pairs.length; i += 2) {
        perm[pairs[i]!] = pairs[i + 1]!;
        filled[pairs[i]!] = 1;
      }
    },
    options,
  );
  if (!filled.every((x) => x === 1)) throw new Error("internal error: the census did not reach every residue");
  return perm;
}

/** @example (await conjugacy(pool, parseMap("3x+1"), 10)).cycles */
export async function conjugacy(pool: KernelPool, map: CollatzMap, depth: number, options: RunOptions = {}): Promise<ConjugacyResult> {
  const started = performance.now();
  const perm = await conjugacyPermutation(pool, map, depth, options);
  const s = cycleStructure(perm);
  const lengths = [...s.lengths.entries()].sort((x, y) => x[0] - y[0]).map(([length, count]) => ({ length, count }));
  return { map, depth, cycles: s.cycles, fixedPoints: s.fixedPoints, lengths, seconds: (performance.now() - started) / 1000 };
}
