// The preimage skip of class blocks: a leaf n with a smaller number u whose trajectory reaches n (a
// preimage chain of at most three steps) is skipped, n's convergence following from u's, u < n, in
// the same run.

import { fromN } from "./books";
import { HQ, Q, setMap } from "./state";

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

let skipQ: u64 = 0, skipHQ: u64 = 0; // the map the table holds (the table depends on it alone)
let skipWrap: u64 = 0; // 2^64 mod skipPeriod

/** Fills the residue table of the preimage skip (q < 256), or makes every n take the direct test. */
export function prepareSkip(): void {
  if (skipQ == Q && skipHQ == HQ) return;
  skipQ = Q;
  skipHQ = HQ;
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
  skipWrap = ((<u64>-1 % skipPeriod) + 1) % skipPeriod;
}

/**
 * The skip of slices (verifyAligned and verifyRange with the skip on; README: global records): whether
 * a number u < n, wherever it lies, reaches n (n = (nh, nl) below 2^127; q < 256, r > 0, prepareSkip
 * first). From skipFrom on by the table at n mod q^2, taken from both words exactly:
 * n = nh 2^64 + nl, so n mod q^2 = ((nh mod q^2)(2^64 mod q^2) + nl mod q^2) mod q^2 (each product
 * below 2^32); below it by preimageBelow.
 */
@inline export function reachedFromBelow(nl: u64, nh: u64): bool {
  if (nh == 0 && nl < skipFrom) return preimageBelow(nl) != 0;
  return load<u8>(skipTable + <usize>residueOf(nl, nh)) != 0;
}

/** n mod q^2 (prepareSkip first), exactly from both words (one word: one division). */
@inline function residueOf(nl: u64, nh: u64): u64 {
  return nh == 0 ? nl % skipPeriod : ((nh % skipPeriod) * skipWrap + (nl % skipPeriod)) % skipPeriod;
}

// The skip's residues by period, for the blocks' survivors n = base + a (base = h 2^K): n mod q^2 is
// a mod q^2 (per survivor, once per table) plus base mod q^2 (once per period), less q^2 if past it,
// a table read a survivor instead of a 64-bit division.
let amod: usize = 0; // u8 a mod q^2 per survivor
let amodCap: i32 = 0;
let amodA: usize = 0, amodN: i32 = -1, amodQ: u64 = 0, amodHQ: u64 = 0, amodK: i32 = 0;
/** base mod q^2 of the current period, or -1 (a period below skipFrom: each n by reachedFromBelow). */
let skipBase: i32 = -1;

/** The survivors' a mod q^2 (survivors residues a < 2^K at survA), made again only for another table (prepareSkip first). */
export function prepareSkipResidues(survA: usize, survivors: i32, K: i32): void {
  skipBase = -1;
  if (amodA == survA && amodN == survivors && amodQ == Q && amodHQ == HQ && amodK == K) return;
  if (survivors > amodCap) {
    amod = heap.alloc(<usize>survivors);
    amodCap = survivors;
  }
  for (let i = 0; i < survivors; i++) store<u8>(amod + <usize>i, <u8>(<u64>load<u32>(survA + (<usize>i << 2)) % skipPeriod));
  amodA = survA;
  amodN = survivors;
  amodQ = Q;
  amodHQ = HQ;
  amodK = K;
}

/** A period starts at base = (baseH, baseL): its residue, when every n of it is at or past skipFrom. */
@inline export function skipPeriodStart(baseL: u64, baseH: u64): void {
  skipBase = baseH == 0 && baseL < skipFrom ? -1 : <i32>residueOf(baseL, baseH);
}

/** reachedFromBelow for survivor i of the current period, n = (nh, nl): by its residues from skipFrom on. */
@inline export function survivorReached(i: i32, nl: u64, nh: u64): bool {
  if (skipBase < 0) return reachedFromBelow(nl, nh);
  let t = <i32>load<u8>(amod + <usize>i) + skipBase;
  if (t >= <i32>skipPeriod) t -= <i32>skipPeriod;
  return load<u8>(skipTable + <usize>t) != 0;
}

/** The skip of slices for one n, as a block takes it (1: skipped), for the tests' BigInt search. */
export function verifySliceSkip(q: u32, r: i32, nl: u64, nh: u64): u32 {
  assert(r > 0 && q < 256 && (nl | nh) != 0 && nh >> 63 == 0);
  setMap(q, r);
  prepareSkip();
  return reachedFromBelow(nl, nh) ? 1 : 0;
}

/** Whether a leaf n is skipped (prepareSkip first). */
@inline export function skipped(n: u64): bool {
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
