// 2-adic structure of one class, one number or one periodic parity vector, in exact BigInt.
//   class of a parity word w (Terras): the unique a mod 2^k whose first k parities are w, with
//     T^k(a + 2^k x) = q^m x + b for all x;
//   periodic point of w^∞: the 2-adic integer (2^k b - q^m a) / (2^k - q^m), fixed by T^k;
//   eventually periodic u·w^∞: a_u + 2^|u| (z_w - b_u) / q^(m_u).
import type { CollatzMap } from "./map.js";
import { UsageError } from "./errors.js";
import { inverseMod2k } from "./arith.js";

/** Longest word, residue depth or trajectory the inspector accepts. */
export const MAX_INSPECT_STEPS = 10_000;

export interface ClassForm {
  readonly map: CollatzMap;
  /** Depth: the word's length. */
  readonly k: number;
  /** The least member a in [0, 2^k). */
  readonly residue: bigint;
  /** Odd steps m among the k. */
  readonly odd: number;
  /** b in T^k(a + 2^k x) = q^m x + b. */
  readonly image: bigint;
  /** Parities, first step first. */
  readonly word: string;
  /** Least j <= k with q^(m_j) < 2^j, or null. */
  readonly stoppingTime: number | null;
  /** m_j at the stopping time (for the standard-step count j + m_j). */
  readonly stoppingOdd: number | null;
}

function checkWord(word: string, what = "parity word"): void {
  if (word.length === 0) throw new UsageError(`${what} is empty`);
  if (!/^[01]+$/.test(word))
    throw new UsageError(`${what} "${word.length > 40 ? word.slice(0, 40) + "..." : word}" must contain only 0 and 1`);
  if (word.length > MAX_INSPECT_STEPS) throw new UsageError(`${what} is longer than ${MAX_INSPECT_STEPS}`);
}

/**
 * The class whose parity vector starts with `word` (Terras construction, one bit at a time).
 * @example classFromWord(parseMap("3x+1"), "1100").residue // 3n
 */
export function classFromWord(map: CollatzMap, word: string): ClassForm {
  checkWord(word);
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let a = 0n,
    b = 0n,
    qm = 1n,
    m = 0;
  let stop: number | null = null,
    stopOdd: number | null = null;
  let pow2 = 1n;
  for (let j = 0; j < word.length; j++) {
    const p = word.charCodeAt(j) - 48;
    // choose the bit e of x so that b + e q^m has parity p
    const e = ((b & 1n) ^ BigInt(p)) & 1n;
    const v = b + e * qm;
    a += e * pow2;
    if (p === 0) b = v >> 1n;
    else {
      b = (q * v + r) >> 1n;
      qm *= q;
      m++;
    }
    pow2 <<= 1n;
    if (stop === null && qm < pow2) {
      stop = j + 1;
      stopOdd = m;
    }
  }
  return { map, k: word.length, residue: a, odd: m, image: b, word, stoppingTime: stop, stoppingOdd: stopOdd };
}

/** The first k parities of n (any integer), first step first. */
export function parityWord(map: CollatzMap, n: bigint, k: number): string {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let out = "";
  for (let i = 0; i < k; i++) {
    const odd = (n & 1n) === 1n;
    out += odd ? "1" : "0";
    n = odd ? (q * n + r) >> 1n : n >> 1n;
  }
  return out;
}

/** The class a mod 2^k. @example classFromResidue(parseMap("3x+1"), 3n, 4).word // "1100" */
export function classFromResidue(map: CollatzMap, a: bigint, k: number): ClassForm {
  if (!Number.isInteger(k) || k < 1 || k > MAX_INSPECT_STEPS) throw new UsageError(`depth k must be between 1 and ${MAX_INSPECT_STEPS}`);
  if (a < 0n || a >= 1n << BigInt(k)) throw new UsageError(`residue ${a} is not in [0, 2^${k})`);
  return classFromWord(map, parityWord(map, a, k));
}

/** T^j(n) for the least member: j steps of the map on a BigInt. */
export function iterate(map: CollatzMap, n: bigint, steps: number): bigint {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  for (let i = 0; i < steps; i++) n = (n & 1n) === 1n ? (q * n + r) >> 1n : n >> 1n;
  return n;
}

/** The first j in 1..steps with T^j(n) < n (the stopping time), or null. @example firstDescent(parseMap("3x+1"), 3n, 10) // 4 */
export function firstDescent(map: CollatzMap, n: bigint, steps: number): number | null {
  let v = n;
  for (let j = 1; j <= steps; j++) {
    v = iterate(map, v, 1);
    if (v < n) return j;
  }
  return null;
}

/**
 * The coefficient stopping time of n (any integer): the least j <= steps with q^m < 2^j, m the odd
 * steps among n's first j, or null. Exact: q^m < 2^j iff bitlen(q^m) <= j.
 * @example coefficientStoppingTime(parseMap("3x+5"), 7n, 100) // 24
 */
export function coefficientStoppingTime(map: CollatzMap, n: bigint, steps: number): number | null {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let qm = 1n,
    v = n;
  for (let j = 1; j <= steps; j++) {
    const odd = (v & 1n) === 1n;
    if (odd) qm *= q;
    v = odd ? (q * v + r) >> 1n : v >> 1n;
    if (qm >> BigInt(j) === 0n) return j;
  }
  return null;
}

/**
 * n's delay (total stopping time) in BigInt: steps of T to reach 1 and the odd steps among them, or
 * null past maxSteps.
 * @example delayBig(parseMap("3x+1"), 27n, 1000) // { steps: 70, odd: 41 }
 */
export function delayBig(map: CollatzMap, n: bigint, maxSteps: number): { steps: number; odd: number } | null {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  let v = n;
  let odd = 0;
  for (let steps = 0; steps <= maxSteps; steps++) {
    if (v === 1n) return { steps, odd };
    if ((v & 1n) === 1n) {
      v = (q * v + r) >> 1n;
      odd++;
    } else v >>= 1n;
  }
  return null;
}

/** Binary digits of a mod 2^k, least significant first (the 2-adic expansion). */
export function digitsOf(a: bigint, k: number): string {
  let s = "";
  for (let i = 0; i < k; i++) s += ((a >> BigInt(i)) & 1n) === 1n ? "1" : "0";
  return s;
}

export interface Trajectory {
  readonly n: bigint;
  /** Steps taken (until the cycle was reached, or the limit). */
  readonly steps: number;
  readonly word: string;
  /** First j >= 1 with T^j(n) < n (the stopping time), or null within the steps. */
  readonly descent: number | null;
  /** The largest value under T and the first step of T where it is reached. */
  readonly max: bigint;
  readonly maxAt: number;
  /**
   * The same in standard steps (n/2, q·n + r): an odd step of T is two of them, through q·v + r =
   * 2·T(v), so the standard largest value is 2·max when max follows an odd step (common practice).
   */
  readonly standardMax: bigint;
  readonly standardMaxAt: number;
  /** The cycle reached: the step where it was entered, its element of least |x| and period. */
  readonly cycle: { readonly entry: number; readonly min: bigint; readonly period: number; readonly odd: number } | null;
}

/**
 * Brent's cycle detection on the orbit of n: the entry step mu and period lambda, if the orbit
 * enters a cycle within about `limit` steps (no set of visited values: big orbits stay cheap), and
 * never reaches a value for which `escapes` holds (an orbit past a size bound is taken as divergent).
 * @example findCycle((v) => (v % 2n ? 3n * v + 1n : v / 2n), 3n, 100) // { mu: 5, lambda: 3 }
 */
export function findCycle(
  step: (v: bigint) => bigint,
  n: bigint,
  limit: number,
  escapes: (v: bigint) => boolean = () => false,
): { mu: number; lambda: number } | null {
  let power = 1,
    lambda = 1,
    tortoise = n,
    hare = step(n),
    taken = 1;
  while (tortoise !== hare) {
    if (taken > 3 * limit + 3 || escapes(hare)) return null;
    if (power === lambda) {
      tortoise = hare;
      power *= 2;
      lambda = 0;
    }
    hare = step(hare);
    lambda++;
    taken++;
  }
  tortoise = hare = n;
  for (let i = 0; i < lambda; i++) hare = step(hare);
  let mu = 0;
  while (tortoise !== hare) {
    tortoise = step(tortoise);
    hare = step(hare);
    mu++;
  }
  return mu <= limit ? { mu, lambda } : null;
}

/**
 * The trajectory of n until it has entered a cycle and gone once round it, or `maxSteps` steps pass.
 * @example trajectory(parseMap("3x+1"), 27n).cycle // { entry: 69, min: 1n, period: 2, odd: 1 }
 */
export function trajectory(map: CollatzMap, n: bigint, maxSteps = MAX_INSPECT_STEPS): Trajectory {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  const step = (v: bigint) => ((v & 1n) === 1n ? (q * v + r) >> 1n : v >> 1n);
  const found = findCycle(step, n, maxSteps);
  const steps = found ? Math.min(maxSteps, found.mu + found.lambda) : maxSteps;
  let v = n,
    word = "",
    descent: number | null = null,
    max = n,
    maxAt = 0,
    standardMax = n,
    standardMaxAt = 0,
    standard = 0,
    min = 0n,
    odd = 0;
  for (let i = 0; i < steps; i++) {
    const isOdd = (v & 1n) === 1n;
    // the standard steps of this step of T: q·v + r first when v is odd, then the halving
    if (isOdd && q * v + r > standardMax) {
      standardMax = q * v + r;
      standardMaxAt = standard + 1;
    }
    standard += isOdd ? 2 : 1;
    word += isOdd ? "1" : "0";
    if (found && i >= found.mu) {
      if (i === found.mu || abs(v) < abs(min)) min = v;
      if (isOdd) odd++;
    }
    v = step(v);
    if (descent === null && v < n) descent = i + 1;
    if (v > max) {
      max = v;
      maxAt = i + 1;
    }
    if (v > standardMax) {
      standardMax = v;
      standardMaxAt = standard;
    }
  }
  if (found && found.mu === steps) min = v; // the limit fell right at the entry
  const cycle = found && found.mu + found.lambda <= maxSteps ? { entry: found.mu, min, period: found.lambda, odd } : null;
  return { n, steps, word, descent, max, maxAt, standardMax, standardMaxAt, cycle };
}

export interface PeriodicPoint {
  readonly pre: string;
  readonly word: string;
  /** The 2-adic integer as num / den in lowest terms, den > 0 and odd. */
  readonly num: bigint;
  readonly den: bigint;
  /** When den = 1: the integer, the cycle it lies on or reaches (elements from its entry), minimal period. */
  readonly integer: bigint | null;
  readonly cycle: bigint[] | null;
}

function abs(a: bigint): bigint {
  return a < 0n ? -a : a;
}

/** A cycle's representative: its element of least absolute value (its minimum when positive). */
export function cycleRepresentative(elements: readonly bigint[]): bigint {
  return elements.reduce((best, x) => (abs(x) < abs(best) ? x : best));
}

function gcd(a: bigint, b: bigint): bigint {
  a = a < 0n ? -a : a;
  b = b < 0n ? -b : b;
  while (b) [a, b] = [b, a % b];
  return a;
}

/**
 * The 2-adic point whose parity vector is pre·word^∞ (Böhm and Sontacchi 1978; Lagarias 1985).
 * @example periodicPoint(parseMap("3x+1"), "", "10").integer // 1n
 */
export function periodicPoint(map: CollatzMap, pre: string, word: string): PeriodicPoint {
  checkWord(word, "periodic part");
  if (pre.length > 0) checkWord(pre, "pre-period");
  const w = classFromWord(map, word);
  const q = BigInt(map.q);
  const k2 = 1n << BigInt(w.k),
    qm = q ** BigInt(w.odd);
  // z_w = (2^k b - q^m a) / (2^k - q^m): a + 2^k x with q^m x + b = a + 2^k x
  let num = k2 * w.image - qm * w.residue;
  let den = k2 - qm;
  if (pre.length > 0) {
    const u = classFromWord(map, pre);
    const qu = q ** BigInt(u.odd);
    // z = a_u + 2^|u| (z_w - b_u) / q^(m_u)
    num = u.residue * den * qu + (1n << BigInt(u.k)) * (num - u.image * den);
    den = den * qu;
  }
  if (den < 0n) {
    num = -num;
    den = -den;
  }
  const g = gcd(num, den);
  if (g > 1n) {
    num /= g;
    den /= g;
  }
  let integer: bigint | null = null,
    cycle: bigint[] | null = null;
  if (den === 1n) {
    integer = num;
    // the cycle: from T^|pre|(z), the periodic point itself, with its minimal period
    const start = iterate(map, num, pre.length);
    cycle = [start];
    for (let v = iterate(map, start, 1); v !== start; v = iterate(map, v, 1)) cycle.push(v);
  }
  return { pre, word, num, den, integer, cycle };
}

/** The first `precision` 2-adic digits of num/den (den odd), least significant first. */
export function twoAdicDigits(num: bigint, den: bigint, precision: number): string {
  if ((den & 1n) === 0n) throw new RangeError("denominator must be odd");
  const mod = 1n << BigInt(precision);
  const inv = inverseMod2k(((den % mod) + mod) % mod, precision);
  const z = ((((num % mod) + mod) % mod) * inv) % mod;
  return digitsOf(z, precision);
}

/** Parses "u(w)" or "(w)" or "w" into pre-period and period. */
export function parsePeriodicWord(text: string): { pre: string; word: string } {
  const m = /^([01]*)\(([01]+)\)$/.exec(text);
  if (m) return { pre: m[1]!, word: m[2]! };
  if (/^[01]+$/.test(text)) return { pre: "", word: text };
  throw new UsageError(`"${text}" is not a parity word: write w, (w) or u(w) with digits 0 and 1, e.g. 10 or 1(10)`);
}
