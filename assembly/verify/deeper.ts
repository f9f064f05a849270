// The sieve E steps deeper, by a table on T^K(n) mod 2^E (q = 3, r > 0, where run pairs apply).
// A survivor of the depth-K sieve has T^K(n) = v = 3^m h + b, and the next E parities of its
// trajectory depend on v mod 2^E alone (Terras 1976, from memory), so its class mod 2^(K+E) is cut
// at depth K + s (3^(m + m'_s) < 2^(K + s), the first such s <= E) exactly when the table entry of
// (m, v mod 2^E) says so; then T^(K+s)(n) = (3^(m'_s) v + d_s) / 2^s with d_s from the table.
// - Cut: the value there is tested exactly; below n, the glide is K + s (with r > 0 every earlier
//   value is at least 3^(m_j) n / 2^j > n) and n needs no walk; otherwise (small n) it walks as before.
// - Not cut within E steps: n goes on from step K + E, T^(K+E)(n) in one multiply-add.
// About half of the depth-26 survivors of 3x+1 are cut within E = 10 more steps (survivor densities
// 0.01546 at 2^26 and 0.00768 at 2^36: `glidepath counts --depth 36`).
// walk.ts fast() uses it: survivors outside the one-word lanes (n past 2^64, or T^K(n) past 2^63),
// where each step saved is a 128-bit one. In the lanes it did not pay (measured: the lanes' run
// pairs over the few steps it saves cost about what the lookup costs).

import { carry, ltU, mulAdd, rhi, rlo } from "../u128";
import { DONE_DESCENT, bestPathHi, bestPathLo, exceededPath, glideOdd, glideT } from "./books";
import { VERIFY_MAX_DEPTH } from "../layout";

/** How many steps deeper the table looks: 2^E entries per m. */
export const DEEPER_BITS: i32 = 10;
const DEEPER_SIZE: usize = (<usize>1) << DEEPER_BITS;
const DEEPER_MASK: u64 = ((<u64>1) << <u64>DEEPER_BITS) - 1;
/** The largest m a table holds (a survivor's m is at most K). */
const DEEPER_M: i32 = VERIFY_MAX_DEPTH;

// Per (m, t mod 2^E): 0, or the cut s (bits 0..7; ON when not cut within E steps, s = E then),
// m'_s (bits 8..15) and d_s (bits 16..).
const ON: u64 = 0x80;
let table: usize = 0;
let tableK: i32 = -1; // the K and r the table was made for (those of the block while deeperOn)
let tableR: u64 = 0;
/** The table applies to the block (set by deeperBegin). */
export let deeperOn = false;
const pow3 = new StaticArray<u64>(DEEPER_BITS + 1);

/**
 * The block's table (made again only for another K or r): on when run pairs apply (runsOn) and the
 * deepest cut stays within the step cap.
 */
export function deeperBegin(runsOn: bool, K: i32, r: u64, maxSteps: i32): void {
  deeperOn = runsOn && K >= 1 && K <= DEEPER_M && K + DEEPER_BITS <= 40 && K + DEEPER_BITS <= maxSteps;
  if (!deeperOn) return;
  if (table == 0) table = heap.alloc(<usize>(DEEPER_M + 1) * DEEPER_SIZE * 8);
  if (tableK == K && tableR == r) return;
  tableK = K;
  tableR = r;
  let p: u64 = 1;
  for (let a = 0; a <= DEEPER_BITS; a++) {
    unchecked((pow3[a] = p));
    p *= 3;
  }
  // 3^m <= 3^(K + E) < 2^64 (K + E <= 40): each cut test is exact in one word
  let pm: u64 = 1;
  for (let m = 0; m <= DEEPER_M; m++) {
    for (let t: u64 = 0; t < <u64>DEEPER_SIZE; t++) {
      let entry: u64 = 0;
      if (m <= K) {
        // the first E steps of t itself have v's parities (t < 2^E); T^s(v) = (3^m' v + d) / 2^s
        let x = t, mm: i32 = 0, d: u64 = 0;
        let c = pm; // 3^(m + m')
        let s = 1;
        for (; s <= DEEPER_BITS; s++) {
          if ((x & 1) != 0) {
            d = 3 * d + (r << <u64>(s - 1));
            x = (3 * x + r) >> 1;
            mm++;
            c *= 3;
          } else x >>= 1;
          if (c < (<u64>1) << <u64>(K + s)) break;
        }
        // cut at s, or not within E steps (s = E + 1: the entry goes on to step K + E); d must fit
        // its 48 bits (with a large r the entry stays 0, and such n walk as before)
        if (d < (<u64>1) << 48) entry = (s <= DEEPER_BITS ? <u64>s : ON) | (<u64>mm << 8) | (d << 16);
      }
      store<u64>(table + (((<usize>m << DEEPER_BITS) + <usize>t) << 3), entry);
    }
    if (m < K) pm *= 3;
  }
}

/** Where deeperDescent leaves a survivor not cut within E steps: T^(K+E)(n), its odd steps, a bound on the values before. */
export let deeperVl: u64 = 0, deeperVh: u64 = 0;
export let deeperOdd: i32 = 0;
/** The step count there, K + E. */
export let deeperSteps: i32 = 0;
export let deeperBl: u64 = 0, deeperBh: u64 = 0;
/** deeperDescent: not settled, on from step K + E at (deeperVh, deeperVl) with deeperOdd odd steps. */
export const DEEPER_ON: i32 = -2;

/**
 * n's descent from v = T^K(n) (m odd steps) when its class is cut within E more steps and the value
 * there is below n: DONE_DESCENT with glideT, glideOdd and exceededPath (the bound (bl, bh) on the
 * values up to step K, and v 2^(s - 1) on those after: each of them x > n >= r, where
 * (3x + r) / 2 <= 2x). DEEPER_ON: not cut within E steps, T^(K+E)(n) in deeperVl/Vh (and the
 * bound on the values before it, v 2^(E - 1) or (bl, bh), in deeperBl/Bh). -1: walk on from v as before.
 */
@inline export function deeperDescent(nl: u64, nh: u64, vl: u64, vh: u64, m: i32, bl: u64, bh: u64): i32 {
  if (nh == 0 && nl < tableR) return -1;
  const e = load<u64>(table + (((<usize>m << DEEPER_BITS) + <usize>(vl & DEEPER_MASK)) << 3));
  if (e == 0) return -1;
  const on = (e & ON) != 0;
  const s = on ? DEEPER_BITS : <i32>(e & 0xff), mm = <i32>((e >> 8) & 0xff);
  mulAdd(vl, vh, unchecked(pow3[mm]), e >> 16);
  if (carry) return -1;
  const su = <u64>s;
  const wl = (rlo >> su) | (rhi << (64 - su)), wh = rhi >> su;
  if (!on && !ltU(wl, wh, nl, nh)) return -1;
  // the values after step K: below v 2^(s - 1) (unbounded when that leaves 128 bits)
  const sh = <u64>(s - 1);
  let pl = vl << sh, ph = sh == 0 ? vh : (vh << sh) | (vl >> (64 - sh));
  if (sh != 0 && vh >> (64 - sh) != 0) ph = <u64>-1;
  if (ltU(pl, ph, bl, bh)) {
    pl = bl;
    ph = bh;
  }
  if (on) {
    deeperVl = wl;
    deeperVh = wh;
    deeperOdd = m + mm;
    deeperSteps = tableK + s;
    deeperBl = pl;
    deeperBh = ph;
    return DEEPER_ON;
  }
  glideT = tableK + s;
  glideOdd = m + mm;
  exceededPath = ltU(bestPathLo, bestPathHi, pl, ph);
  return DONE_DESCENT;
}

/**
 * deeperDescent on given operands, for the tests (test/deeper.test.ts, against BigInt): the map
 * 3x + r (the table needs r alone), sieve depth K, n and v = T^K(n) with m odd steps, the best path, a bound (bl, bh) on the
 * values before step K. Stores at out: the outcome (DONE_DESCENT, DEEPER_ON or -1), then the step
 * count and odd steps (of the glide, or where it goes on), the value there (lo, hi; DEEPER_ON), and
 * 1 when the table applies plus 2 when a descent's path could beat the best (exceededPath).
 */
export function probeDeeper(r: i32, K: i32, nl: u64, nh: u64, vl: u64, vh: u64, m: i32, bestLo: u64, bestHi: u64, out: usize): void {
  deeperBegin(true, K, <u64>r, 100000);
  bestPathLo = bestLo;
  bestPathHi = bestHi;
  const done = deeperDescent(nl, nh, vl, vh, m, nl, nh);
  store<i64>(out, done);
  store<i64>(out, done == DONE_DESCENT ? glideT : done == DEEPER_ON ? deeperSteps : 0, 8);
  store<i64>(out, done == DONE_DESCENT ? glideOdd : done == DEEPER_ON ? deeperOdd : 0, 16);
  store<u64>(out, done == DEEPER_ON ? deeperVl : 0, 24);
  store<u64>(out, done == DEEPER_ON ? deeperVh : 0, 32);
  store<i64>(out, (deeperOn ? 1 : 0) | (done == DONE_DESCENT && exceededPath ? 2 : 0), 40);
}
