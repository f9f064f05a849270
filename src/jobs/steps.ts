// Step tables: for every a mod 2^k the pair (m, b) with T^k(a + 2^k x) = q^m x + b, the
// acceleration table that verification codes use to take k steps at once (Lagarias 1985; common practice).
import type { CollatzMap } from "../core/map.js";
import { checkKernelDepth } from "../core/map.js";
import type { KernelPool, RunOptions } from "../engine/pool.js";
import { runSieve } from "./sieve/sieve.js";
import { UsageError } from "../core/errors.js";

export const MAX_STEP_DEPTH = 24;

export interface StepTable {
  readonly map: CollatzMap;
  readonly depth: number;
  /** odd[a] = m. */
  readonly odd: Uint8Array;
  /** image[a] = b; signed when r < 0. */
  readonly image: BigInt64Array | BigUint64Array;
}

/**
 * The full table for all 2^depth residues (full-mode enumeration, leaves scattered by residue).
 * @example const t = await stepTable(pool, parseMap("3x+1"), 2); t.image // [0n, 1n, 1n, 8n]
 */
export async function stepTable(pool: KernelPool, map: CollatzMap, depth: number, options: RunOptions = {}): Promise<StepTable> {
  if (!Number.isInteger(depth) || depth < 1 || depth > MAX_STEP_DEPTH)
    throw new UsageError(`step table depth must be between 1 and ${MAX_STEP_DEPTH}`);
  checkKernelDepth(map, depth);
  const size = 2 ** depth;
  const odd = new Uint8Array(size);
  const image = map.r < 0 ? new BigInt64Array(size) : new BigUint64Array(size);
  let filled = 0;
  await runSieve(
    pool,
    {
      map,
      depth,
      mode: "full",
      onLeaves: (c) => {
        const words = new Uint32Array(c.a.buffer, c.a.byteOffset, c.a.length * 2);
        for (let i = 0; i < c.a.length; i++) {
          const a = words[2 * i]!; // a < 2^24
          odd[a] = c.m[i]!;
          image[a] = c.b[i]!;
        }
        filled += c.a.length;
      },
    },
    options,
  );
  if (filled !== size) throw new Error(`internal error: ${filled} of ${size} residues enumerated`);
  return { map, depth, odd, image };
}

/**
 * k steps at once from the table: T^k(n) = q^m x + b for n = a + 2^k x.
 * @example applySteps(table, 27n) // T^k(27)
 */
export function applySteps(table: StepTable, n: bigint): bigint {
  const k = BigInt(table.depth);
  const a = Number(n & ((1n << k) - 1n));
  return BigInt(table.map.q) ** BigInt(table.odd[a]!) * (n >> k) + BigInt(table.image[a]!);
}

/** Offset of the image array in a raw step table: after 2^k bytes of odd steps, 8-aligned. */
export function stepImageOffset(depth: number): number {
  return Math.ceil(2 ** depth / 8) * 8;
}

/**
 * A step table as its raw file holds it, in order and without copies: odd_steps (u8 per residue),
 * zero padding to stepImageOffset, image (8 bytes per residue, little-endian).
 */
export function stepTableRaw(t: StepTable): Uint8Array[] {
  return [
    t.odd,
    new Uint8Array(stepImageOffset(t.depth) - t.odd.length),
    new Uint8Array(t.image.buffer, t.image.byteOffset, t.image.byteLength),
  ];
}
