// Blocks by periods. Aligned blocks (whole periods n = a + 2^K h, h0 <= h < h0 + periods) visit only
// the survivors of the depth-K sieve (walk.ts fast). Sieved n (their class is cut at depth j) descend
// at step j exactly (coefficient stopping time); the host counts them. They are iterated here only
// when they could be a record of the block (a glide or path larger than every smaller n of the
// block) and when they are the sieve's exceptions.
// Ranged blocks (any [lo, hi)) iterate every n exactly and find its class's cut depth on the way.

import {
  VERIFY_COUNT_CHECKED,
  VERIFY_COUNT_EXCEPTIONS,
  VERIFY_COUNT_PREIMAGE,
  VERIFY_COUNT_SIEVED,
  VERIFY_LIMIT_BITS,
  VERIFY_MAX_DEPTH,
  VERIFY_MAX_STEP_DEPTH,
} from "../layout";
import { dropDepth } from "../extend";
import { bitlen, carry, leU, ltU, rhi, rlo } from "../u128";
import {
  DONE_CYCLE,
  DONE_DESCENT,
  begin,
  bestGlide,
  bestPathBits,
  bestPathHi,
  bestPathLo,
  bump,
  cutDepth,
  end,
  exceededPath,
  glideOdd,
  glideT,
  noteRecords,
  settle,
} from "./books";
import { HQ, K, Q, affine, peakBound, qpowPtr, slackK, slackPtr, survA, survB, survM } from "./state";
import { LANE_BATCH, lDone, lM, lN, lOdd, lT, lV, runLanes } from "./lanes";
import { exact, fast, runR, runs, setRuns, survivorBound } from "./walk";
import { prepareSkip, prepareSkipResidues, skipPeriodStart, survivorReached } from "./preimage";
import { deeperBegin } from "./deeper";

/**
 * The gap [prev, next) of sieved n between two survivors: records are possible only while the
 * block's best glide is below the deepest cut's, or its best path below a bound on theirs: a class
 * cut by depth K has m_i <= sievedPeak odd steps among its first i < j steps, so
 * T^i(n) <= (q/2)^sievedPeak n + slack. The listed exceptions in it are iterated too (e: the next
 * one, returned past those done).
 */
@inline function sievedGap(
  prevL: u64, prevH: u64, nextL: u64, nextH: u64, e: i32, exc: usize, excN: i32,
  sievedGlide: i32, sievedPeak: i32, sievedPeakBits: i32, sievedSlack: u64,
): i32 {
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
  return e;
}

/** Survivor i at period h, n = (nl, nh): its glide by fast(), and exactly where it could be a record. */
@inline function survivor(nl: u64, nh: u64, i: i32, hl: u64, hh: u64): void {
  let done = fast(nl, nh, i, hl, hh);
  if (done == DONE_DESCENT) {
    bump(VERIFY_COUNT_CHECKED);
    if (exceededPath || glideT + glideOdd > bestGlide) {
      // its path could be a record: the exact path, in single steps
      const again = exact(nl, nh);
      if (again == DONE_DESCENT) noteRecords(nl, nh, glideT + glideOdd);
      // a value past the limit on the way (inside the first K steps, which fast() only bounds): n is
      // counted as checked already; the host iterates it for its records
      else settle(nl, nh, again, -1);
    }
  } else if (done == DONE_CYCLE) {
    // back at n after K steps or more (a member below 2^K, in a range's first period): its period is
    // the first return, from step 0
    settle(nl, nh, exact(nl, nh), -1);
  } else {
    // past the cap, or too large for the kernel: single steps settle which (and find the cycle)
    done = exact(nl, nh);
    settle(nl, nh, done, VERIFY_COUNT_CHECKED);
  }
}

// The block's walk in n order, queued: each entry is a gap of sieved n [p, n) and then the survivor
// n (i < 0: a gap only). A full queue runs its survivors through the lanes (lanes.ts) where they
// apply, then books every entry in order: the gap (counted here in range blocks, iterated where it
// could hold records), then the survivor from its lane's glide or by fast(). Only n below 2^64 is
// queued (the gap's start p and the period h too, then), so each entry keeps low words alone.
const Q_PL = new StaticArray<u64>(LANE_BATCH);
const Q_NL = new StaticArray<u64>(LANE_BATCH);
const Q_I = new StaticArray<i32>(LANE_BATCH);
const Q_HL = new StaticArray<u64>(LANE_BATCH);
const Q_LANE = new StaticArray<i32>(LANE_BATCH); // the entry's lane slot, or -1
let queued = 0;
// the block's sieve facts, for the gaps
let gExc: usize = 0, gExcN: i32 = 0, gE: i32 = 0, gEc: i32 = 0, gCount = false;
let gGlide: i32 = 0, gPeak: i32 = 0, gPeakBits: i32 = 0, gSlack: u64 = 0;

function startQueue(exc: usize, excN: i32, count: bool, sievedGlide: i32, sievedPeak: i32, sievedSlack: u64): void {
  queued = 0;
  gExc = exc;
  gExcN = excN;
  gE = 0;
  gEc = 0;
  gCount = count;
  gGlide = sievedGlide;
  gPeak = sievedPeak;
  gPeakBits = dropDepth(sievedPeak) - sievedPeak; // bitlen(q^mp) - ip, the bound's extra bits
  gSlack = sievedSlack;
}

// The skip of slices (the blocks' skipReached; README: global records): a survivor that a smaller
// number reaches is counted, not walked, and its gap stays. Such n is never a new record among all n,
// so the records of the numbers not skipped hold every new one.
let skipSlice = false;

@inline function enqueue(pl: u64, ph: u64, nl: u64, nh: u64, i: i32, hl: u64, hh: u64): void {
  if (skipSlice && i >= 0 && survivorReached(i, nl, nh)) {
    bump(VERIFY_COUNT_PREIMAGE);
    if (!ltU(pl, ph, nl, nh)) return;
    i = -1;
  }
  if (!runs || nh != 0) {
    // no lane for this map or this n: booked at once, after those queued before it
    if (queued > 0) flushQueue();
    book(pl, ph, nl, nh, i, hl, hh, -1);
    return;
  }
  const j = queued;
  unchecked((Q_PL[j] = pl));
  unchecked((Q_NL[j] = nl));
  unchecked((Q_I[j] = i));
  unchecked((Q_HL[j] = hl));
  queued = j + 1;
  if (queued == LANE_BATCH) flushQueue();
}

function flushQueue(): void {
  // the lanes: survivors with n and T^K(n) = q^m h + b in one word (below 2^63, above n)
  let lanes = 0;
  for (let j = 0; j < queued; j++) {
    unchecked((Q_LANE[j] = -1));
    const i = unchecked(Q_I[j]);
    if (i < 0) continue;
    const m = <i32>load<u8>(survM + <usize>i);
    affine(unchecked(Q_HL[j]), 0, load<u64>(qpowPtr + (<usize>m << 3)), load<u64>(survB + (<usize>i << 3)));
    const n = unchecked(Q_NL[j]);
    if (carry || rhi != 0 || rlo >> 63 != 0 || rlo <= n) continue;
    unchecked((lN[lanes] = n));
    unchecked((lV[lanes] = rlo));
    unchecked((lM[lanes] = m));
    unchecked((Q_LANE[j] = lanes));
    lanes++;
  }
  if (lanes > 0) runLanes(lanes, K);
  for (let j = 0; j < queued; j++) {
    book(unchecked(Q_PL[j]), 0, unchecked(Q_NL[j]), 0, unchecked(Q_I[j]), unchecked(Q_HL[j]), 0, unchecked(Q_LANE[j]));
  }
  queued = 0;
}

/** One entry in n order: its gap, then survivor i (none when i < 0), from its lane l when l >= 0. */
@inline function book(pl: u64, ph: u64, nl: u64, nh: u64, i: i32, hl: u64, hh: u64, l: i32): void {
  if (ltU(pl, ph, nl, nh)) {
    if (gCount) gEc = countSieved(pl, ph, nl, nh, gEc, gExc, gExcN);
    gE = sievedGap(pl, ph, nl, nh, gE, gExc, gExcN, gGlide, gPeak, gPeakBits, gSlack);
  }
  if (i < 0) return;
  if (l >= 0 && unchecked(lDone[l]) == DONE_DESCENT) laneSurvivor(nl, i, unchecked(lT[l]), unchecked(lOdd[l]));
  else survivor(nl, nh, i, hl, hh);
}

/**
 * Survivor i, n below 2^63, whose lane found its glide (t steps, odd of them odd) with every value
 * after step K below the best path at the batch's start (at most the best now): as survivor(), its
 * path bounded by the first K steps' bound only.
 */
function laneSurvivor(n: u64, i: i32, t: i32, odd: i32): void {
  bump(VERIFY_COUNT_CHECKED);
  survivorBound(n, 0, i, 64 - <i32>clz(n));
  if (ltU(bestPathLo, bestPathHi, rlo, rhi) || t + odd > bestGlide) {
    const again = exact(n, 0);
    if (again == DONE_DESCENT) noteRecords(n, 0, glideT + glideOdd);
    else settle(n, 0, again, -1);
  }
}

/** A block of the depth-K sieve's periods starts: its parameters checked, the run's tables, run pairs, slacks, the skip of slices. */
function startSieveBlock(
  q: u32, r: i32, depth: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, survivors: i32, counts: usize,
  scratch: usize, survivorSlack: u64, slacks: usize, skipReached: i32,
): void {
  assert(r != 0 && survivors > 0 && depth >= 1 && depth <= VERIFY_MAX_DEPTH && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && limit >= 1 && limit <= VERIFY_LIMIT_BITS);
  begin(q, r, depth, stepDepth, steps, limit, tables, counts, scratch);
  setRuns();
  deeperBegin(runs, depth, runR, steps);
  slackK = survivorSlack;
  slackPtr = slacks;
  skipSlice = skipReached != 0;
  if (skipSlice) {
    prepareSkip(); // (r > 0 and q < 256: the host's plan refuses the skip otherwise)
    prepareSkipResidues(survA, survivors, depth);
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
  survivorSlack: u64, slacks: usize, counts: usize, scratch: usize, skipReached: i32,
): u64 {
  startSieveBlock(q, r, depth, stepDepth, steps, limit, tables, survivors, counts, scratch, survivorSlack, slacks, skipReached);
  startQueue(exc, excN, false, sievedGlide, sievedPeak, sievedSlack);
  const Kd = <u64>depth;
  let visited: u64 = 0;
  let hl = h0l, hh = h0h;
  for (let p: u64 = 0; p < periods; p++) {
    // base = h 2^K (below 2^127: no bit is lost)
    const baseL = hl << Kd, baseH = (hh << Kd) | (hl >> (64 - Kd));
    if (skipSlice) skipPeriodStart(baseL, baseH);
    let prevL = baseL, prevH = baseH; // first n of the current gap
    for (let i = 0; i <= survivors; i++) {
      const off: u64 = i < survivors ? <u64>load<u32>(survA + (<usize>i << 2)) : (<u64>1) << Kd;
      const nextL = baseL + off, nextH = baseH + select<u64>(1, 0, baseL + off < baseL);
      if (i == survivors) {
        if (ltU(prevL, prevH, nextL, nextH)) enqueue(prevL, prevH, nextL, nextH, -1, hl, hh);
        break;
      }
      visited++;
      enqueue(prevL, prevH, nextL, nextH, i, hl, hh);
      prevL = nextL + 1;
      prevH = nextH + select<u64>(1, 0, prevL == 0);
    }
    hl++;
    if (hl == 0) hh++;
  }
  flushQueue();
  end();
  return visited;
}


/**
 * The depth where the class of n's low bits is cut (its coefficient first drops below 1), for a
 * sieved n: single steps on the low word (T^i(n) mod 2^(64 - i) is exact in wrapping arithmetic,
 * and K <= 30 steps need only the low K bits).
 */
@inline function cutOf(n: u64): i32 {
  let v = n, odd = 0;
  for (let s = 1; s <= K; s++) {
    if ((v & 1) == 0) v >>= 1;
    else {
      v = Q * (v >> 1) + HQ;
      odd++;
    }
    if (s >= dropDepth(odd)) return s;
  }
  return 0;
}

/**
 * Counts the sieved n of [nl, nh .. endL, endH) by their class's cut depth, the listed exceptions
 * (exc[e..excN), ascending) left out. Returns the next exception.
 */
function countSieved(nl: u64, nh: u64, endL: u64, endH: u64, e: i32, exc: usize, excN: i32): i32 {
  while (ltU(nl, nh, endL, endH)) {
    while (e < excN && ltU(load<u64>(exc + (<usize>e << 3)), 0, nl, nh)) e++;
    if (e < excN && nh == 0 && load<u64>(exc + (<usize>e << 3)) == nl) e++;
    else if (nl != 0 || nh != 0) bump(VERIFY_COUNT_SIEVED + cutOf(nl));
    nl++;
    if (nl == 0) nh++;
  }
  return e;
}

/**
 * A block first..last (inclusive; each a (lo, hi) pair below 2^127) anywhere in the periods of the
 * depth-K sieve, such as a range's partial periods: as an aligned block restricted to the block,
 * survivors by fast(), sieved n iterated only where they could be records or are listed exceptions
 * (exc[0..excN), ascending), and the sieved n counted by their cut depth here
 * (counts[VERIFY_COUNT_SIEVED + j]). Returns the survivors visited.
 */
export function verifyRange(
  q: u32, r: i32, depth: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, survivors: i32,
  firstL: u64, firstH: u64, lastL: u64, lastH: u64, exc: usize, excN: i32, sievedGlide: i32, sievedPeak: i32,
  sievedSlack: u64, survivorSlack: u64, slacks: usize, counts: usize, scratch: usize, skipReached: i32,
): u64 {
  assert((firstL | firstH) != 0 && leU(firstL, firstH, lastL, lastH) && (lastH >> 63) == 0);
  startSieveBlock(q, r, depth, stepDepth, steps, limit, tables, survivors, counts, scratch, survivorSlack, slacks, skipReached);
  startQueue(exc, excN, true, sievedGlide, sievedPeak, sievedSlack);
  const Kd = <u64>depth;
  const mask: u64 = ((<u64>1) << Kd) - 1;
  // the end, last + 1 (below 2^127)
  const endL = lastL + 1, endH = lastH + select<u64>(1, 0, endL == 0);
  let hl = (firstL >> Kd) | (firstH << (64 - Kd)), hh = firstH >> Kd;
  // the first survivor at or above first's residue
  const r0 = <u32>(firstL & mask);
  let lo = 0, hi = survivors;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (load<u32>(survA + (<usize>mid << 2)) < r0) lo = mid + 1;
    else hi = mid;
  }
  let i = lo;
  let visited: u64 = 0;
  let prevL = firstL, prevH = firstH;
  while (true) {
    const baseL = hl << Kd, baseH = (hh << Kd) | (hl >> (64 - Kd));
    if (skipSlice) skipPeriodStart(baseL, baseH);
    for (; i <= survivors; i++) {
      const off: u64 = i < survivors ? <u64>load<u32>(survA + (<usize>i << 2)) : (<u64>1) << Kd;
      let nextL = baseL + off, nextH = baseH + select<u64>(1, 0, baseL + off < baseL);
      const past = !ltU(nextL, nextH, endL, endH);
      if (past) {
        nextL = endL;
        nextH = endH;
      }
      if (past || i == survivors) {
        if (ltU(prevL, prevH, nextL, nextH)) enqueue(prevL, prevH, nextL, nextH, -1, hl, hh);
        if (!past) break;
        flushQueue();
        end();
        return visited;
      }
      visited++;
      enqueue(prevL, prevH, nextL, nextH, i, hl, hh);
      prevL = nextL + 1;
      prevH = nextH + select<u64>(1, 0, prevL == 0);
    }
    i = 0;
    hl++;
    if (hl == 0) hh++;
  }
}
