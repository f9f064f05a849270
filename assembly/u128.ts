// Signed 128-bit helpers as (hi, lo) pairs of u64 in two's complement; results in globals rlo/rhi.
// Only what the kernels need: add, arithmetic shift by one, multiply by a small factor, the low
// 128 bits of a product, comparison.

export let rlo: u64 = 0;
export let rhi: u64 = 0;

/** High 64 bits of the unsigned product x * y. */
@inline export function mulhi(x: u64, y: u64): u64 {
  const x0 = x & 0xffffffff, x1 = x >> 32, y0 = y & 0xffffffff, y1 = y >> 32;
  const p00 = x0 * y0, p01 = x0 * y1, p10 = x1 * y0, p11 = x1 * y1;
  const mid = (p00 >> 32) + (p01 & 0xffffffff) + (p10 & 0xffffffff);
  return p11 + (p01 >> 32) + (p10 >> 32) + (mid >> 32);
}

@inline export function add(alo: u64, ahi: u64, blo: u64, bhi: u64): void {
  const lo = alo + blo;
  rhi = ahi + bhi + select<u64>(1, 0, lo < alo);
  rlo = lo;
}

/** Arithmetic shift right by one (floor division by 2 of a signed value). */
@inline export function shr1(lo: u64, hi: u64): void {
  rlo = (lo >> 1) | (hi << 63);
  rhi = <u64>(<i64>hi >> 1);
}

/** Low 128 bits of (hi, lo) * (yhi, ylo). */
@inline export function mul(lo: u64, hi: u64, ylo: u64, yhi: u64): void {
  const l = lo * ylo;
  rhi = mulhi(lo, ylo) + lo * yhi + hi * ylo;
  rlo = l;
}

/** Unsigned (ahi, alo) <= (bhi, blo). */
@inline export function leU(alo: u64, ahi: u64, blo: u64, bhi: u64): bool {
  return ahi < bhi || (ahi == bhi && alo <= blo);
}
