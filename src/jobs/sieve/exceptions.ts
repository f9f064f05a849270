// The sieve's exact exception list: positive members of a dropping class that do not descend.
// For class a mod 2^j with T^j(a + 2^j x) = q^m x + b and q^m < 2^j, the member n = a + 2^j x
// descends at step j (T^j(n) < n) exactly when (2^j - q^m) x > b - a; the rest are exceptions.
import type { CollatzMap } from "../../core/map.js";
import { Smallest } from "../../core/smallest.js";

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

/** Most exceptions a result lists by default (the count is always exact). */
export const EXCEPTION_LIMIT = 100_000;

/**
 * Every positive non-descending member: `count` exact, `list` the smallest `limit` of them, ascending
 * (deterministic: it does not depend on the order the classes arrive in).
 * @example expandExceptions(makeMap(3, 1), [{ residue: 1n, image: 1n, classDepth: 2, odd: 1 }]).list // [{ n: 1n, ... }]
 */
export function expandExceptions(
  map: CollatzMap,
  classes: readonly ExceptionClass[],
  limit = EXCEPTION_LIMIT,
): { list: SieveException[]; count: bigint } {
  let count = 0n;
  const list = new Smallest<SieveException>(limit, (e) => e.n);
  for (const c of classes) {
    const size = 1n << BigInt(c.classDepth);
    const gap = size - BigInt(map.q) ** BigInt(c.odd); // > 0 at the drop depth
    const diff = c.image - c.residue;
    if (diff < 0n) continue;
    const xMax = diff / gap; // floor, diff >= 0
    const xMin = c.residue === 0n ? 1n : 0n; // n = 0 is not positive
    if (xMax < xMin) continue;
    count += xMax - xMin + 1n;
    // a class's members come in increasing n: past the list's bound none of them can be kept
    for (let x = xMin, taken = 0; x <= xMax && taken < limit; x++, taken++) {
      const n = c.residue + size * x;
      const bound = list.bound();
      if (bound !== null && n >= bound) break;
      list.add({ n, residue: c.residue, classDepth: c.classDepth });
    }
  }
  return { list: list.sorted(), count };
}
