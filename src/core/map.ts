// The map T(n) = n/2 for even n, (q n + r)/2 for odd n, with q and r odd.
import { LimitError, UsageError } from "./errors.js";
import { bitLength } from "./arith.js";

export interface CollatzMap {
  readonly q: number;
  readonly r: number;
  /** Canonical text, e.g. "3x+1", "3x-1". */
  readonly name: string;
}

export const MAX_Q = 99;
export const MAX_ABS_R = 2 ** 20; // exclusive
/** The kernels index tallies by depth and odd steps in 64 x 64 tables. */
export const MAX_KERNEL_DEPTH = 63;

/**
 * Parses "qx+r" or "qx-r" with q odd in [3, 99] and r odd, |r| < 2^20; spaces, a capital X and n
 * for x are accepted ("3n + 1" is 3x+1).
 * @example parseMap("3x+1") // { q: 3, r: 1, name: "3x+1" }
 */
export function parseMap(text: string): CollatzMap {
  const match = /^(\d+)[xn]([+-])(\d+)$/.exec(text.replace(/\s+/g, "").toLowerCase());
  if (!match) {
    throw new UsageError(`map "${text}" is not of the form qx+r or qx-r (for example 3x+1, 3n+1 or 5x-3)`);
  }
  const q = Number(match[1]);
  const absR = Number(match[3]);
  if (!Number.isSafeInteger(q) || q < 3 || q > MAX_Q) throw new UsageError(`map "${text}": q must be between 3 and ${MAX_Q}`);
  if (q % 2 === 0) throw new UsageError(`map "${text}": q must be odd`);
  if (!Number.isSafeInteger(absR) || absR >= MAX_ABS_R) throw new UsageError(`map "${text}": |r| must be below 2^20`);
  if (absR % 2 === 0) throw new UsageError(`map "${text}": r must be odd`);
  const r = match[2] === "-" ? -absR : absR;
  return makeMap(q, r);
}

/** Builds a map from validated parts. @example makeMap(3, 1).name // "3x+1" */
export function makeMap(q: number, r: number): CollatzMap {
  if (!(Number.isInteger(q) && q % 2 === 1 && q >= 3 && q <= MAX_Q)) throw new UsageError(`q = ${q}: must be odd, 3 <= q <= ${MAX_Q}`);
  if (!(Number.isInteger(r) && Math.abs(r) % 2 === 1 && Math.abs(r) < MAX_ABS_R))
    throw new UsageError(`r = ${r}: must be odd with |r| < 2^20`);
  return { q, r, name: `${q}x${r < 0 ? "-" : "+"}${Math.abs(r)}` };
}

/** One step of the map on a BigInt. @example step(makeMap(3, 1), 7n) // 11n */
export function step(map: CollatzMap, n: bigint): bigint {
  return (n & 1n) === 0n ? n >> 1n : (BigInt(map.q) * n + BigInt(map.r)) >> 1n;
}

/** bitlen(q^m): the least depth j with q^m < 2^j (q^m is odd, never a power of two past m = 0). */
export function dropDepth(q: number, m: number): number {
  const p = BigInt(q) ** BigInt(m);
  return p === 1n ? 1 : bitLength(p);
}

/**
 * bitlen(q^m) for m = 0..upTo, kept incrementally (one multiplication per m): multiplying by q adds
 * bitlen(q) - 1 or bitlen(q) bits. Strictly increasing, so at most one m drops at each depth.
 * @example dropDepths(3, 4) // [1, 2, 4, 5, 7]
 */
export function dropDepths(q: number, upTo: number): number[] {
  const drop: number[] = [1];
  const qq = BigInt(q);
  const qBits = bitLength(qq);
  let p = 1n;
  let bits = 1;
  for (let m = 1; m <= upTo; m++) {
    p *= qq;
    bits += qBits - 1;
    if (p >> BigInt(bits) !== 0n) bits++;
    drop.push(bits);
  }
  return drop;
}

/**
 * For each depth j = 0..depth, the odd steps m of the classes whose coefficient first drops at j
 * (the unique m with bitlen(q^m) = j), or null when no class can stop there.
 */
export function stoppingOdds(q: number, depth: number): (number | null)[] {
  const out = new Array<number | null>(depth + 1).fill(null);
  dropDepths(q, depth).forEach((j, m) => {
    if (j <= depth) out[j] = m;
  });
  return out;
}

/**
 * Bound on |b| over all classes a mod 2^j (0 <= a < 2^j) with m odd steps:
 * b = (q^m a + r S) / 2^j with 0 <= S / 2^j <= E(m) = (q^m - 2^m) / ((q - 2) 2^m).
 * Returns [lower, upper] with lower <= b and b < upper for classes of size 2^j, any j.
 */
function imageBounds(map: CollatzMap, m: number, scale: bigint): [bigint, bigint] {
  const q = BigInt(map.q);
  const qm = q ** BigInt(m);
  const twoM = 1n << BigInt(m);
  const den = (q - 2n) * twoM;
  const eCeil = (qm - twoM + den - 1n) / den; // ceil(E(m))
  const r = BigInt(map.r);
  // + |r| + q covers q (v >> 1) = b' - (q + r) / 2, the product formed before H is added.
  const upper = scale * qm + (r > 0n ? r * eCeil : 0n) + (r < 0n ? -r : r) + q + 1n;
  const lower = r < 0n ? r * eCeil - 1n : 0n;
  return [lower, upper];
}

/**
 * The deepest enumeration the 64-bit kernels (or, with width 128, the 128-bit path) can run for
 * this map without any wraparound:
 * every image b and every intermediate T^j(a + e 2^j) = b + e q^m (bounded by 2 q^m + ...) fits
 * u64 when r > 0 and i64 when r < 0. For 3x+1 this is 40 (3^40 < 2^64 < 3^41).
 * @example kernelDepthLimit(makeMap(3, 1)) // 40
 */
export function kernelDepthLimit(map: CollatzMap, width: 64 | 128 | "i64" = 64): number {
  // 64: u64 when r > 0, i64 when r < 0; "i64": signed whatever r; 128: signed (two u64 words).
  const signed = width !== 64 || map.r < 0;
  const bits = width === 128 ? 127n : signed ? 63n : 64n;
  const top = 1n << bits;
  const bottom = signed ? -top : 0n;
  let depth = 0;
  for (let k = 1; k <= MAX_KERNEL_DEPTH; k++) {
    // depth k needs images with m <= k, and intermediates with m <= k - 1 at scale 2.
    const [lo, hi] = imageBounds(map, k, 1n);
    const [lo2, hi2] = imageBounds(map, k - 1, 2n);
    if (hi > top || hi2 > top || lo < bottom || lo2 < bottom) break;
    depth = k;
  }
  return depth;
}

/** Refuses a depth the 64-bit kernels cannot run exactly. */
export function checkKernelDepth(map: CollatzMap, depth: number): void {
  const limit = kernelDepthLimit(map);
  if (depth > limit) {
    throw new LimitError(
      `depth ${depth} is beyond the exact 64-bit range for ${map.name} (at most ${limit}: q^m and the class images must fit ` +
        `${map.r > 0 ? "u64" : "i64"}); no wider kernel path exists yet`,
    );
  }
}
