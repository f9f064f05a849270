// Complete search for integer cycles of period <= K: every node (class a mod 2^j, m, b) of the full
// tree is a candidate for period j. Its periodic point n = a + 2^j x solves q^m x + b = a + 2^j x,
// so n is an integer exactly when D = 2^j - q^m (odd) divides b - a. Divisibility is tested exactly
// by the inverse method: for odd d and 0 <= N < 2^w, d | N iff N * d^-1 mod 2^w <= (2^w - 1) / d.
// Candidates (a, b, j, m) stream out on CHANNEL_CYCLES; the host solves for n and finds the cycle.
// Two widths: u64/i64 (host-proven as for enumerate) and signed 128-bit (u128.ts).

import { flush } from "./buffers";
import { CHANNEL_CHUNK, CHANNEL_CYCLES, CYCLE_DIVISOR_WORDS, CYCLE_QPOW_HIGH, MAX_DEPTH, TALLY_SHIFT } from "./layout";
import { childImage, childResidue, stepImage, stepValue } from "./extend";
import { rlo, rhi, add, shr1, mul, leU } from "./u128";

let K: i32 = 0;
let Q: u64 = 0;
let H: i64 = 0;
let qlo: usize = 0; // u64[m]: q^m low words
let qhi: usize = 0; // u64[m]: q^m high words (wide path)
let dtab: usize = 0; // per (j, m): inv lo, inv hi, lim lo, lim hi (u64 each, 32 bytes)
let candPtr: usize = 0;
let candN: i32 = 0;
let nodes: u64 = 0;

@inline function dEntry(j: i32, m: i32): usize {
  return dtab + <usize>((j << TALLY_SHIFT) + m) * <usize>(CYCLE_DIVISOR_WORDS << 3);
}

function pushCandidate(a: u64, blo: u64, bhi: u64, j: i32, m: i32): void {
  const p = candPtr + (<usize>candN << 5);
  store<u64>(p, a);
  store<u64>(p, blo, 8);
  store<u64>(p, bhi, 16);
  store<u64>(p, (<u64>j << 32) | <u64>m, 24);
  if (++candN == CHANNEL_CHUNK) {
    flush(CHANNEL_CYCLES, candN);
    candN = 0;
  }
}

// ---- 64-bit path (T = u64 for r > 0, i64 for r < 0) ----

@inline function test64<T>(a: u64, b: T, j: i32, m: i32): void {
  const e = dEntry(j, m);
  // |b - a| as u64: the host proved |b| < 2^63 (i64) or 0 <= b < 2^64 (u64), and a < 2^K.
  const n: u64 = b >= <T>a ? <u64>(b - <T>a) : <u64>(<T>a - b);
  if (n * load<u64>(e) <= load<u64>(e, 16)) pushCandidate(a, <u64>b, <u64>(b < <T>0 ? -1 : 0), j, m);
}

function dfs64<T>(a: u64, b: T, m: i32, j: i32): void {
  const qm = <T>load<u64>(qlo + (<usize>m << 3));
  const aEven = childResidue<T>(a, b, j, false), aOdd = childResidue<T>(a, b, j, true);
  const bEven = childImage<T>(b, qm, false, <T>Q, <T>H), bOdd = childImage<T>(b, qm, true, <T>Q, <T>H);
  const jj = j + 1;
  nodes += 2;
  test64<T>(aEven, bEven, jj, m);
  test64<T>(aOdd, bOdd, jj, m + 1);
  if (jj < K) {
    dfs64<T>(aEven, bEven, m, jj);
    dfs64<T>(aOdd, bOdd, m + 1, jj);
  }
}

// ---- 128-bit path ----

@inline function test128(a: u64, blo: u64, bhi: u64, j: i32, m: i32): void {
  // N = b - a (signed 128), then |N|
  add(blo, bhi, ~a + 1, a == 0 ? 0 : <u64>-1);
  let nlo = rlo, nhi = rhi;
  if (<i64>nhi < 0) {
    add(~nlo, ~nhi, 1, 0);
    nlo = rlo;
    nhi = rhi;
  }
  const e = dEntry(j, m);
  mul(nlo, nhi, load<u64>(e), load<u64>(e, 8));
  if (leU(rlo, rhi, load<u64>(e, 16), load<u64>(e, 24))) pushCandidate(a, blo, bhi, j, m);
}

function dfs128(a: u64, blo: u64, bhi: u64, m: i32, j: i32): void {
  const plo = load<u64>(qlo + (<usize>m << 3)), phi = load<u64>(qhi + (<usize>m << 3));
  const e0 = blo & 1;
  const aEven = a | (e0 << j);
  const aOdd = aEven ^ ((<u64>1) << j);
  // even child: (b + e0 q^m) / 2
  if (e0 != 0) add(blo, bhi, plo, phi);
  else {
    rlo = blo;
    rhi = bhi;
  }
  shr1(rlo, rhi);
  const eLo = rlo, eHi = rhi;
  // odd child: q ((b + (1 - e0) q^m) >> 1) + (q + r) / 2
  if (e0 == 0) add(blo, bhi, plo, phi);
  else {
    rlo = blo;
    rhi = bhi;
  }
  shr1(rlo, rhi);
  mul(rlo, rhi, Q, 0);
  add(rlo, rhi, <u64>H, H < 0 ? <u64>-1 : 0);
  const oLo = rlo, oHi = rhi;
  const jj = j + 1;
  nodes += 2;
  test128(aEven, eLo, eHi, jj, m);
  test128(aOdd, oLo, oHi, jj, m + 1);
  if (jj < K) {
    dfs128(aEven, eLo, eHi, m, jj);
    dfs128(aOdd, oLo, oHi, m + 1, jj);
  }
}

// Walks to the prefix class, testing the ancestors this shard owns (prefix >> j == 0) when asked.
function walk64<T>(prefixBits: i32, prefix: u64, own: bool): void {
  let a: u64 = 0, b: T = <T>0, m: i32 = 0;
  for (let j = 0; j < prefixBits; j++) {
    const e = (prefix >> <u64>j) & 1;
    const v = stepValue<T>(b, <T>load<u64>(qlo + (<usize>m << 3)), e);
    b = stepImage<T>(v, <T>Q, <T>H);
    if ((v & <T>1) != <T>0) m++;
    a |= e << <u64>j;
    if (own && (prefix >> <u64>(j + 1)) == 0) test64<T>(a, b, j + 1, m);
  }
  if (prefixBits < K) dfs64<T>(a, b, m, prefixBits);
}

function walk128(prefixBits: i32, prefix: u64, own: bool): void {
  let a: u64 = 0, blo: u64 = 0, bhi: u64 = 0, m: i32 = 0;
  for (let j = 0; j < prefixBits; j++) {
    const e = (prefix >> <u64>j) & 1;
    if (e != 0) add(blo, bhi, load<u64>(qlo + (<usize>m << 3)), load<u64>(qhi + (<usize>m << 3)));
    else {
      rlo = blo;
      rhi = bhi;
    }
    const odd = (rlo & 1) != 0;
    shr1(rlo, rhi);
    if (odd) {
      mul(rlo, rhi, Q, 0);
      add(rlo, rhi, <u64>H, H < 0 ? <u64>-1 : 0);
      m++;
    }
    blo = rlo;
    bhi = rhi;
    a |= e << <u64>j;
    if (own && (prefix >> <u64>(j + 1)) == 0) test128(a, blo, bhi, j + 1, m);
  }
  if (prefixBits < K) dfs128(a, blo, bhi, m, prefixBits);
}

/**
 * Tests every node of depth 1..depth below the prefix class (and, with walkTallies, the ancestors this
 * shard owns: prefix >> j == 0). tables: CYCLE_QPOW_BYTES, q^m low words at [0, CYCLE_QPOW_HIGH), high words at
 * [CYCLE_QPOW_HIGH, CYCLE_QPOW_BYTES); dTable: CYCLE_DIVISOR_BYTES, 64 x 64 entries of 32 bytes (inverse and limit, low then
 * high words; high words unused at 64 bits); candidates: CHANNEL_CHUNK entries, 4 u64 each: a, b low,
 * b high, (j << 32 | m). Returns the nodes visited below the prefix.
 */
export function cycleSearch(
  q: u32, r: i32, depth: i32, wide: i32, prefixBits: i32, prefix: u64,
  tables: usize, dTable: usize, candidates: usize, walkTallies: i32,
): u64 {
  assert(depth >= 1 && depth <= MAX_DEPTH && prefixBits >= 0 && prefixBits <= depth);
  assert((prefix >> <u64>prefixBits) == 0);
  K = depth;
  Q = <u64>q;
  H = (<i64>q + <i64>r) >> 1;
  qlo = tables;
  qhi = tables + CYCLE_QPOW_HIGH;
  dtab = dTable;
  candPtr = candidates;
  candN = 0;
  nodes = 0;
  const own = walkTallies != 0;
  if (wide) walk128(prefixBits, prefix, own);
  else if (r < 0) walk64<i64>(prefixBits, prefix, own);
  else walk64<u64>(prefixBits, prefix, own);
  if (candN > 0) flush(CHANNEL_CYCLES, candN);
  candN = 0;
  return nodes;
}
