// Convergence verification of a block of consecutive n (any odd r): every n is shown to reach a value
// below n (its glide), or found on a cycle (it returns to n), or left unresolved past a step cap.
//
// Aligned blocks (whole periods n = a + 2^K h, h0 <= h < h0 + periods) visit only the survivors of
// the depth-K sieve: a survivor starts at step K in one multiply-add, T^K(n) = q^m h + b, then takes
// table steps of KS steps, T^KS(x 2^KS + c) = q^mc x + bc, while v >= n 2^KS (no step more than
// halves, so a table step cannot pass the first value below n), and single steps near the end.
// Sieved n (their class is cut at depth j) descend at step j exactly (coefficient stopping time);
// the host counts them. They are iterated here only when they could be a record of the block (a
// glide or path larger than every smaller n of the block) and when they are the sieve's exceptions.
// Ranged blocks (any [lo, hi)) iterate every n exactly and find its class's cut depth on the way.
//
// Arithmetic is unsigned 128-bit (hi, lo) with the carry out of every product and sum checked; a
// value at or above 2^limitBits (128 at most) hands n to the host, which finishes it in BigInt.
// n itself is a 128-bit pair (nl, nh) below 2^127: blocks start anywhere below that, and every
// list entry carries n's high word in its last word.
// With r < 0 the images b of the tables are signed (i64) and an odd step subtracts; a value that
// would be zero or below is handed to the host too (only n below |r| can get there, common practice:
// from v >= n > |r| / q an odd step stays positive).
// Path maxima are exact whenever they could matter: a table step adds a bound on the values inside
// it (from the peak coefficient of its class, q^mp / 2^ip); when the bound could beat the block's
// largest path so far, n is iterated again in single steps.

import { flush } from "./buffers";
import {
  VERIFY_MAX_DEPTH,
  VERIFY_MAX_STEP_DEPTH,
  CHANNEL_CHUNK,
  CHANNEL_CYCLE_MEMBERS,
  CHANNEL_GLIDE_RECORDS,
  CHANNEL_HANDOFFS,
  CHANNEL_PATH_RECORDS,
  CHANNEL_UNRESOLVED,
  VERIFY_COUNT_CHECKED,
  VERIFY_COUNT_CYCLES,
  VERIFY_COUNT_EXCEPTIONS,
  VERIFY_COUNT_HANDOFFS,
  VERIFY_COUNT_PREIMAGE,
  VERIFY_COUNT_SIEVED,
  VERIFY_COUNT_UNRESOLVED,
  VERIFY_COUNTS,
  VERIFY_REGION_BYTES,
} from "./layout";
import { carry, leU, ltU, mulAdd, rhi, rlo } from "./u128";
import { dropDepth, evenBit, evenImage, evenResidue, oddImage, stepImage, stepValue, useTables } from "./tree";

const DONE_DESCENT: i32 = 0;
const DONE_CYCLE: i32 = 1;
const DONE_UNRESOLVED: i32 = 2;
const DONE_HANDOFF: i32 = 3;

let Q: u64 = 0;
let slackK: u64 = 0; // r (q/2)^K, rounded up (the first K steps of a survivor)
let slackPtr: usize = 0; // u64 r (q/2)^d rounded up, d = 0..KS (host)
let HQ: u64 = 0; // (q + r) / 2, two's complement: the odd step is q (v >> 1) + HQ
let NEG: bool = false; // r < 0: the images b (and HQ) are signed
// r > 0 and no lowered limit below 2^64: fast() may take its last single steps in one word, an odd
// step from v while v >> 1 <= tightHalf = (2^64 - 1 - HQ) / q (then q (v >> 1) + HQ < 2^64)
let tight: bool = false;
let tightHalf: u64 = 0;
let SIGN: u64 = 0; // all ones when r < 0: b & SIGN is negative exactly when a signed b is
let K: i32 = 0; // sieve depth
let KS: i32 = 0; // table step depth
let maxSteps: i32 = 0;
let limitBits: i32 = 128;
let qpowPtr: usize = 0; // u64 q^m, m = 0..63
let survA: usize = 0; // u32 residues of the survivors mod 2^K, ascending
let survM: usize = 0; // u8 m
let survB: usize = 0; // u64 b
let survPeak: usize = 0; // u8 ip, u8 mp per survivor: the peak of q^(m_i)/2^i over i < K
// Step tables of every depth d = 1..KS, the one of depth d at entry 2^d - 2: m (u8), b (u64) and the
// peak (u8 ip, u8 mp) of the coefficients over its d steps, per residue mod 2^d.
let stepM: usize = 0;
let stepB: usize = 0;
let stepPeak: usize = 0;
// The trough (u8 it, u8 mt) of the depth-KS table per residue: the least q^(m_i) / 2^i over i <= KS
// (i = 0 included). With r > 0, T^i(v) >= q^(m_i) v / 2^i, so q^mt v > n 2^it shows that no value
// inside a full table step from v goes below n (or meets it).
let stepTrough: usize = 0;
let countsPtr: usize = 0;
let regions: usize = 0; // one region per channel 7..11
const chanN = new StaticArray<i32>(5);
// the largest values so far in the block (glide in standard steps; path as u128)
let bestGlide: i32 = -1;
let bestPathLo: u64 = 0;
let bestPathHi: u64 = 0;
let bestPathBits: i32 = 0;
// results of the last iteration
let glideT: i32 = 0;
let glideOdd: i32 = 0;
let pathLo: u64 = 0;
let pathHi: u64 = 0;
let cutDepth: i32 = 0; // the depth where n's class coefficient first drops (0: not within K)
let exceededPath: bool = false; // the path bound could exceed the block's best (fast mode)

@inline function bump(i: i32): void {
  const p = countsPtr + (<usize>i << 3);
  store<u64>(p, load<u64>(p) + 1);
}

function push(ch: i32, x0: u64, x1: u64, x2: u64, x3: u64): void {
  const slot = ch - CHANNEL_GLIDE_RECORDS;
  const n = unchecked(chanN[slot]);
  const p = regions + <usize>slot * <usize>VERIFY_REGION_BYTES + (<usize>n << 5);
  store<u64>(p, x0);
  store<u64>(p, x1, 8);
  store<u64>(p, x2, 16);
  store<u64>(p, x3, 24);
  if (n + 1 == CHANNEL_CHUNK) {
    flush(ch, n + 1);
    unchecked((chanN[slot] = 0));
  } else unchecked((chanN[slot] = n + 1));
}

/** The value is at or above 2^limitBits (so n goes to the host). */
@inline function tooLarge(lo: u64, hi: u64): bool {
  if (limitBits >= 128) return false;
  if (limitBits >= 64) return (hi >> <u64>(limitBits - 64)) != 0;
  return hi != 0 || (lo >> <u64>limitBits) != 0;
}

@inline function slackD(d: i32): u64 {
  return load<u64>(slackPtr + (<usize>d << 3));
}

/**
 * (hi, lo) y + b into (rhi, rlo), b read as signed when r < 0; carry when the result needs more than
 * 128 bits or is zero or below (the host finishes n in BigInt).
 */
@inline function affine(lo: u64, hi: u64, y: u64, b: u64): void {
  if (<i64>(b & SIGN) >= 0) {
    mulAdd(lo, hi, y, b);
    return;
  }
  mulAdd(lo, hi, y, 0);
  const d = <u64>-(<i64>b);
  const l = rlo - d;
  if (l > rlo) {
    if (rhi == 0) carry = true;
    rhi--;
  }
  rlo = l;
  if (rlo == 0 && rhi == 0) carry = true;
}

/** One step of T on a value within the host-proven width (signed when r < 0), for the class tables. */
@inline function step64(v: u64): u64 {
  const half = NEG ? <u64>(<i64>v >> 1) : v >> 1;
  return (v & 1) == 0 ? half : Q * half + HQ;
}

@inline function bitlen(lo: u64, hi: u64): i32 {
  return hi != 0 ? 128 - <i32>clz(hi) : 64 - <i32>clz(lo);
}


/**
 * n iterated one step at a time from step 0: the exact glide, odd steps and path, and the depth at
 * which its class's coefficient first drops (cutDepth, 0 when not within K).
 */
function exact(nl: u64, nh: u64): i32 {
  let vl = nl, vh = nh;
  let steps = 0, odd = 0;
  let pl = nl, ph = nh;
  cutDepth = 0;
  while (true) {
    if ((vl & 1) == 0) {
      vl = (vl >> 1) | (vh << 63);
      vh >>= 1;
    } else {
      // q (v >> 1) + (q + r) / 2
      affine((vl >> 1) | (vh << 63), vh >> 1, Q, HQ);
      if (carry || tooLarge(rlo, rhi)) return DONE_HANDOFF;
      vl = rlo;
      vh = rhi;
      odd++;
    }
    steps++;
    if (cutDepth == 0 && steps <= K && steps >= dropDepth(odd)) cutDepth = steps;
    if (ltU(pl, ph, vl, vh)) {
      pl = vl;
      ph = vh;
    }
    if (ltU(vl, vh, nl, nh)) break;
    if (vl == nl && vh == nh) {
      glideT = steps;
      glideOdd = odd;
      return DONE_CYCLE;
    }
    if (steps >= maxSteps) return DONE_UNRESOLVED;
  }
  glideT = steps;
  glideOdd = odd;
  pathLo = pl;
  pathHi = ph;
  return DONE_DESCENT;
}

/**
 * An upper bound on the values T^i(v) inside L steps from v, given the peak (ip, mp) of the
 * coefficients q^(m_i)/2^i over those steps and slack >= r (q/2)^L (host, BigInt): with
 * T^i(v) = (q^(m_i) v + c_i) / 2^i and c_i / 2^i <= r (q/2)^(m_i), the bound is
 * q^mp v / 2^ip + slack + 1. carry: too large for 128 bits (treat as unbounded).
 */
@inline function peakBound(vl: u64, vh: u64, ip: i32, mp: i32, slack: u64): void {
  mulAdd(vl, vh, load<u64>(qpowPtr + (<usize>mp << 3)), 0);
  const over = carry;
  if (ip > 0) {
    rlo = (rlo >> <u64>ip) | (rhi << <u64>(64 - ip));
    rhi >>= <u64>ip;
  }
  const l = rlo + slack;
  if (l < rlo) rhi++;
  rlo = l + 1;
  if (rlo == 0) rhi++;
  // a slack of 2^64 - 1 is the host's clamp of a larger one: no bound then
  carry = over || rhi == 0xffffffffffffffff || slack == 0xffffffffffffffff;
}

/**
 * Survivor i of the sieve at period h: n = a + 2^K h. The exact glide; the path only as a bound
 * (exceededPath says whether it could beat the block's best, in which case the caller iterates
 * n exactly).
 */
function fast(nl: u64, nh: u64, i: i32, hl: u64, hh: u64): i32 {
  const m = <i32>load<u8>(survM + <usize>i);
  // values inside the first K steps: at most q^mp (n + r) / 2^ip
  const pk = survPeak + (<usize>i << 1);
  const ip = <i32>load<u8>(pk), mp = <i32>load<u8>(pk, 1);
  const nBits = bitlen(nl, nh);
  let bl = nl, bh = nh;
  if (nBits + dropDepth(mp) - ip + 2 >= bestPathBits || 64 - <i32>clz(slackK) > nBits) {
    peakBound(nl, nh, ip, mp, slackK);
    bl = rlo;
    bh = carry ? <u64>-1 : rhi;
  }
  affine(hl, hh, load<u64>(qpowPtr + (<usize>m << 3)), load<u64>(survB + (<usize>i << 3)));
  if (carry || tooLarge(rlo, rhi)) return DONE_HANDOFF;
  return descend(nl, nh, nBits, rlo, rhi, K, m, bl, bh);
}

/**
 * n's trajectory on from v = T^steps(n) (odd of the steps odd) to its first value below n: table
 * steps where they cannot pass it, single steps near it. (bl, bh) is a bound on the values so far;
 * exceededPath says at the end whether the path could beat (bestPathLo, bestPathHi).
 */
function descend(nl: u64, nh: u64, nBits: i32, vl: u64, vh: u64, steps: i32, odd: i32, bl: u64, bh: u64): i32 {
  while (true) {
    if (ltU(bl, bh, vl, vh)) {
      bl = vl;
      bh = vh;
    }
    if (ltU(vl, vh, nl, nh)) break;
    if (vl == nl && vh == nh) {
      glideT = steps;
      glideOdd = odd;
      return DONE_CYCLE;
    }
    if (steps >= maxSteps) return DONE_UNRESOLVED;
    // v >= n 2^d for d = bitlen(v) - bitlen(n) - 1: a table step of depth d cannot pass below n;
    // nor can a full one when the trough of v's class keeps q^mt v above n 2^it (r > 0)
    const bits = bitlen(vl, vh);
    let d = bits - nBits - 1;
    if (d >= KS) d = KS;
    else if (!NEG && nBits + KS < 127) {
      const tp = stepTrough + (<usize>(vl & (((<u64>1) << <u64>KS) - 1)) << 1);
      const it = <u64>load<u8>(tp), mt = <i32>load<u8>(tp, 1);
      mulAdd(vl, vh, load<u64>(qpowPtr + (<usize>mt << 3)), 0);
      const sl = nl << it, sh = it == 0 ? nh : (nh << it) | (nl >> (64 - it));
      if (carry || ltU(sl, sh, rlo, rhi)) d = KS;
    }
    if (d >= 2) {
      const c = <usize>(vl & (((<u64>1) << <u64>d) - 1)) + (((<usize>1) << <usize>d) - 2);
      const sp = stepPeak + (c << 1);
      const ip = <i32>load<u8>(sp), mp = <i32>load<u8>(sp, 1);
      const sl = slackD(d);
      // the bound is below 2^(bits + bitlen(q^mp) - ip + 1) when the slack is below 2^bits: skip it
      // while that cannot reach the block's best path
      if (bits + dropDepth(mp) - ip + 2 >= bestPathBits || 64 - <i32>clz(sl) > bits) {
        peakBound(vl, vh, ip, mp, sl);
        if (carry) bh = <u64>-1;
        else if (ltU(bl, bh, rlo, rhi)) {
          bl = rlo;
          bh = rhi;
        }
      }
      const sm = <i32>load<u8>(stepM + c);
      const xl = (vl >> <u64>d) | (vh << <u64>(64 - d)), xh = vh >> <u64>d;
      affine(xl, xh, load<u64>(qpowPtr + (<usize>sm << 3)), load<u64>(stepB + (c << 3)));
      if (carry || tooLarge(rlo, rhi)) return DONE_HANDOFF;
      vl = rlo;
      vh = rhi;
      steps += d;
      odd += sm;
    } else if (tight && vh == 0 && nh == 0 && ((vl & 1) == 0 || vl >> 1 <= tightHalf)) {
      // the last steps, v below 2^(bitlen(n) + 2) and n, v in one word: single steps in 64 bits until
      // v goes below n, meets it, passes the cap, grows back to where table steps resume, or could overflow
      let v = vl;
      const resume: u64 = nBits + 2 < 64 ? (<u64>1) << <u64>(nBits + 2) : <u64>-1;
      while (true) {
        if ((v & 1) == 0) v >>= 1;
        else {
          v = Q * (v >> 1) + HQ;
          odd++;
        }
        steps++;
        if (bh == 0 && v > bl) bl = v;
        if (v <= nl || steps >= maxSteps || v >= resume || ((v & 1) != 0 && v >> 1 > tightHalf)) break;
      }
      vl = v;
    } else if ((vl & 1) == 0) {
      vl = (vl >> 1) | (vh << 63);
      vh >>= 1;
      steps++;
    } else {
      affine((vl >> 1) | (vh << 63), vh >> 1, Q, HQ);
      if (carry || tooLarge(rlo, rhi)) return DONE_HANDOFF;
      vl = rlo;
      vh = rhi;
      steps++;
      odd++;
    }
  }
  glideT = steps;
  glideOdd = odd;
  exceededPath = ltU(bestPathLo, bestPathHi, bl, bh);
  return DONE_DESCENT;
}

/**
 * Records of the block: a glide (standard steps) or a path above every smaller n's so far; in class
 * mode, candidates (the least n of each glide, a path above its band's bound).
 */
@inline function noteRecords(nl: u64, nh: u64, glideStd: i32): void {
  if (classMode) {
    noteGlideMin(nl, glideStd, glideT);
    notePathCandidate(nl);
    return;
  }
  if (glideStd > bestGlide) {
    bestGlide = glideStd;
    push(CHANNEL_GLIDE_RECORDS, nl, <u64>glideT, <u64>glideStd, nh);
  }
  notePath(nl, nh);
}

@inline function notePath(nl: u64, nh: u64): void {
  if (classMode) {
    notePathCandidate(nl);
    return;
  }
  if (ltU(bestPathLo, bestPathHi, pathLo, pathHi)) {
    bestPathLo = pathLo;
    bestPathHi = pathHi;
    bestPathBits = bitlen(pathLo, pathHi);
    push(CHANNEL_PATH_RECORDS, nl, pathLo, pathHi, nh);
  }
}

/** Finishes n after `exact`: counts, records, and the lists of the other outcomes. */
function settle(nl: u64, nh: u64, done: i32, counted: i32): void {
  if (done == DONE_DESCENT) {
    if (counted >= 0) bump(counted);
    noteRecords(nl, nh, glideT + glideOdd);
  } else if (done == DONE_CYCLE) {
    // a cycle member never goes below n; for the path records it counts as n itself
    bump(VERIFY_COUNT_CYCLES);
    push(CHANNEL_CYCLE_MEMBERS, nl, <u64>glideT, 0, nh);
    pathLo = nl;
    pathHi = nh;
    notePath(nl, nh);
  } else if (done == DONE_UNRESOLVED) {
    bump(VERIFY_COUNT_UNRESOLVED);
    push(CHANNEL_UNRESOLVED, nl, 0, 0, nh);
  } else {
    // counted < 0: the host's arithmetic already counts n (a sieved n iterated as a possible record)
    bump(VERIFY_COUNT_HANDOFFS);
    push(CHANNEL_HANDOFFS, nl, counted < 0 ? 1 : 0, 0, nh);
  }
}

/** The map's constants: q, (q + r) / 2 in two's complement, and whether r < 0. */
function setMap(q: u32, r: i32): void {
  Q = <u64>q;
  HQ = <u64>((<i64>q + <i64>r) >> 1);
  NEG = r < 0;
  SIGN = NEG ? <u64>-1 : 0;
}

function begin(q: u32, r: i32, depth: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, counts: usize, scratch: usize): void {
  setMap(q, r);
  K = depth;
  KS = stepDepth;
  maxSteps = steps;
  limitBits = limit;
  tight = !NEG && limit >= 64;
  tightHalf = (<u64>-1 - HQ) / Q;
  useTables(tables);
  qpowPtr = tables;
  countsPtr = counts;
  memory.fill(counts, 0, VERIFY_COUNTS * 8);
  regions = scratch;
  for (let s = 0; s < 5; s++) unchecked((chanN[s] = 0));
  bestGlide = -1;
  bestPathLo = 0;
  bestPathHi = 0;
  bestPathBits = 0;
  classMode = false;
}

function end(): void {
  for (let s = 0; s < 5; s++) {
    const n = unchecked(chanN[s]);
    if (n > 0) flush(s + CHANNEL_GLIDE_RECORDS, n);
    unchecked((chanN[s] = 0));
  }
}

/** The peak (ip, mp) of q^(m_i) / 2^i over i < len along the parities of a (exact comparison). */
function peakOf(a: u64, len: i32, out: usize): void {
  let v = a, m = 0, ip = 0, mp = 0;
  for (let i = 1; i < len; i++) {
    if ((v & 1) != 0) m++;
    v = step64(v); // within the host-proven width for i < len <= the sieve's limit
    // q^m / 2^i > q^mp / 2^ip iff q^(m - mp) > 2^(i - ip) iff i - ip < bitlen(q^(m - mp))
    if (m > mp && i - ip < dropDepth(m - mp)) {
      ip = i;
      mp = m;
    }
  }
  store<u8>(out, <u8>ip);
  store<u8>(out, <u8>mp, 1);
}

/** The trough (it, mt) of q^(m_i) / 2^i over 0 <= i <= len along the parities of a (exact comparison). */
function troughOf(a: u64, len: i32, out: usize): void {
  let v = a, m = 0, it = 0, mt = 0;
  for (let i = 1; i <= len; i++) {
    if ((v & 1) != 0) m++;
    v = step64(v);
    // q^m / 2^i < q^mt / 2^it iff q^(m - mt) < 2^(i - it) iff bitlen(q^(m - mt)) <= i - it
    if (dropDepth(m - mt) <= i - it) {
      it = i;
      mt = m;
    }
  }
  store<u8>(out, <u8>it);
  store<u8>(out, <u8>mt, 1);
}

/** The class of a mod 2^len: (m, b) with T^len(a + 2^len x) = q^m x + b, b = T^len(a) (within the proven width). */
function classOf(a: u64, len: i32, mOut: usize, bOut: usize): void {
  let v = a, odd = 0;
  for (let j = 0; j < len; j++) {
    if ((v & 1) != 0) odd++;
    v = step64(v);
  }
  store<u8>(mOut, <u8>odd);
  store<u64>(bOut, v);
}

/**
 * Prepares a run's tables once per worker: for every survivor a of the depth-K sieve (given as
 * ascending u32 residues) its (m, b) with T^K(a + 2^K x) = q^m x + b and the peak of its first K
 * steps; the step tables of every depth d <= KS (entry 2^d - 2 onwards: m, b and the peak of its d
 * steps). tables: the per-m tables (TABLE_*). Every other address is an output.
 */
export function verifyPrepare(
  q: u32, r: i32, depth: i32, stepDepth: i32, tables: usize, survivors: i32,
  a: usize, m: usize, b: usize, peak: usize, sm: usize, sb: usize, speak: usize, trough: usize,
): void {
  assert(r != 0 && depth >= 1 && depth <= VERIFY_MAX_DEPTH && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && survivors >= 0);
  setMap(q, r);
  useTables(tables);
  survA = a;
  survM = m;
  survB = b;
  survPeak = peak;
  stepM = sm;
  stepB = sb;
  stepPeak = speak;
  stepTrough = trough;
  for (let i = 0; i < survivors; i++) {
    const at = <usize>i;
    const res = <u64>load<u32>(a + (at << 2));
    peakOf(res, depth, peak + (at << 1));
    classOf(res, depth, m + at, b + (at << 3));
  }
  for (let d = 1; d <= stepDepth; d++) {
    const base = ((<usize>1) << <usize>d) - 2;
    for (let c: u64 = 0; c < (<u64>1) << <u64>d; c++) {
      const at = base + <usize>c;
      peakOf(c, d, speak + (at << 1));
      if (d == stepDepth) troughOf(c, d, trough + (<usize>c << 1));
      classOf(c, d, sm + at, sb + (at << 3));
    }
  }
}

/**
 * An aligned block: n = a + 2^K h for h0 <= h < h0 + periods (h0 = (h0h, h0l)), in increasing n.
 * Survivors are iterated; sieved n only where they could be records (or are in the sorted exception
 * list exc[0..excN), all below 2^64). Counts by outcome go to `counts`, lists to the channels.
 * (r < 0: a small survivor may go below itself before step K, where fast() starts; fast() then only
 * overstates its glide and path, and every n whose glide or path could be a record is iterated again
 * exactly, so the records and counts stay exact.)
 * Returns the survivors visited. The caller ensures 0 < n < 2^127 throughout.
 */
export function verifyAligned(
  q: u32, r: i32, depth: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, survivors: i32,
  h0l: u64, h0h: u64, periods: u64, exc: usize, excN: i32, sievedGlide: i32, sievedPeak: i32, sievedSlack: u64,
  survivorSlack: u64, slacks: usize, counts: usize, scratch: usize,
): u64 {
  assert(r != 0 && survivors > 0 && depth >= 1 && depth <= VERIFY_MAX_DEPTH && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && limit >= 1 && limit <= 128);
  begin(q, r, depth, stepDepth, steps, limit, tables, counts, scratch);
  slackK = survivorSlack;
  slackPtr = slacks;
  const sievedPeakBits = dropDepth(sievedPeak) - sievedPeak; // bitlen(q^mp) - ip, the bound's extra bits
  const K = <u64>depth;
  let e = 0; // next exception
  let visited: u64 = 0;
  let hl = h0l, hh = h0h;
  for (let p: u64 = 0; p < periods; p++) {
    // base = h 2^K (below 2^127: no bit is lost)
    const baseL = hl << K, baseH = (hh << K) | (hl >> (64 - K));
    let prevL = baseL, prevH = baseH; // first n of the current gap
    for (let i = 0; i <= survivors; i++) {
      const off: u64 = i < survivors ? <u64>load<u32>(survA + (<usize>i << 2)) : (<u64>1) << K;
      const nextL = baseL + off, nextH = baseH + select<u64>(1, 0, baseL + off < baseL);
      // the gap [prev, next) of sieved n: records are possible only while the block's best glide
      // is below the deepest cut's, or its best path below a bound on theirs: a class cut by depth K
      // has m_i <= sievedPeak odd steps among its first i < j steps, so T^i(n) <= (q/2)^sievedPeak n + slack
      if (ltU(prevL, prevH, nextL, nextH)) {
        let candidate = bestGlide < sievedGlide;
        if (!candidate) {
          const bits = bitlen(nextL, nextH);
          if (bits + sievedPeakBits + 2 >= bestPathBits || 64 - <i32>clz(sievedSlack) > bits) {
            peakBound(nextL, nextH, sievedPeak, sievedPeak, sievedSlack);
            candidate = carry || ltU(bestPathLo, bestPathHi, rlo, rhi);
          }
        }
        let nl = prevL, nh = prevH;
        while (ltU(nl, nh, nextL, nextH)) {
          const excAt: u64 = e < excN ? load<u64>(exc + (<usize>e << 3)) : 0;
          const isException = e < excN && nh == 0 && excAt == nl;
          if (!candidate && !isException) {
            // on to the next exception in the gap, if any
            if (e < excN && ltU(excAt, 0, nextL, nextH) && ltU(nl, nh, excAt, 0)) {
              nl = excAt;
              nh = 0;
              continue;
            }
            break;
          }
          if (nl != 0 || nh != 0) {
            const done = exact(nl, nh);
            if (isException) {
              e++;
              // (r < 0) a listed n that goes below itself before its class's cut is checked, not an exception
              settle(nl, nh, done, done == DONE_DESCENT && cutDepth == 0 ? VERIFY_COUNT_CHECKED : VERIFY_COUNT_EXCEPTIONS);
            } else if (done == DONE_DESCENT) noteRecords(nl, nh, glideT + glideOdd); // counted by the host
            else settle(nl, nh, done, -1);
          }
          nl++;
          if (nl == 0) nh++;
        }
      }
      if (i == survivors) break;
      visited++;
      let done = fast(nextL, nextH, i, hl, hh);
      if (done == DONE_DESCENT) {
        bump(VERIFY_COUNT_CHECKED);
        if (exceededPath || glideT + glideOdd > bestGlide) {
          // its path could be a record: the exact path, in single steps
          const again = exact(nextL, nextH);
          if (again == DONE_DESCENT) noteRecords(nextL, nextH, glideT + glideOdd);
          // a value past the limit on the way (inside the first K steps, which fast() only bounds): n is
          // counted as checked already; the host iterates it for its records
          else settle(nextL, nextH, again, -1);
        }
      } else if (done == DONE_CYCLE) settle(nextL, nextH, done, -1);
      else {
        // past the cap, or too large for the kernel: single steps settle which (and find the cycle)
        done = exact(nextL, nextH);
        settle(nextL, nextH, done, VERIFY_COUNT_CHECKED);
      }
      prevL = nextL + 1;
      prevH = nextH + select<u64>(1, 0, prevL == 0);
    }
    hl++;
    if (hl == 0) hh++;
  }
  end();
  return visited;
}

/**
 * Any block first..last (inclusive; each a (lo, hi) pair below 2^127), every n iterated exactly
 * (the range's partial periods): sieved n are counted by their cut depth
 * (counts[VERIFY_COUNT_SIEVED + j]), survivors as checked, exceptions apart. Returns the numbers visited.
 */
export function verifyRange(
  q: u32, r: i32, depth: i32, steps: i32, limit: i32, tables: usize, firstL: u64, firstH: u64, lastL: u64, lastH: u64,
  counts: usize, scratch: usize,
): u64 {
  assert(r != 0 && depth >= 1 && depth <= VERIFY_MAX_DEPTH && (firstL | firstH) != 0 && leU(firstL, firstH, lastL, lastH) && limit >= 1 && limit <= 128);
  begin(q, r, depth, 1, steps, limit, tables, counts, scratch);
  let nl = firstL, nh = firstH;
  let visited: u64 = 0;
  while (true) {
    const done = exact(nl, nh);
    if (done == DONE_DESCENT && cutDepth > 0) {
      if (glideT == cutDepth) {
        bump(VERIFY_COUNT_SIEVED + cutDepth);
        noteRecords(nl, nh, glideT + glideOdd);
      } else settle(nl, nh, done, VERIFY_COUNT_EXCEPTIONS);
    } else if (cutDepth > 0) settle(nl, nh, done, VERIFY_COUNT_EXCEPTIONS);
    else settle(nl, nh, done, VERIFY_COUNT_CHECKED);
    visited++;
    if (nl == lastL && nh == lastH) break;
    nl++;
    if (nl == 0) nh++;
  }
  end();
  return visited;
}

/**
 * Delays (total stopping times) of first..last (as verifyRange): the steps each n takes to reach 1,
 * with the step tables where a table step cannot pass over 1 (v >= 2^(d+1)), single steps below.
 * Records go to CHANNEL_GLIDE_RECORDS as (n, steps of T, standard steps); n that do not reach 1
 * within the step cap to CHANNEL_UNRESOLVED; values past 2^limitBits to CHANNEL_HANDOFFS. Needs verifyPrepare.
 * With r = -s < 0 a table step still cannot pass over 1 unseen: if s < q every step from v >= 1 at
 * least halves ((q - 1) v >= s), and if s >= q the step after 1 is (q - s) / 2 <= 0, from where
 * values stay at or below 0, so the step lands at or below 0 and goes to the host (affine).
 */
export function verifyDelays(
  q: u32, r: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, firstL: u64, firstH: u64, lastL: u64, lastH: u64,
  counts: usize, scratch: usize,
): u64 {
  assert(r != 0 && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && (firstL | firstH) != 0 && leU(firstL, firstH, lastL, lastH) && limit >= 1 && limit <= 128);
  begin(q, r, 1, stepDepth, steps, limit, tables, counts, scratch);
  let nl = firstL, nh = firstH;
  let visited: u64 = 0;
  while (true) {
    let vl = nl, vh = nh, t = 0, odd = 0, done = DONE_DESCENT;
    while (vh != 0 || vl != 1) {
      if (t >= maxSteps) {
        done = DONE_UNRESOLVED;
        break;
      }
      let d = bitlen(vl, vh) - 2;
      if (d > KS) d = KS;
      if (d >= 2) {
        const c = <usize>(vl & (((<u64>1) << <u64>d) - 1)) + (((<usize>1) << <usize>d) - 2);
        const sm = <i32>load<u8>(stepM + c);
        affine((vl >> <u64>d) | (vh << <u64>(64 - d)), vh >> <u64>d, load<u64>(qpowPtr + (<usize>sm << 3)), load<u64>(stepB + (c << 3)));
        t += d;
        odd += sm;
      } else if ((vl & 1) == 0) {
        rlo = (vl >> 1) | (vh << 63);
        rhi = vh >> 1;
        carry = false;
        t++;
      } else {
        affine((vl >> 1) | (vh << 63), vh >> 1, Q, HQ);
        t++;
        odd++;
      }
      if (carry || tooLarge(rlo, rhi)) {
        done = DONE_HANDOFF;
        break;
      }
      vl = rlo;
      vh = rhi;
    }
    if (done == DONE_DESCENT) {
      bump(VERIFY_COUNT_CHECKED);
      if (t + odd > bestGlide) {
        bestGlide = t + odd;
        push(CHANNEL_GLIDE_RECORDS, nl, <u64>t, <u64>(t + odd), nh);
      }
    } else if (done == DONE_UNRESOLVED) {
      bump(VERIFY_COUNT_UNRESOLVED);
      push(CHANNEL_UNRESOLVED, nl, 0, 0, nh);
    } else {
      bump(VERIFY_COUNT_HANDOFFS);
      push(CHANNEL_HANDOFFS, nl, 0, 0, nh);
    }
    visited++;
    if (nl == lastL && nh == lastH) break;
    nl++;
    if (nl == 0) nh++;
  }
  end();
  return visited;
}

// ---- a range [1, 2^N) settled class by class ----
// Classes a mod 2^j are extended one bit at a time from a root mod 2^D (D <= N). A class is settled
// at the first depth j where its coefficient q^m / 2^j drops below 1: its members n = a + 2^D x below
// 2^N (x < 2^(N - D)) descend at step j exactly (r > 0: before j every coefficient is above 1, so
// every value is above n), except the few small ones where q^m (n >> j) + b >= n, which are iterated.
// A class not settled by depth N has one member, n = a: a leaf, iterated on from T^N(n) = b. A leaf
// with a smaller number u whose trajectory reaches n (a preimage chain, below) is skipped: n's
// convergence follows from u's, u < n, in the same run.
// Records are kept as candidates: per glide (standard steps) the least n of the block with it, swept
// at the end; a path only when it beats the host's lower bound lb(i) on the largest path of any
// number of [from, from + 2^(i-1)) (n - from in [2^(i-1), 2^i)), computed exactly.

let lbPtr: usize = 0; // u64 pairs (lo, hi) per band i = 0..N of n - from (pathBounds)
let classSlack: usize = 0; // u64 r (q/2)^j rounded up, j = 0..N
let glideMinPtr: usize = 0; // per standard glide g < glideCap: u64 least n, u64 its glide in steps of T
let glideCap: i32 = 0;
let glideTop: i32 = -1; // the largest g written
let nTop: i32 = 0; // N
let usePreimage: bool = false;
let fromN: u64 = 1; // the range's first number (a power of two): members below it are left out
let classMode: bool = false;
// the DFS stack: per depth, a node (a, m, b, peak ip, mp) and which children are done
const stA = new StaticArray<u64>(72);
const stB = new StaticArray<u64>(72);
const stM = new StaticArray<i32>(72);
const stIp = new StaticArray<i32>(72);
const stMp = new StaticArray<i32>(72);
const stState = new StaticArray<i32>(72);

/** The least n of the block with standard glide g (and its glide in steps of T t). */
function noteGlideMin(n: u64, g: i32, t: i32): void {
  if (g >= glideCap) {
    push(CHANNEL_GLIDE_RECORDS, n, <u64>t, <u64>g, 0);
    return;
  }
  const p = glideMinPtr + (<usize>g << 4);
  const had = load<u64>(p);
  if (had == 0 || n < had) {
    store<u64>(p, n);
    store<u64>(p, <u64>t, 8);
  }
  if (g > glideTop) glideTop = g;
}

/** The lower bound of the band of n (n >= 1) as the block's "best path", for the shortcuts of descend. */
@inline function bandBound(n: u64): void {
  const p = lbPtr + (<usize>bitlen(n - fromN, 0) << 4);
  bestPathLo = load<u64>(p);
  bestPathHi = load<u64>(p, 8);
  bestPathBits = bitlen(bestPathLo, bestPathHi);
}

/** A path from `exact` (pathLo, pathHi): a candidate when above the band's bound. */
@inline function notePathCandidate(n: u64): void {
  bandBound(n);
  if (ltU(bestPathLo, bestPathHi, pathLo, pathHi)) push(CHANNEL_PATH_RECORDS, n, pathLo, pathHi, 0);
}

/**
 * A number u < n whose trajectory reaches n within three steps while every value before n stays
 * above u (r > 0; n below 2^60), or 0. Then n's convergence follows from u's, and n is no record:
 * u's glide is longer (it passes through all of n's) and u's path holds n's.
 * The shapes, with the last step into n: odd, u = (2n - r) / q; even from 2n, whose odd predecessor
 * is w = (4n - r) / q, with u = w or u = (2w - r) / q (odd, odd, even); even from 2n and 4n, u = (8n - r) / q.
 */
export function preimageBelow(n: u64): u64 {
  const r = <u64>(HQ * 2 - Q); // r > 0 here
  // (each difference below is taken only when positive: r may be larger than 2n, 4n or 8n)
  const t1 = 2 * n - r;
  if (2 * n > r && t1 % Q == 0) {
    const u = t1 / Q;
    if (u >= 1 && u < n) return u;
  }
  const t2 = 4 * n - r;
  if (4 * n > r && t2 % Q == 0) {
    const w = t2 / Q;
    if (w < n) return w;
    if (2 * w > r) {
      const t3 = 2 * w - r;
      if (t3 % Q == 0) {
        const u = t3 / Q;
        if (u >= 1 && u < n && u < w) return u;
      }
    }
  }
  const t4 = 8 * n - r;
  if (8 * n > r && t4 % Q == 0) {
    const u = t4 / Q;
    if (u >= 1 && u < n) return u;
  }
  return 0;
}

// Above skipFrom the skip depends on n mod q^2 alone (the size conditions above hold from there on):
// skipTable[n mod skipPeriod] is 1 when it applies, one division a leaf instead of three.
let skipFrom: u64 = 0;
let skipPeriod: u64 = 1;
const skipTable: usize = memory.data(256 * 256);

/** Fills the residue table of the preimage skip (q < 256), or makes every n take the direct test. */
function prepareSkip(): void {
  const r = <u64>(HQ * 2 - Q);
  if (Q >= 256) {
    skipFrom = <u64>-1;
    return;
  }
  skipPeriod = Q * Q;
  // every size condition holds once 8n > r (q + 2) + q^2 and (4 - q) n, (8 - q) n exceed r where positive
  skipFrom = 2 * r * (Q + 2) + 2 * Q * Q + 8 * r + 64;
  for (let t: u64 = 0; t < skipPeriod; t++) {
    const n = skipFrom + ((t + skipPeriod - (skipFrom % skipPeriod)) % skipPeriod);
    store<u8>(skipTable + <usize>(n % skipPeriod), preimageBelow(n) != 0 ? 1 : 0);
  }
}

/** Whether a leaf n is skipped (prepareSkip first). */
@inline function skipped(n: u64): bool {
  // (a range from 2^f: u must be in it too, so that n is no record of the range either)
  if (fromN > 1) return preimageBelow(n) >= fromN;
  return n < skipFrom ? preimageBelow(n) != 0 : load<u8>(skipTable + <usize>(n % skipPeriod)) != 0;
}

/**
 * The preimage skip of verifyClasses for one n, as a leaf takes it (the residue table from skipFrom
 * on): the smaller u, 0 when n is not skipped, 2^63 when the table and the direct test disagree.
 * The tests compare it with a search in BigInt.
 */
export function verifyPreimage(q: u32, r: i32, n: u64): u64 {
  assert(r > 0 && n >= 1 && n < (<u64>1) << 60);
  setMap(q, r);
  fromN = 1;
  prepareSkip();
  const u = preimageBelow(n);
  if (skipped(n) != (u != 0)) return (<u64>1) << 63;
  return u;
}

/**
 * The members n = a + 2^D x (x < 2^(N - D), n >= 1) of a class whose coefficient first dropped at
 * depth j: T^j(n) = q^m (n >> j) + b. The small members that do not descend at j are iterated; the
 * rest are counted at depth j, the least of them is the glide candidate (j + m standard steps), and
 * those whose path bound (peak ip, mp) could beat their band's bound are iterated for their path.
 */
function settleClass(a: u64, D: i32, j: i32, m: i32, b: u64, ip: i32, mp: i32): void {
  const X: u64 = (<u64>1) << <u64>(nTop - D);
  const stride: u64 = (<u64>1) << <u64>D;
  const qm = load<u64>(qpowPtr + (<usize>m << 3));
  let x: u64 = a >= fromN ? 0 : (fromN - a + stride - 1) >> <u64>D;
  while (x < X) {
    const n = a + (x << <u64>D);
    mulAdd(n >> <u64>j, 0, qm, b);
    if (rhi == 0 && rlo < n) break;
    settle(n, 0, exact(n, 0), VERIFY_COUNT_EXCEPTIONS);
    x++;
  }
  if (x >= X) return;
  const first = a + (x << <u64>D);
  const p = countsPtr + (<usize>(VERIFY_COUNT_SIEVED + j) << 3);
  store<u64>(p, load<u64>(p) + (X - x));
  noteGlideMin(first, j + m, j);
  // paths, band by band: members in [2^k, 2^(k+1)) with a bound above lb(k), from the top down
  const slack = load<u64>(classSlack + (<usize>j << 3));
  const extra = dropDepth(mp) - ip + 1; // bound < 2^(bits + extra) for n < 2^bits when the slack is below 2^bits
  const top: u64 = a + ((X - 1) << <u64>D);
  // bands i of n - from in [2^(i-1), 2^i) (i = 0: n = from), each with its bound lb(i)
  const last = bitlen(top - fromN, 0);
  for (let i = bitlen(first - fromN, 0); i <= last; i++) {
    const lp = lbPtr + (<usize>i << 4);
    const lbl = load<u64>(lp), lbh = load<u64>(lp, 8);
    const lo: u64 = fromN + (i == 0 ? 0 : (<u64>1) << <u64>(i - 1));
    const hiN: u64 = fromN + (i == 0 ? 0 : ((<u64>1) << <u64>i) - 1);
    const bits = 64 - <i32>clz(hiN);
    if (bits + extra < bitlen(lbl, lbh) && 64 - <i32>clz(slack) <= bits) continue;
    const bandTop = hiN < top ? hiN : top;
    if (bandTop < first || bandTop < lo) continue;
    // the last member at or below bandTop, then down while the bound can beat lb(i)
    let n = bandTop - ((bandTop - a) & (stride - 1));
    while (n >= first && n >= lo) {
      peakBound(n, 0, ip, mp, slack);
      if (!carry && leU(rlo, rhi, lbl, lbh)) break;
      const done = exact(n, 0);
      if (done == DONE_DESCENT) {
        if (ltU(lbl, lbh, pathLo, pathHi)) push(CHANNEL_PATH_RECORDS, n, pathLo, pathHi, 0);
      } else settle(n, 0, done, -1); // past a lowered limit: counted already, the host iterates it for its records
      if (n < stride) break;
      n -= stride;
    }
  }
}

/** A leaf: n = a survived N steps with T^N(n) = b (m odd, peak ip, mp); iterated on to its descent. */
function leaf(n: u64, m: i32, b: u64, ip: i32, mp: i32): void {
  if (n < fromN) return;
  if (usePreimage && skipped(n)) {
    bump(VERIFY_COUNT_PREIMAGE);
    return;
  }
  bandBound(n);
  const nBits = 64 - <i32>clz(n);
  const slack = load<u64>(classSlack + (<usize>nTop << 3));
  let bl = n, bh: u64 = 0;
  // the bound on the first N steps' values is below 2^(nBits + bitlen(q^mp) - ip + 1) while the slack is below 2^nBits
  if (nBits + dropDepth(mp) - ip + 2 >= bestPathBits || 64 - <i32>clz(slack) > nBits) {
    peakBound(n, 0, ip, mp, slack);
    bl = rlo;
    bh = carry ? <u64>-1 : rhi;
  }
  const done = descend(n, 0, nBits, b, 0, nTop, m, bl, bh);
  if (done == DONE_DESCENT) {
    bump(VERIFY_COUNT_CHECKED);
    noteGlideMin(n, glideT + glideOdd, glideT);
    if (exceededPath) {
      const again = exact(n, 0);
      if (again == DONE_DESCENT) notePathCandidate(n);
      else settle(n, 0, again, -1);
    }
  } else if (done == DONE_CYCLE) settle(n, 0, done, -1);
  else settle(n, 0, exact(n, 0), VERIFY_COUNT_CHECKED);
}

/**
 * The classes of the roots c mod 2^D, first <= c <= last, settled down to depth N (members below
 * 2^N, 0 left out), with the preimage skip of leaves when `preimage`. Records go out as candidates
 * (glides: the block's own records; paths: those above lb). Needs verifyPrepare (the step tables,
 * any sieve). The host proves every class image below 2^64 (N within the map's 64-bit depth).
 * Returns the leaves visited.
 */
export function verifyClasses(
  q: u32, r: i32, N: i32, D: i32, first: u64, last: u64, from: u64, preimage: i32, stepDepth: i32, steps: i32, limit: i32,
  tables: usize, lb: usize, cslack: usize, slacks: usize, glideMin: usize, cap: i32, counts: usize, scratch: usize,
): u64 {
  assert(r > 0 && N >= 1 && N <= 62 && D >= 0 && D <= N && first <= last && from >= 1 && from < (<u64>1) << <u64>N && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && cap >= 1);
  begin(q, r, N, stepDepth, steps, limit, tables, counts, scratch);
  slackPtr = slacks;
  lbPtr = lb;
  classSlack = cslack;
  glideMinPtr = glideMin;
  glideCap = cap;
  glideTop = -1;
  nTop = N;
  usePreimage = preimage != 0;
  fromN = from;
  classMode = true;
  if (usePreimage) prepareSkip();
  memory.fill(glideMin, 0, <usize>cap << 4);
  let leaves: u64 = 0;
  for (let c = first; c <= last; c++) {
    // the root: c's first D parities
    let m = 0, b: u64 = 0, ip = 0, mp = 0, j = 0;
    let cut = false;
    while (j < D) {
      const qm = load<u64>(qpowPtr + (<usize>m << 3));
      const v = stepValue<u64>(b, qm, (c >> <u64>j) & 1);
      if ((v & 1) != 0) m++;
      b = stepImage<u64>(v, Q, HQ);
      j++;
      if (j - ip < dropDepth(m - mp)) {
        ip = j;
        mp = m;
      }
      if (j >= dropDepth(m)) {
        cut = true;
        break;
      }
    }
    if (cut) {
      settleClass(c, D, j, m, b, ip, mp);
      if (c == last) break;
      continue;
    }
    if (D == N) {
      leaves++;
      leaf(c, m, b, ip, mp);
      if (c == last) break;
      continue;
    }
    // depth-first below the root: stack level s holds the node at depth D + s
    let s = 0;
    unchecked((stA[0] = c));
    unchecked((stB[0] = b));
    unchecked((stM[0] = m));
    unchecked((stIp[0] = ip));
    unchecked((stMp[0] = mp));
    unchecked((stState[0] = 0));
    while (s >= 0) {
      const st = unchecked(stState[s]);
      if (st == 2) {
        s--;
        continue;
      }
      unchecked((stState[s] = st + 1));
      const d = D + s; // the node's depth
      const na = unchecked(stA[s]), nb = unchecked(stB[s]), nm = unchecked(stM[s]);
      const qm = load<u64>(qpowPtr + (<usize>nm << 3));
      const e0 = evenBit<u64>(nb);
      // st 0: the even child (bit e0), st 1: the odd child
      const ca = st == 0 ? evenResidue<u64>(na, e0, d) : na | ((<u64>(1 - <i32>e0)) << <u64>d);
      const cm = st == 0 ? nm : nm + 1;
      const cb = st == 0 ? evenImage<u64>(nb, qm, e0) : oddImage<u64>(nb, qm, e0, Q, HQ);
      const cj = d + 1;
      let cip = unchecked(stIp[s]), cmp = unchecked(stMp[s]);
      if (cj - cip < dropDepth(cm - cmp)) {
        cip = cj;
        cmp = cm;
      }
      if (cj >= dropDepth(cm)) settleClass(ca, cj, cj, cm, cb, cip, cmp);
      else if (cj == N) {
        leaves++;
        leaf(ca, cm, cb, cip, cmp);
      } else {
        s++;
        unchecked((stA[s] = ca));
        unchecked((stB[s] = cb));
        unchecked((stM[s] = cm));
        unchecked((stIp[s] = cip));
        unchecked((stMp[s] = cmp));
        unchecked((stState[s] = 0));
      }
    }
    if (c == last) break;
  }
  // the block's own glide records: per g from the top, the least n so far
  let least: u64 = <u64>-1;
  for (let g = glideTop; g >= 0; g--) {
    const p = glideMinPtr + (<usize>g << 4);
    const n = load<u64>(p);
    if (n != 0 && n < least) {
      least = n;
      push(CHANNEL_GLIDE_RECORDS, n, load<u64>(p, 8), <u64>g, 0);
    }
  }
  end();
  return leaves;
}
