// LSD radix sort of unsigned 32-bit keys, in place through one scratch array (stable, exact).

/**
 * Sorts `keys` ascending; `bits` is an upper bound on the key width (keys < 2^bits). The digits are
 * split evenly (at most 12 bits each) and every digit's histogram is taken in one first pass.
 * @example radixSortU32(new Uint32Array([3, 1, 2]), 2) // Uint32Array [1, 2, 3]
 */
export function radixSortU32(keys: Uint32Array, bits = 32): Uint32Array {
  const n = keys.length;
  if (n < 2 || bits <= 0) return keys;
  const passes = Math.ceil(bits / 12);
  const digit = Math.ceil(bits / passes);
  const size = 1 << digit;
  const mask = size - 1;
  const counts = new Uint32Array(size * passes);
  for (let i = 0; i < n; i++) {
    const v = keys[i]!;
    for (let p = 0; p < passes; p++) counts[p * size + ((v >>> (p * digit)) & mask)]!++;
  }
  let src: Uint32Array = keys;
  let dst: Uint32Array = new Uint32Array(n);
  for (let p = 0; p < passes; p++) {
    const base = p * size;
    let sum = 0;
    for (let d = 0; d < size; d++) {
      const c = counts[base + d]!;
      counts[base + d] = sum;
      sum += c;
    }
    const shift = p * digit;
    for (let i = 0; i < n; i++) {
      const v = src[i]!;
      dst[counts[base + ((v >>> shift) & mask)]!++] = v;
    }
    const t = src;
    src = dst;
    dst = t;
  }
  if (src !== keys) keys.set(src);
  return keys;
}
