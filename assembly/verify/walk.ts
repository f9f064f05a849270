// The walk of one n: `exact` (single steps from step 0, the exact glide and path, the cut depth),
// `fast` (a survivor of an aligned block started at step K in one multiply-add) and `descend` (on
// to the first value below n, by table steps where they cannot pass it).
//
// A survivor starts at step K in one multiply-add, T^K(n) = q^m h + b, then takes table steps of KS
// steps, T^KS(x 2^KS + c) = q^mc x + bc, while v >= n 2^KS (no step more than halves, so a table
// step cannot pass the first value below n), and single steps near the end.
// Path maxima are exact whenever they could matter: a table step adds a bound on the values inside
// it (from the peak coefficient of its class, q^mp / 2^ip); when the bound could beat the block's
// largest path so far, n is iterated again in single steps.

import { dropDepth } from "../extend";
import { bitlen, carry, ltU, mulAdd, rhi, rlo } from "../u128";
import {
  DONE_CYCLE,
  DONE_DESCENT,
  DONE_HANDOFF,
  DONE_UNRESOLVED,
  bestPathBits,
  bestPathHi,
  bestPathLo,
  cutDepth,
  exceededPath,
  glideOdd,
  glideT,
  pathHi,
  pathLo,
} from "./books";
import {
  HQ,
  K,
  KS,
  limitBits,
  NEG,
  Q,
  affine,
  maxSteps,
  peakBound,
  qpowPtr,
  slackD,
  slackK,
  stepB,
  stepM,
  stepPeak,
  stepTrough,
  survB,
  survM,
  survPeak,
  tight,
  tightHalf,
  setMap,
  tooLarge,
} from "./state";
import { VERIFY_LIMIT_BITS } from "../layout";
import { DEEPER_ON, deeperBh, deeperBl, deeperDescent, deeperOdd, deeperOn, deeperSteps, deeperVh, deeperVl } from "./deeper";

/**
 * n iterated one step at a time from step 0: the exact glide, odd steps and path, and the depth at
 * which its class's coefficient first drops (cutDepth, 0 when not within K).
 */
export function exact(nl: u64, nh: u64): i32 {
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
 * Survivor i of the sieve at period h: n = a + 2^K h. The exact glide; the path only as a bound
 * (exceededPath says whether it could beat the block's best, in which case the caller iterates
 * n exactly).
 */
export function fast(nl: u64, nh: u64, i: i32, hl: u64, hh: u64): i32 {
  const m = <i32>load<u8>(survM + <usize>i);
  const nBits = bitlen(nl, nh);
  survivorBound(nl, nh, i, nBits);
  const bl = rlo, bh = rhi;
  affine(hl, hh, load<u64>(qpowPtr + (<usize>m << 3)), load<u64>(survB + (<usize>i << 3)));
  if (carry || tooLarge(rlo, rhi)) return DONE_HANDOFF;
  const vl = rlo, vh = rhi;
  if (deeperOn) {
    const done = deeperDescent(nl, nh, vl, vh, m, bl, bh);
    if (done >= 0) return done;
    if (done == DEEPER_ON) return descend(nl, nh, nBits, deeperVl, deeperVh, deeperSteps, deeperOdd, deeperBl, deeperBh);
  }
  return descend(nl, nh, nBits, vl, vh, K, m, bl, bh);
}

/**
 * Survivor i's bound on its values inside the first K steps, into (rhi, rlo): at most
 * q^mp (n + r) / 2^ip (peak ip, mp), or n itself while that bound cannot reach the block's best path
 * (it is below 2^(nBits + bitlen(q^mp) - ip + 1) when the slack is below 2^nBits); all ones when unbounded.
 */
@inline export function survivorBound(nl: u64, nh: u64, i: i32, nBits: i32): void {
  const pk = survPeak + (<usize>i << 1);
  const ip = <i32>load<u8>(pk), mp = <i32>load<u8>(pk, 1);
  if (nBits + dropDepth(mp) - ip + 2 >= bestPathBits || 64 - <i32>clz(slackK) > nBits) {
    peakBound(nl, nh, ip, mp, slackK);
    if (carry) rhi = <u64>-1;
  } else {
    rlo = nl;
    rhi = nh;
  }
}

/**
 * The depth d of the table step from v (bits = bitlen(v)) that cannot pass below n: v >= n 2^d for
 * d = bits - bitlen(n) - 1; a full one (KS) also when the trough of v's class keeps q^mt v above
 * n 2^it (r > 0). Below 2 the caller takes single steps.
 */
@inline function tableDepth(nl: u64, nh: u64, nBits: i32, vl: u64, vh: u64, bits: i32): i32 {
  let d = bits - nBits - 1;
  if (d >= KS) d = KS;
  else if (!NEG && nBits + KS < 127) {
    const tp = stepTrough + (<usize>(vl & (((<u64>1) << <u64>KS) - 1)) << 1);
    const it = <u64>load<u8>(tp), mt = <i32>load<u8>(tp, 1);
    mulAdd(vl, vh, load<u64>(qpowPtr + (<usize>mt << 3)), 0);
    const sl = nl << it, sh = it == 0 ? nh : (nh << it) | (nl >> (64 - it));
    if (carry || ltU(sl, sh, rlo, rhi)) d = KS;
  }
  return d;
}

/**
 * n's trajectory on from v = T^steps(n) (odd of the steps odd) to its first value below n: table
 * steps where they cannot pass it, single steps near it. (bl, bh) is a bound on the values so far;
 * exceededPath says at the end whether the path could beat (bestPathLo, bestPathHi).
 */
export function descend(nl: u64, nh: u64, nBits: i32, vl: u64, vh: u64, steps: i32, odd: i32, bl: u64, bh: u64): i32 {
  if (runs && vh == 0 && nh == 0) {
    const done = runPairs(nl, vl, steps, odd, bl, bh);
    if (done >= 0) return done;
    vl = runV;
    steps = runSteps;
    odd = runOdd;
  }
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
    const bits = bitlen(vl, vh);
    const d = tableDepth(nl, nh, nBits, vl, vh, bits);
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


// Run pairs (q = 3, r > 0, n and v in one word): with y = v + r, an odd step takes y to 3y/2, so the
// odd run from v is alpha = ctz(v + r) steps at once, v + r = 2^alpha c -> 3^alpha c - r (alpha at
// most RUN_MAX, 3^40 < 2^64: a partial run is exact too), then the even run by ctz. One compare per
// run, c > runLimit(alpha) = floor(U / 3^alpha) with U = min(best path + r - 1, 2^64 - 1), catches
// both a value that leaves the word and one that could reach the block's best path; such an n goes
// on in descend's general steps from the value before that run, exactly. (v itself is tested too:
// an even v is a run of alpha = 0, whose value 3^0 c - r is v.)

/** The longest odd run taken at once: 3^40 < 2^64 < 3^41. */
export const RUN_MAX: i32 = 40;
/** floor(U / 3^alpha), made when first needed for the current U (runStamps) or all at once (fillRunLimits). */
export const runLimits = new StaticArray<u64>(RUN_MAX + 1);
const runStamps = new StaticArray<u32>(RUN_MAX + 1);
/** 3^alpha (the kernel's q^m table stops at the sieve depth). */
export const runPow = new StaticArray<u64>(RUN_MAX + 1);
let runEpoch: u32 = 1;
let runU: u64 = 0; // U for the current best path
let runBestLo: u64 = 0, runBestHi: u64 = 0; // the best path U was made from
let runStale = true; // U not made yet for this block
export let runR: u64 = 0; // r
export let runs = false; // run pairs apply: q = 3, r > 0, no lowered value limit below 64 bits
let runV: u64 = 0, runSteps: i32 = 0, runOdd: i32 = 0; // where runPairs stopped (returned -1)

/** Run pairs on or off for the block: q = 3, r > 0, values up to 2^64 allowed. */
export function setRuns(): void {
  runs = Q == 3 && !NEG && limitBits >= 64;
  runR = HQ * 2 - 3;
  let p: u64 = 1;
  for (let a = 0; a <= RUN_MAX; a++) {
    unchecked((runPow[a] = p));
    p *= 3;
  }
  runStale = true; // U is made at the first call
}

/** U = min(best path + r - 1, 2^64 - 1) made again when the best path has changed (a new epoch: every limit stale). */
@inline function refreshRunU(): void {
  if (!runStale && bestPathLo == runBestLo && bestPathHi == runBestHi) return;
  runStale = false;
  runBestLo = bestPathLo;
  runBestHi = bestPathHi;
  const u = bestPathLo + runR - 1;
  runU = bestPathHi != 0 || u < bestPathLo ? <u64>-1 : u;
  runEpoch++;
}

/** Every limit of the current best path at once, for the lanes (lanes.ts), which read runLimits directly. */
export function fillRunLimits(): void {
  refreshRunU();
  for (let a = 0; a <= RUN_MAX; a++) runLimit(a);
}

/** The last step count from which a whole run pair (RUN_MAX odd steps and 63 halvings) stays within the cap. */
@inline export function runStepCap(): i32 {
  return maxSteps - RUN_MAX - 64;
}

/**
 * The first halving of x that goes below n (x >= n, x >> z < n for its trailing zeros z): x >> t with
 * t = bitlen(x) - bitlen(n), or one more; -1 when x >> t is n itself (t < z: the halving is exact, so
 * the trajectory is back at n, a cycle).
 */
@inline export function firstHalvingBelow(n: u64, x: u64): i32 {
  const t = <i32>clz(n) - <i32>clz(x);
  const at = x >> <u64>t;
  if (at == n) return -1;
  return at > n ? t + 1 : t;
}

@inline function runLimit(alpha: i32): u64 {
  if (unchecked(runStamps[alpha]) == runEpoch) return unchecked(runLimits[alpha]);
  const t = runU / unchecked(runPow[alpha]);
  unchecked((runLimits[alpha] = t));
  unchecked((runStamps[alpha] = runEpoch));
  return t;
}

/**
 * n's trajectory from v = T^steps(n) by run pairs while they stay in one word below the block's best
 * path and the step cap is at least a run pair away. Returns DONE_DESCENT (glideT, glideOdd,
 * exceededPath from the bound (bl, bh) on the values before v) or -1 with (runV, runSteps, runOdd)
 * where descend goes on.
 */
function runPairs(n: u64, v: u64, steps: i32, odd: i32, bl: u64, bh: u64): i32 {
  refreshRunU();
  const r = runR;
  const cap = runStepCap();
  while (v >= n && v != n && steps < cap && v < <u64>-1 - r) {
    const y = v + r;
    let alpha = <i32>ctz(y);
    if (alpha > RUN_MAX) alpha = RUN_MAX;
    const c = y >> <u64>alpha;
    if (c > runLimit(alpha)) break;
    const x = c * unchecked(runPow[alpha]) - r;
    steps += alpha;
    odd += alpha;
    const z = <i32>ctz(x);
    const w = x >> <u64>z;
    if (w < n) {
      const t = firstHalvingBelow(n, x);
      if (t < 0) {
        // n again at halving bitlen(x) - bitlen(n): a cycle
        glideT = steps + <i32>clz(n) - <i32>clz(x);
        glideOdd = odd;
        return DONE_CYCLE;
      }
      glideT = steps + t;
      glideOdd = odd;
      exceededPath = ltU(bestPathLo, bestPathHi, bl, bh);
      return DONE_DESCENT;
    }
    steps += z;
    v = w;
  }
  runV = v;
  runSteps = steps;
  runOdd = odd;
  return -1;
}

/**
 * runPairs on given operands, for the tests (test/runs.test.ts, against BigInt): the map 3x + r,
 * n from v = T^steps(n), the best path (bestLo, bestHi) and the step cap. Stores at out: the
 * outcome (DONE_DESCENT, DONE_CYCLE or -1), then glideT and glideOdd, or where it stopped (v, steps, odd),
 * then 1 when run pairs apply, plus 2 when a descent's path could beat the best (exceededPath).
 */
export function probeRuns(r: i32, n: u64, v: u64, steps: i32, bestLo: u64, bestHi: u64, cap: i32, out: usize): void {
  setMap(3, r);
  maxSteps = cap;
  limitBits = VERIFY_LIMIT_BITS;
  bestPathLo = bestLo;
  bestPathHi = bestHi;
  setRuns();
  const done = runPairs(n, v, steps, 0, n, 0);
  store<i64>(out, done);
  store<u64>(out, done < 0 ? runV : 0, 8);
  store<i64>(out, done < 0 ? runSteps : glideT, 16);
  store<i64>(out, done < 0 ? runOdd : glideOdd, 24);
  store<i64>(out, (runs ? 1 : 0) | (done == DONE_DESCENT && exceededPath ? 2 : 0), 32);
}
