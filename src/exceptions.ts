// The sieve's exact exception list: positive members of a dropping class that do not descend.
// For class a mod 2^j with T^j(a + 2^j x) = q^m x + b and q^m < 2^j, the member n = a + 2^j x
// descends at step j (T^j(n) < n) exactly when (2^j - q^m) x > b - a; the rest are exceptions.
import type { CollatzMap } from "./map.js";

export interface ExceptionClass {
  readonly residue: bigint;
  readonly image: bigint;
  readonly classDepth: number;
  readonly odd: number;
}

export interface SieveException {
  readonly n: bigint;
  readonly residue: bigint;
  readonly classDepth: number;
}

/** Decodes the kernel's (a, b, j, m) quadruples; b is signed when r < 0. */
export function decodeExceptionClasses(raw: BigUint64Array, signed: boolean): ExceptionClass[] {
  const out: ExceptionClass[] = [];
  for (let i = 0; i < raw.length; i += 4) {
    out.push({
      residue: raw[i]!,
      image: signed ? BigInt.asIntN(64, raw[i + 1]!) : raw[i + 1]!,
      classDepth: Number(raw[i + 2]!),
      odd: Number(raw[i + 3]!),
    });
  }
  return out;
}

/**
 * Every positive non-descending member, ascending by n; `count` is exact, `list` holds at most `limit`.
 * @example expandExceptions(makeMap(3, 1), [{ residue: 1n, image: 1n, classDepth: 2, odd: 1 }]).list // [{ n: 1n, ... }]
 */
export function expandExceptions(map: CollatzMap, classes: readonly ExceptionClass[], limit = 100_000): { list: SieveException[]; count: bigint } {
  let count = 0n;
  const list: SieveException[] = [];
  for (const c of classes) {
    const size = 1n << BigInt(c.classDepth);
    const gap = size - BigInt(map.q) ** BigInt(c.odd); // > 0 at the drop depth
    const diff = c.image - c.residue;
    if (diff < 0n) continue;
    const xMax = diff / gap; // floor, diff >= 0
    const xMin = c.residue === 0n ? 1n : 0n; // n = 0 is not positive
    if (xMax < xMin) continue;
    count += xMax - xMin + 1n;
    for (let x = xMin; x <= xMax && list.length < limit; x++) {
      list.push({ n: c.residue + size * x, residue: c.residue, classDepth: c.classDepth });
    }
  }
  list.sort((u, v) => (u.n < v.n ? -1 : u.n > v.n ? 1 : 0));
  return { list, count };
}
