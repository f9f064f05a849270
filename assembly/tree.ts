// The Terras construction, one definition for every walker: the node (a mod 2^j, m, b) with
// T^j(a + 2^j x) = q^m x + b has two children, extending a by the bit e that makes the next value
// v = b + e q^m even (then the child is (m, v / 2)) or odd (then (m + 1, (q v + r) / 2)).
// With v odd, (q v + r) / 2 = q (v >> 1) + (q + r) / 2, so no intermediate exceeds the child's b.
// T is u64 or i64 (the host proves the width); >> is logical or arithmetic accordingly.

/** The extension bit of the even child: e0 = b mod 2 (the odd child takes 1 - e0). */
@inline export function evenBit<T>(b: T): T {
  return b & <T>1;
}

/** The even child's image (b + e0 q^m) / 2, given qm = q^m. */
@inline export function evenImage<T>(b: T, qm: T, e0: T): T {
  return (b + select<T>(qm, <T>0, e0 != <T>0)) >> 1;
}

/** The odd child's image q ((b + (1 - e0) q^m) >> 1) + h, with h = (q + r) / 2. */
@inline export function oddImage<T>(b: T, qm: T, e0: T, q: T, h: T): T {
  return q * ((b + select<T>(<T>0, qm, e0 != <T>0)) >> 1) + h;
}

/** The even child's residue a + e0 2^j; the odd child's is this with bit j flipped. */
@inline export function evenResidue<T>(a: u64, e0: T, j: i32): u64 {
  return a | (<u64>e0 << <u64>j);
}
