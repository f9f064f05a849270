// The class arithmetic every walker shares: the per-m tables the host writes, the tally update, and
// the Terras construction, one definition each. The node (a mod 2^j, m, b) with T^j(a + 2^j x) =
// q^m x + b has two children, extending a by the bit e that makes the next value v = b + e q^m even
// (then the child is (m, v / 2)) or odd (then (m + 1, (q v + r) / 2)): childResidue, childImage. With v
// odd, (q v + r) / 2 = q (v >> 1) + (q + r) / 2, so no intermediate exceeds the child's b. T is u64
// or i64 (the host proves the width); >> is logical or arithmetic accordingly.
import { TABLE_DROP, TABLE_QPOW, TALLY_SHIFT } from "./layout";

let qpowBase: usize = 0;
let dropBase: usize = 0;

/** Points the helpers below at the host's per-m tables (layout.ts: TABLE_*). */
export function useTables(tables: usize): void {
  qpowBase = tables + TABLE_QPOW;
  dropBase = tables + TABLE_DROP;
}

/** q^m (within the host-proven width). */
@inline export function qpow(m: i32): u64 {
  return load<u64>(qpowBase + (<usize>m << 3));
}

/** bitlen(q^m): the least depth at which a class with m odd steps has dropped (q^m < 2^j). */
@inline export function dropDepth(m: i32): i32 {
  return load<i32>(dropBase + (<usize>m << 2));
}

/** Adds one to entry (j, m) of a u64 [64][64] table. */
@inline export function tally(base: usize, j: i32, m: i32): void {
  const p = base + (<usize>((j << TALLY_SHIFT) + m) << 3);
  store<u64>(p, load<u64>(p) + 1);
}

/**
 * The residue of a child of the node (a mod 2^j, image b): the even child extends a by the bit
 * e0 = b mod 2, the odd child by 1 - e0 (the even child's residue with bit j flipped).
 */
@inline export function childResidue<T>(a: u64, b: T, j: i32, odd: bool): u64 {
  const even = evenResidue<T>(a, evenBit<T>(b), j);
  return odd ? even ^ ((<u64>1) << <u64>j) : even;
}

/**
 * The image of a child of the node with image b, given qm = q^m and h = (q + r) / 2: the even
 * child's (b + e0 q^m) / 2, the odd child's q ((b + (1 - e0) q^m) >> 1) + h.
 */
@inline export function childImage<T>(b: T, qm: T, odd: bool, q: T, h: T): T {
  const e0 = evenBit<T>(b);
  return odd ? oddImage<T>(b, qm, e0, q, h) : evenImage<T>(b, qm, e0);
}

/** The extension bit of the even child: e0 = b mod 2 (the odd child takes 1 - e0). */
@inline function evenBit<T>(b: T): T {
  return b & <T>1;
}

/** The even child's image (b + e0 q^m) / 2, given qm = q^m. */
@inline function evenImage<T>(b: T, qm: T, e0: T): T {
  return (b + select<T>(qm, <T>0, e0 != <T>0)) >> 1;
}

/** The odd child's image q ((b + (1 - e0) q^m) >> 1) + h, with h = (q + r) / 2. */
@inline function oddImage<T>(b: T, qm: T, e0: T, q: T, h: T): T {
  return q * ((b + select<T>(<T>0, qm, e0 != <T>0)) >> 1) + h;
}

/** The even child's residue a + e0 2^j; the odd child's is this with bit j flipped. */
@inline function evenResidue<T>(a: u64, e0: T, j: i32): u64 {
  return a | (<u64>e0 << <u64>j);
}

/** Along a given extension bit e (a prefix walk): v = b + e q^m, whose parity is the step's. */
@inline export function stepValue<T>(b: T, qm: T, e: u64): T {
  return b + select<T>(qm, <T>0, e != 0);
}

/** The child's image from v = stepValue(...): v / 2 when v is even, q (v >> 1) + h when odd. */
@inline export function stepImage<T>(v: T, q: T, h: T): T {
  return (v & <T>1) == <T>0 ? v >> 1 : q * (v >> 1) + h;
}
