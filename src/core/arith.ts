// Exact integer helpers shared by the BigInt code (no floating point).

/** Bit length of n >= 0 (0 for 0). @example bitLength(8n) // 4 */
export function bitLength(n: bigint): number {
  return n === 0n ? 0 : n.toString(2).length;
}

/**
 * The inverse of an odd d modulo 2^bits, by Newton's iteration x <- x (2 - d x), which doubles the
 * number of correct low bits each step. @example inverseMod2k(3n, 8) // 171n (3 * 171 = 513 = 2 * 256 + 1)
 */
export function inverseMod2k(d: bigint, bits: number): bigint {
  const mod = 1n << BigInt(bits);
  let x = 1n; // correct mod 2 for odd d
  for (let correct = 1; correct < bits; correct *= 2) x = (x * (2n - d * x)) % mod;
  return ((x % mod) + mod) % mod;
}
