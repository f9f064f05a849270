// The least length of a cycle lying wholly at or above X, exactly, for T(n) = n/2 | (q n + r)/2.
//
// Theorem (Steiner 1977; Lagarias 1985, Amer. Math. Monthly 92; with verification limits, Eliahou
// 1993, Discrete Math. 118): a cycle of T with ℓ elements (ℓ steps of T), m of them odd, x_1..x_m,
// satisfies 2^ℓ = ∏ (q + r/x_i), since each even step multiplies by 1/2 and each odd step by
// (q + r/x_i)/2 and the product around the cycle is 1. If every x_i >= X:
//   r > 0:  q^m < 2^ℓ <= (q + r/X)^m,        i.e. ℓ/m in (α, β],  α = log2 q, β = log2(q + r/X);
//   r < 0:  max(2^m, (q + r/X)^m) <= 2^ℓ < q^m  (ℓ >= m always),  i.e. ℓ/m in [max(β, 1), α).
// Admissibility depends on ℓ/m alone. The least m (and, in the same pair, the least ℓ) is the first
// intermediate fraction of α's continued fraction on β's side that lies in the window: a fraction
// strictly between such an intermediate fraction and its neighbour convergent (determinant ±1) has
// numerator and denominator at least those of their mediant, the next intermediate fraction.
//
// Exactness: α and β are irrational (q odd) unless q + r/X is a power of two, detected exactly.
// Every comparison of a fraction with α or β is decided exactly: by comparing powers in BigInt when
// they have at most DIRECT_BITS bits, otherwise by a rational bracket of the logarithm made by
// repeated squaring in fixed point, rounded down for the lower end and up for the upper end (so the
// bracket holds by construction), its precision raised until the decision is certain.
import { LimitError, UsageError } from "./errors.js";
import type { CollatzMap } from "./map.js";
import { bitLength } from "./arith.js";

/** A fraction num/den with den >= 0 (1/0 is the infinite upper start of a continued fraction walk). */
export interface Frac {
  readonly num: bigint;
  readonly den: bigint;
}

/** Powers compared directly up to this many bits (a BigInt power of 2^20 bits takes about 0.1 s). */
export const DIRECT_BITS = 1 << 17;
/** The confirmation of the claimed pair compares powers directly up to this many bits. */
export const CONFIRM_BITS = 1 << 22;
/** Precision of a logarithm's bracket at most (bits after the binary point). */
const MAX_BRACKET_BITS = 1 << 15;
/** The largest bound for the listed pairs (m <= maxOdd). */
export const MAX_ODD_BOUND = 1n << 256n;
/** At most this many Stern-Brocot nodes are visited to list pairs. */
const MAX_VISITS = 2_000_000;

const frac = (num: bigint, den: bigint): Frac => ({ num, den });
/** sign(a - b) for fractions with positive denominators (or b = 1/0). */
function cmpFrac(a: Frac, b: Frac): -1 | 0 | 1 {
  const d = a.num * b.den - b.num * a.den;
  return d < 0n ? -1 : d > 0n ? 1 : 0;
}

/**
 * A rational bracket [lo, hi] of log2(n/d), n, d > 0, with hi - lo <= 2^-bits (or wider when the
 * squaring met a value too close to 2 to settle, which more bits resolve). Exact BigInt throughout:
 * z = (n/d)/2^e in [1, 2) is held as [zl, zh]/2^P, squared with floor (zl) and ceiling (zh); a
 * square at or above 2 gives the bit 1 and is halved, one below 2 the bit 0. After i bits B,
 * log2(n/d) = e + (B + log2 z_i)/2^i with z_i in [1, 2), so it lies in [e + B/2^i, e + (B + 1)/2^i].
 * @example log2Bracket(3n, 1n, 8) // { lo: { num: 405n, den: 256n }, hi: { num: 406n, den: 256n } }
 */
export function log2Bracket(n: bigint, d: bigint, bits: number): { lo: Frac; hi: Frac } {
  if (n <= 0n || d <= 0n) throw new Error("internal error: log2 of a non-positive number");
  let e = bitLength(n) - bitLength(d);
  // 2^e <= n/d < 2^(e+1)
  const atLeast = (k: number) => (k >= 0 ? n >= d << BigInt(k) : n << BigInt(-k) >= d);
  if (!atLeast(e)) e--;
  const P = bits + 64;
  const shift = P - e;
  const num = shift >= 0 ? n << BigInt(shift) : n;
  const den = shift >= 0 ? d : d << BigInt(-shift);
  let zl = num / den;
  let zh = zl * den === num ? zl : zl + 1n;
  const bigP = BigInt(P);
  const round = (1n << bigP) - 1n;
  const two = 2n << bigP;
  let B = 0n;
  let i = 0;
  for (; i < bits; i++) {
    const sl = (zl * zl) >> bigP;
    const sh = (zh * zh + round) >> bigP;
    if (sl >= two) {
      B = 2n * B + 1n;
      zl = sl >> 1n;
      zh = (sh + 1n) >> 1n;
    } else if (sh < two) {
      B = 2n * B;
      zl = sl;
      zh = sh;
    } else break; // too close to 2 at this precision
  }
  const scale = 1n << BigInt(i);
  const base = BigInt(e) * scale + B;
  return { lo: frac(base, scale), hi: frac(base + 1n, scale) };
}

/** sign(log2(n/d) - f) by comparing n^den with 2^num d^den in BigInt (den > 0). */
function compareDirect(n: bigint, d: bigint, f: Frac): -1 | 0 | 1 {
  const left = n ** f.den;
  const right = d ** f.den;
  const a = f.num >= 0n ? left : left << -f.num;
  const b = f.num >= 0n ? right << f.num : right;
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Bits of the larger side of compareDirect(n, d, f). */
function directBits(n: bigint, d: bigint, f: Frac): number {
  const num = f.num < 0n ? -f.num : f.num;
  return Number(f.den) * Math.max(bitLength(n), bitLength(d)) + Number(num);
}

/** How a decision was made: by powers compared in BigInt, or by a bracket of so many bits. */
export type Decision = { readonly by: "powers" } | { readonly by: "bracket"; readonly bits: number };

/**
 * log2(n/d) as an exact object: its integer value when n/d is a power of two, otherwise an
 * irrational number known through brackets raised on demand.
 * @example new Log2(3n, 1n).compare({ num: 8n, den: 5n }) // -1: log2 3 < 8/5 (3^5 = 243 < 256 = 2^8)
 */
export class Log2 {
  /** The value when n/d is a power of two (then log2 is an integer), else null (irrational). */
  readonly integer: bigint | null;
  private bits = 0;
  private lo: Frac = frac(0n, 1n);
  private hi: Frac = frac(0n, 1n);

  constructor(
    readonly n: bigint,
    readonly d: bigint,
  ) {
    if (n <= 0n || d <= 0n) throw new Error("internal error: log2 of a non-positive number");
    const g = gcd(n, d);
    const a = n / g;
    const b = d / g;
    const pow2 = (x: bigint) => x > 0n && (x & (x - 1n)) === 0n;
    this.integer = pow2(a) && b === 1n ? BigInt(bitLength(a) - 1) : a === 1n && pow2(b) ? -BigInt(bitLength(b) - 1) : null;
  }

  /** A bracket with at least `bits` bits (lo < value < hi when irrational). */
  bracket(bits: number): { lo: Frac; hi: Frac; bits: number } {
    if (bits > this.bits) {
      if (bits > MAX_BRACKET_BITS)
        throw new LimitError(`a bracket of log2(${this.n}/${this.d}) would need more than ${MAX_BRACKET_BITS} bits`);
      const b = log2Bracket(this.n, this.d, bits);
      this.lo = b.lo;
      this.hi = b.hi;
      this.bits = bits;
    }
    return { lo: this.lo, hi: this.hi, bits: this.bits };
  }

  /** sign(value - f), exactly, and how it was decided (`directLimit`: compare powers up to so many bits). */
  decide(f: Frac, directLimit = DIRECT_BITS): { sign: -1 | 0 | 1; how: Decision } {
    if (f.den <= 0n) throw new Error("internal error: compare with a fraction of denominator 0");
    if (this.integer !== null) return { sign: cmpFrac(frac(this.integer, 1n), f), how: { by: "powers" } };
    if (directBits(this.n, this.d, f) <= directLimit) return { sign: compareDirect(this.n, this.d, f), how: { by: "powers" } };
    // irrational: f is never the value itself, so f <= lo means value > f
    for (let bits = Math.max(64, this.bits); ; bits *= 2) {
      const b = this.bracket(bits);
      if (cmpFrac(f, b.lo) <= 0) return { sign: 1, how: { by: "bracket", bits: b.bits } };
      if (cmpFrac(f, b.hi) >= 0) return { sign: -1, how: { by: "bracket", bits: b.bits } };
    }
  }

  /** sign(value - f), exactly. */
  compare(f: Frac): -1 | 0 | 1 {
    return this.decide(f).sign;
  }

  /**
   * The first `count` partial quotients a_0, a_1, ... of the continued fraction (irrational only),
   * each certain: the terms every number of a bracket shares, the bracket refined until there are enough.
   */
  terms(count: number): bigint[] {
    if (this.integer !== null) throw new Error("internal error: the continued fraction of an integer");
    for (let bits = Math.max(64, this.bits); ; bits *= 2) {
      const b = this.bracket(bits);
      const t = sharedTerms(b.lo, b.hi, count);
      if (t.length >= count) return t;
    }
  }

  /** Terms until a convergent's denominator exceeds `maxDen`, with the convergents. */
  convergentsPast(maxDen: bigint): { terms: bigint[]; convergents: Frac[] } {
    for (let count = 8; ; count *= 2) {
      const terms = this.terms(count);
      const convergents = convergentsOf(terms);
      const k = convergents.findIndex((c) => c.den > maxDen);
      if (k >= 0) return { terms: terms.slice(0, k + 1), convergents: convergents.slice(0, k + 1) };
    }
  }
}

function gcd(a: bigint, b: bigint): bigint {
  while (b !== 0n) [a, b] = [b, a % b];
  return a < 0n ? -a : a;
}

const floorDiv = (a: bigint, b: bigint) => (a >= 0n ? a / b : -((-a + b - 1n) / b));

/**
 * The partial quotients (at most `count`) that every irrational x with lo < x < hi shares: a term
 * f = floor(lo) is certain when hi <= f + 1; then x - f lies in (lo - f, hi - f) and 1/(x - f) in
 * (1/(hi - f), 1/(lo - f)), unbounded when lo = f (no further term is certain).
 * @example sharedTerms({ num: 405n, den: 256n }, { num: 406n, den: 256n }, 10) // [1n, 1n, 1n, 2n, 2n]
 */
export function sharedTerms(lo: Frac, hi: Frac, count: number): bigint[] {
  const out: bigint[] = [];
  let a = lo;
  let b = hi;
  while (out.length < count) {
    const f = floorDiv(a.num, a.den);
    if (b.num > (f + 1n) * b.den) break;
    out.push(f);
    const an = a.num - f * a.den;
    const bn = b.num - f * b.den;
    if (an === 0n) break;
    [a, b] = [frac(b.den, bn), frac(a.den, an)];
  }
  return out;
}

/** p_k/q_k from the terms (p_{-1}/q_{-1} = 1/0, p_{-2}/q_{-2} = 0/1). @example convergentsOf([1n, 1n, 1n, 2n]) // 1/1, 2/1, 3/2, 8/5 */
export function convergentsOf(terms: readonly bigint[]): Frac[] {
  let [p2, q2, p1, q1] = [0n, 1n, 1n, 0n];
  return terms.map((a) => {
    const p = a * p1 + p2;
    const q = a * q1 + q2;
    [p2, q2, p1, q1] = [p1, q1, p, q];
    return frac(p, q);
  });
}

/**
 * Σ_{i=0}^{n-1} floor((a i + b)/m) for n, m > 0 and a, b >= 0, in O(log) steps (the classical
 * Euclid-like reduction of a floor sum).
 * @example floorSum(4n, 3n, 2n, 0n) // 0 + 0 + 1 + 2 = 3
 */
export function floorSum(n: bigint, m: bigint, a: bigint, b: bigint): bigint {
  let ans = 0n;
  for (;;) {
    if (a >= m) {
      ans += ((n * (n - 1n)) / 2n) * (a / m);
      a %= m;
    }
    if (b >= m) {
      ans += n * (b / m);
      b %= m;
    }
    const yMax = a * n + b;
    if (yMax < m) return ans;
    n = yMax / m;
    b = yMax % m;
    [m, a] = [a, m];
  }
}

/** A pair (ℓ, m): ℓ steps of T in the cycle, m of them odd; ℓ + m standard steps (n -> q n + r counted apart from its halving). */
export interface LengthPair {
  readonly length: bigint;
  readonly odd: bigint;
}

/** One intermediate fraction visited on the way to the least pair, with whether it is admissible. */
export interface Visited {
  readonly fraction: Frac;
  /** Index k of the convergent p_k/q_k whose run it belongs to (k odd above α, even below), and j <= a_k. */
  readonly k: number;
  readonly j: bigint;
}

export interface CycleBound {
  readonly map: CollatzMap;
  /** Every element of the cycles bounded is >= X. */
  readonly X: bigint;
  /** "above": r > 0, ℓ/m in (log2 q, β]; "below": r < 0, ℓ/m in [max(β, 1), log2 q). */
  readonly side: "above" | "below";
  /** q X + r and X: β = log2((q X + r)/X) (null when q X + r <= 0, r < 0). */
  readonly betaRatio: { readonly num: bigint; readonly den: bigint } | null;
  /** β's exact integer value when (q X + r)/X is a power of two (else β is irrational). */
  readonly betaInteger: bigint | null;
  /** r < 0: the window's lower end is 1 (ℓ >= m) because β <= 1 or q X + r <= 0. */
  readonly lowerIsOne: boolean;
  /** The least pair: least m and, in the same pair, least ℓ. */
  readonly least: LengthPair;
  /** Where it lies: (p_{k-2} + j p_{k-1})/(q_{k-2} + j q_{k-1}), 1 <= j <= a = a_k (j = a: the convergent p_k/q_k). */
  readonly at: { readonly k: number; readonly j: bigint; readonly a: bigint };
  /** The intermediate fraction before it on the same side (not admissible), and the convergent on the other side. */
  readonly previous: Frac;
  readonly neighbour: Frac;
  /** How the least pair's two inequalities and the previous fraction's failure were decided. */
  readonly confirmed: { readonly qSide: Decision; readonly xSide: Decision; readonly previous: Decision };
  /** log2 q's partial quotients and convergents up to the run that holds the least pair, and one past. */
  readonly terms: bigint[];
  readonly convergents: Frac[];
  /** The intermediate fractions on the window's side, in the order visited (capped), and their number. */
  readonly visited: Visited[];
  readonly visitedCount: number;
}

/** The window of admissible ratios ℓ/m for cycles with every element >= X: α = log2 q and β. */
export class Window {
  readonly alpha: Log2;
  readonly beta: Log2 | null;
  readonly side: "above" | "below";
  /** r < 0: the lower end is 1 (β <= 1, or q X + r <= 0). */
  readonly lowerIsOne: boolean;

  constructor(
    readonly map: CollatzMap,
    readonly X: bigint,
  ) {
    if (X < 1n) throw new UsageError(`X must be at least 1, got ${X}`);
    this.alpha = new Log2(BigInt(map.q), 1n);
    this.side = map.r > 0 ? "above" : "below";
    const top = BigInt(map.q) * X + BigInt(map.r);
    this.lowerIsOne = map.r < 0 && top <= 2n * X;
    this.beta = top > 0n && !this.lowerIsOne ? new Log2(top, X) : null;
  }

  /** sign(β_eff - f): β for r > 0, max(β, 1) for r < 0. */
  private betaDecide(f: Frac, limit?: number): { sign: -1 | 0 | 1; how: Decision } {
    if (this.beta === null) return { sign: cmpFrac(frac(1n, 1n), f), how: { by: "powers" } };
    return this.beta.decide(f, limit);
  }

  /** Whether ℓ/m (m >= 1) is admissible, exactly. */
  admits(f: Frac): boolean {
    if (f.den <= 0n) return false;
    const a = this.alpha.compare(f);
    const b = this.betaDecide(f).sign;
    return this.side === "above" ? a < 0 && b >= 0 : a > 0 && b <= 0;
  }

  /** Whether an interval (A, B) of fractions (open; B may be 1/0) meets the window. */
  meets(A: Frac, B: Frac): boolean {
    const below = (f: Frac, x: Log2 | "beta") => (f.den === 0n ? false : (x === "beta" ? this.betaDecide(f).sign : x.compare(f)) > 0); // f < x
    const above = (f: Frac, x: Log2 | "beta") => (f.den === 0n ? true : (x === "beta" ? this.betaDecide(f).sign : x.compare(f)) < 0);
    // above: (α, β]: A < β and B > α; below: [β_eff, α): A < α and B > β_eff
    return this.side === "above" ? below(A, "beta") && above(B, this.alpha) : below(A, this.alpha) && above(B, "beta");
  }

  /**
   * The least admissible pair, by the walk over log2 q's intermediate fractions on the window's side
   * (upper ones for r > 0: k odd; lower ones for r < 0: k even), each run j = 1..a_k searched by
   * bisection (the fractions of a run are monotone).
   * @example new Window(parseMap("3x+1"), 2n ** 40n).least().least // { length: 17087915n, odd: 10781274n }
   */
  least(visitCap = 200): CycleBound {
    const above = this.side === "above";
    const inWindow = (f: Frac) => (above ? this.betaDecide(f).sign >= 0 : this.betaDecide(f).sign <= 0);
    const visited: Visited[] = [];
    let visitedCount = 0;
    let terms = this.alpha.terms(8);
    // p_{k-2}/q_{k-2} and p_{k-1}/q_{k-1} before term k
    let [p2, q2, p1, q1] = [0n, 1n, 1n, 0n];
    for (let k = 0; ; k++) {
      if (k >= terms.length) terms = this.alpha.terms(terms.length * 2);
      const a = terms[k]!;
      if ((k % 2 === 1) === above) {
        const at = (j: bigint) => frac(p2 + j * p1, q2 + j * q1);
        // the fractions of the run approach α as j grows: find the least j in [1, a] inside the window
        let lo = 1n;
        let hi = a + 1n; // a + 1: none
        while (lo < hi) {
          const mid = (lo + hi) / 2n;
          if (inWindow(at(mid))) hi = mid;
          else lo = mid + 1n;
        }
        const last = lo <= a ? lo : a;
        for (let j = 1n; j <= last && visited.length < visitCap; j++) visited.push({ fraction: at(j), k, j });
        visitedCount += Number(last);
        if (lo <= a) {
          const best = at(lo);
          const previous = at(lo - 1n);
          const neighbour = frac(p1, q1);
          // the terms to a_(k+1): the convergent after the run's is shown too
          const at0 = { k, j: lo, a };
          return this.confirm(best, previous, neighbour, at0, this.alpha.terms(k + 2), visited, visitedCount);
        }
      }
      [p2, q2, p1, q1] = [p1, q1, a * p1 + p2, a * q1 + q2];
    }
  }

  private confirm(
    best: Frac,
    previous: Frac,
    neighbour: Frac,
    at: CycleBound["at"],
    terms: bigint[],
    visited: Visited[],
    visitedCount: number,
  ): CycleBound {
    const q = this.alpha.decide(best, CONFIRM_BITS);
    const x = this.betaDecide(best, CONFIRM_BITS);
    const above = this.side === "above";
    // the previous fraction lies outside the window on β's side (for 1/0 and 0/1 there is nothing to decide)
    const prevOut =
      previous.den === 0n || previous.num === 0n
        ? { sign: above ? -1 : 1, how: { by: "powers" } as Decision }
        : this.betaDecide(previous, CONFIRM_BITS);
    const ok = above ? q.sign < 0 && x.sign >= 0 && prevOut.sign < 0 : q.sign > 0 && x.sign <= 0 && prevOut.sign > 0;
    if (!ok) throw new Error(`internal error: the least pair ${best.num}/${best.den} did not confirm`);
    const top = BigInt(this.map.q) * this.X + BigInt(this.map.r);
    return {
      map: this.map,
      X: this.X,
      side: this.side,
      betaRatio: top > 0n ? { num: top, den: this.X } : null,
      betaInteger: this.beta?.integer ?? null,
      lowerIsOne: this.lowerIsOne,
      least: { length: best.num, odd: best.den },
      at,
      previous,
      neighbour,
      confirmed: { qSide: q.how, xSide: x.how, previous: prevOut.how },
      terms,
      convergents: convergentsOf(terms),
      visited,
      visitedCount,
    };
  }

  /** Σ_{m=1}^{M} floor(m x) for x = α or β (irrational: a convergent with denominator > M gives the same floors). */
  private floorTotal(x: Log2 | bigint, M: bigint): bigint {
    if (typeof x === "bigint") return (x * M * (M + 1n)) / 2n;
    if (x.integer !== null) return (x.integer * M * (M + 1n)) / 2n;
    const { convergents } = x.convergentsPast(M);
    const c = convergents.at(-1)!;
    // for 1 <= m < c.den: |m x - m c.num/c.den| < 1/c.den <= distance of m c.num/c.den to the integers
    if (c.num < 0n) throw new Error("internal error: a negative logarithm in a floor sum");
    return floorSum(M + 1n, c.den, c.num, 0n);
  }

  /** The number of admissible pairs with 1 <= m <= M (every ℓ counted): floor sums, exact. */
  count(M: bigint): bigint {
    if (M < 1n) return 0n;
    const fa = this.floorTotal(this.alpha, M);
    if (this.side === "above") return this.floorTotal(this.beta!, M) - fa;
    // #{ℓ : m β_eff <= ℓ < m α} = floor(m α) + 1 - ceil(m β_eff)
    const b = this.beta;
    if (b === null || b.integer !== null) {
      const B = b === null ? 1n : b.integer!;
      return fa + M - (B * M * (M + 1n)) / 2n;
    }
    return fa - this.floorTotal(b, M);
  }

  /**
   * The admissible pairs with m <= M, smallest (m, then ℓ) first, at most `cap`, and how many more:
   * the window's reduced fractions in order of denominator (a Stern-Brocot walk kept in a heap by
   * denominator, subtrees that miss the window dropped) merged with their multiples.
   * @example new Window(parseMap("3x+1"), 1n).pairs(3n, 10).listed // (2,1) (4,2) (5,3) (6,3)
   */
  pairs(M: bigint, cap: number): { listed: LengthPair[]; count: bigint; more: bigint } {
    if (M > MAX_ODD_BOUND) throw new LimitError("the bound on m is at most 2^256");
    const count = this.count(M);
    const listed: LengthPair[] = [];
    type Entry = { m: bigint; l: bigint; node?: [Frac, Frac]; base?: Frac; g?: bigint };
    const heap: Entry[] = [];
    const less = (x: Entry, y: Entry) => x.m < y.m || (x.m === y.m && x.l < y.l);
    const push = (e: Entry) => {
      heap.push(e);
      for (let i = heap.length - 1; i > 0; ) {
        const p = (i - 1) >> 1;
        if (!less(heap[i]!, heap[p]!)) break;
        [heap[i], heap[p]] = [heap[p]!, heap[i]!];
        i = p;
      }
    };
    const pop = (): Entry => {
      const top = heap[0]!;
      const last = heap.pop()!;
      if (heap.length > 0) {
        heap[0] = last;
        for (let i = 0; ; ) {
          const a = 2 * i + 1;
          const b = a + 1;
          let s = i;
          if (a < heap.length && less(heap[a]!, heap[s]!)) s = a;
          if (b < heap.length && less(heap[b]!, heap[s]!)) s = b;
          if (s === i) break;
          [heap[i], heap[s]] = [heap[s]!, heap[i]!];
          i = s;
        }
      }
      return top;
    };
    const node = (A: Frac, B: Frac) => {
      if (!this.meets(A, B)) return;
      const m = A.den + B.den;
      if (m <= M) push({ m, l: A.num + B.num, node: [A, B] });
    };
    node(frac(0n, 1n), frac(1n, 0n));
    let visits = 0;
    while (heap.length > 0 && listed.length < cap) {
      const e = pop();
      if (++visits > MAX_VISITS) throw new LimitError(`listing the pairs would visit more than ${MAX_VISITS} fractions: lower --max-odd`);
      if (e.node) {
        const [A, B] = e.node;
        const C = frac(e.l, e.m);
        if (this.admits(C)) {
          listed.push({ length: C.num, odd: C.den });
          if (2n * C.den <= M) push({ m: 2n * C.den, l: 2n * C.num, base: C, g: 2n });
        }
        node(A, C);
        node(C, B);
      } else {
        listed.push({ length: e.l, odd: e.m });
        const g = e.g! + 1n;
        if (g * e.base!.den <= M) push({ m: g * e.base!.den, l: g * e.base!.num, base: e.base!, g });
      }
    }
    return { listed, count, more: count - BigInt(listed.length) };
  }
}

/**
 * The least pair for cycles of `map` with every element >= X (see Window.least).
 * @example cycleBound(parseMap("3x+1"), 2n ** 40n).least.length // 17087915n
 */
export function cycleBound(map: CollatzMap, X: bigint): CycleBound {
  return new Window(map, X).least();
}
