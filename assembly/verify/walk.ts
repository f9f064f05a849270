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
  tooLarge,
} from "./state";

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

