// The verification kernel's books: the counts by outcome, the output channels (7..11, chunks flushed
// to the host), the block's records so far, the results of the last iteration, and a block's start
// and end. n is a 128-bit pair (nl, nh) below 2^127: every list entry carries n's high word in its
// last word.
//
// Class blocks (classes.ts) keep records as candidates: per glide (standard steps) the least n of the
// block with it, swept at the end; a path only when it beats the host's lower bound lb(i) on the
// largest path of any number of [from, from + 2^(i-1)) (n - from in [2^(i-1), 2^i)), computed exactly.

import { flush } from "../buffers";
import {
  CHANNEL_CHUNK,
  CHANNEL_CYCLE_MEMBERS,
  CHANNEL_GLIDE_RECORDS,
  CHANNEL_HANDOFFS,
  CHANNEL_PATH_RECORDS,
  CHANNEL_UNRESOLVED,
  VERIFY_CHANNELS,
  VERIFY_COUNTS,
  VERIFY_COUNT_CYCLES,
  VERIFY_COUNT_HANDOFFS,
  VERIFY_COUNT_UNRESOLVED,
  VERIFY_REGION_BYTES,
} from "../layout";
import { useTables } from "../extend";
import { bitlen, ltU } from "../u128";
import { HQ, K, KS, NEG, Q, limitBits, maxSteps, qpowPtr, setMap, tight, tightHalf } from "./state";

export const DONE_DESCENT: i32 = 0;
export const DONE_CYCLE: i32 = 1;
export const DONE_UNRESOLVED: i32 = 2;
export const DONE_HANDOFF: i32 = 3;

export let countsPtr: usize = 0;
let regions: usize = 0; // one region per channel 7..11
const chanN = new StaticArray<i32>(VERIFY_CHANNELS);
// the largest values so far in the block (glide in standard steps; path as u128)
export let bestGlide: i32 = -1;
export let bestPathLo: u64 = 0;
export let bestPathHi: u64 = 0;
export let bestPathBits: i32 = 0;
// results of the last iteration
export let glideT: i32 = 0;
export let glideOdd: i32 = 0;
export let pathLo: u64 = 0;
export let pathHi: u64 = 0;
export let cutDepth: i32 = 0; // the depth where n's class coefficient first drops (0: not within K)
export let exceededPath: bool = false; // the path bound could exceed the block's best (fast mode)

// class blocks' candidates
export let lbPtr: usize = 0; // u64 pairs (lo, hi) per band i = 0..N of n - from (pathBounds)
export let glideMinPtr: usize = 0; // per standard glide g < glideCap: u64 least n, u64 its glide in steps of T
export let glideCap: i32 = 0;
export let glideTop: i32 = -1; // the largest g written
export let fromN: u64 = 1; // the range's first number (a power of two): members below it are left out
export let classMode: bool = false;

@inline export function bump(i: i32): void {
  const p = countsPtr + (<usize>i << 3);
  store<u64>(p, load<u64>(p) + 1);
}

export function push(ch: i32, x0: u64, x1: u64, x2: u64, x3: u64): void {
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

/** The least n of the block with standard glide g (and its glide in steps of T t). */
export function noteGlideMin(n: u64, g: i32, t: i32): void {
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

/** A class block's own glide records: per g from the top, the least n so far. */
export function pushGlideMins(): void {
  let least: u64 = <u64>-1;
  for (let g = glideTop; g >= 0; g--) {
    const p = glideMinPtr + (<usize>g << 4);
    const n = load<u64>(p);
    if (n != 0 && n < least) {
      least = n;
      push(CHANNEL_GLIDE_RECORDS, n, load<u64>(p, 8), <u64>g, 0);
    }
  }
}

/** The lower bound of the band of n (n >= 1) as the block's "best path", for the shortcuts of descend. */
@inline export function bandBound(n: u64): void {
  const p = lbPtr + (<usize>bitlen(n - fromN, 0) << 4);
  bestPathLo = load<u64>(p);
  bestPathHi = load<u64>(p, 8);
  bestPathBits = bitlen(bestPathLo, bestPathHi);
}

/** A path from `exact` (pathLo, pathHi): a candidate when above the band's bound. */
@inline export function notePathCandidate(n: u64): void {
  bandBound(n);
  if (ltU(bestPathLo, bestPathHi, pathLo, pathHi)) push(CHANNEL_PATH_RECORDS, n, pathLo, pathHi, 0);
}

/**
 * Records of the block: a glide (standard steps) or a path above every smaller n's so far; in class
 * mode, candidates (the least n of each glide, a path above its band's bound).
 */
@inline export function noteRecords(nl: u64, nh: u64, glideStd: i32): void {
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
export function settle(nl: u64, nh: u64, done: i32, counted: i32): void {
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

/** A block's start: the map, its parameters and tables, zero counts, empty channels, no records yet. */
export function begin(q: u32, r: i32, depth: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, counts: usize, scratch: usize): void {
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
  for (let s = 0; s < VERIFY_CHANNELS; s++) unchecked((chanN[s] = 0));
  bestGlide = -1;
  bestPathLo = 0;
  bestPathHi = 0;
  bestPathBits = 0;
  classMode = false;
}

/** A block's end: the channels' last chunks to the host. */
export function end(): void {
  for (let s = 0; s < VERIFY_CHANNELS; s++) {
    const n = unchecked(chanN[s]);
    if (n > 0) flush(s + CHANNEL_GLIDE_RECORDS, n);
    unchecked((chanN[s] = 0));
  }
}
