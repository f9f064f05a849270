// LSD radix sort of unsigned 32-bit keys, in place through one scratch array (stable, exact).

/**
 * Sorts `keys` ascending; `bits` is an upper bound on the key width (keys < 2^bits).
 * @example radixSortU32(new Uint32Array([3, 1, 2]), 2) // Uint32Array [1, 2, 3]
 */
export function radixSortU32(keys: Uint32Array, bits = 32): Uint32Array {
  const n = keys.length;
  if (n < 2) return keys;
  const RADIX_BITS = 11;
  const size = 1 << RADIX_BITS;
  const mask = size - 1;
  let src: Uint32Array = keys;
  let dst: Uint32Array = new Uint32Array(n);
  const count = new Uint32Array(size);
  for (let shift = 0; shift < bits; shift += RADIX_BITS) {
    count.fill(0);
    for (let i = 0; i < n; i++) count[(src[i]! >>> shift) & mask]!++;
    let sum = 0;
    for (let d = 0; d < size; d++) {
      const c = count[d]!;
      count[d] = sum;
      sum += c;
    }
    for (let i = 0; i < n; i++) {
      const v = src[i]!;
      dst[count[(v >>> shift) & mask]!++] = v;
    }
    [src, dst] = [dst, src];
  }
  if (src !== keys) keys.set(src);
  return keys;
}
