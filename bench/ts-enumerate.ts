// The survivors-mode enumeration written in plain TypeScript (doubles, exact while every image is
// below 2^53), as the baseline the wasm kernel is measured against. Not used by the library.

/** Returns the nodes visited (root and every live class) for q x + r to `depth`. */
export function enumeratePlain(q: number, r: number, depth: number): number {
  const drop: number[] = [];
  let p = 1n;
  for (let m = 0; m <= depth; m++) {
    drop.push(p === 1n ? 1 : p.toString(2).length);
    p *= BigInt(q);
  }
  const qpow = Array.from({ length: depth + 1 }, (_, m) => q ** m);
  if (qpow[depth]! * 2 > Number.MAX_SAFE_INTEGER) throw new RangeError("plain enumeration is exact only while q^depth < 2^52");
  const h = (q + r) / 2;
  let nodes = 1;
  const visit = (a: number, b: number, m: number, j: number): void => {
    const pm = qpow[m]!;
    const e0 = b % 2 === 0 ? 0 : 1;
    const bEven = (b + e0 * pm) / 2;
    const vOdd = b + (1 - e0) * pm;
    const bOdd = q * ((vOdd - 1) / 2) + h;
    const jj = j + 1;
    if (jj < drop[m]!) {
      nodes++;
      if (jj < depth) visit(a + e0 * 2 ** j, bEven, m, jj);
    }
    nodes++;
    if (jj < depth) visit(a + (1 - e0) * 2 ** j, bOdd, m + 1, jj);
  };
  if (depth > 0) visit(0, 0, 0, 0);
  return nodes;
}
