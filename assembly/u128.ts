// The kernels' one 128-bit library: (hi, lo) pairs of u64, results in globals rlo/rhi (and carry,
// for the checked unsigned multiply-add). Signed (two's complement): add, arithmetic shift by one,
// the low 128 bits of a product. Unsigned: the checked multiply-add of the verification kernel,
// comparisons, the bit length. probe128 runs one of them for the tests (test/u128.test.ts, against BigInt).

export let rlo: u64 = 0;
export let rhi: u64 = 0;
/** Set by mulAdd: the exact result needs more than 128 bits (rlo/rhi then hold its low 128 bits). */
export let carry: bool = false;

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

/** Unsigned (ahi, alo) < (bhi, blo). */
@inline export function ltU(alo: u64, ahi: u64, blo: u64, bhi: u64): bool {
  return ahi < bhi || (ahi == bhi && alo < blo);
}

/** The bit length of the unsigned (hi, lo): 0 for 0, 128 - clz otherwise. */
@inline export function bitlen(lo: u64, hi: u64): i32 {
  return hi != 0 ? 128 - <i32>clz(hi) : 64 - <i32>clz(lo);
}

/** Unsigned (hi, lo) * y + add into (rhi, rlo); carry when the result needs more than 128 bits. */
@inline export function mulAdd(lo: u64, hi: u64, y: u64, add: u64): void {
  if (hi == 0 && clz(lo) + clz(y) >= 64) {
    // bits(lo) + bits(y) <= 64: the product fits one word
    const p = lo * y + add;
    rlo = p;
    rhi = select<u64>(1, 0, p < add);
    carry = false;
    return;
  }
  const l = lo * y;
  const c1 = mulhi(lo, y);
  let hh = c1;
  carry = false;
  if (hi != 0) {
    const h = hi * y;
    hh = h + c1;
    carry = mulhi(hi, y) != 0 || hh < h;
  }
  const l2 = l + add;
  if (l2 < l) {
    hh++;
    if (hh == 0) carry = true;
  }
  rlo = l2;
  rhi = hh;
}

/**
 * One helper on given operands, for the tests: op 0 mulAdd(a, b, c), 1 add(a, b), 2 shr1(a),
 * 3 mul(a, b), 4 mulhi(alo, blo); (rlo, rhi, carry or the comparison ltU(a, b) as 0/1) stored at out.
 */
export function probe128(op: i32, alo: u64, ahi: u64, blo: u64, bhi: u64, c: u64, out: usize): void {
  carry = false;
  if (op == 0) mulAdd(alo, ahi, blo, c);
  else if (op == 1) add(alo, ahi, blo, bhi);
  else if (op == 2) shr1(alo, ahi);
  else if (op == 3) mul(alo, ahi, blo, bhi);
  else {
    rlo = mulhi(alo, blo);
    rhi = 0;
  }
  store<u64>(out, rlo);
  store<u64>(out, rhi, 8);
  store<u64>(out, op == 0 ? <u64>carry : <u64>ltU(alo, ahi, blo, bhi), 16);
}
