// Census of all 2^K parity vectors (full tree): what depends on the residue, not on the parity
// vector alone (the host counts those by lattice paths, core/exact.ts):
//   live / stopped [j][m]  as in enumerate.ts (first drop of q^m / 2^j below 1), tallied in the live
//                          part of the tree only: the host's cross-check against the exact counter;
//   bins [k]               per least member a in [1, 2^K): floor(4 log2(T^K(a) / a)), at k + 512;
//                          decided in integers unless close to a bin edge; those go to the host
//                          (CHANNEL_AMBIGUOUS) for an exact BigInt decision;
//   differ                 least members whose first descent differs from the coefficient stopping
//                          time: early descent (before the drop) or no descent at the drop (CHANNEL_DIFFER);
//   exception classes      (a, b, j, m) of dropping classes with b >= a, whose small members do not
//                          descend at the drop (CHANNEL_EXCEPTIONS, as enumerate.ts; the host expands);
//   ratio candidates       (member, T^j(member), j) that may be the largest T^j(a)/a (CHANNEL_RATIO):
//                          by monotonicity in x, the extremes of each class within [1, 2^K) suffice;
//                          a conservative f64 filter keeps the channel short, the host decides exactly.
// A dropped subtree in which none of these can happen (every least member below it is at least the
// early-descent and exception bounds and above the slow-bin bounds of every m it can reach, and it
// cannot reach an m whose ratio bound beats the best ratio) is not walked: `barren`. The host's seed
// (a real member's ratio) starts the best ratio high, so that most dropped subtrees are barren.
// Width: every value is i64; the host proves T^j(a) and the class images fit below 2^63 in magnitude.

import { flush } from "./buffers";
import {
  CENSUS_BATCH, CENSUS_BATCH_AT, CENSUS_COUNT_DIFFER, CENSUS_COUNT_EARLY, CENSUS_COUNT_NONPOSITIVE, CENSUS_COUNT_SLOW, CENSUS_BIN_OFFSET, CENSUS_BINS_AT, CENSUS_COUNTS_AT, CENSUS_EXCEPTIONS_AT, CENSUS_RATIO_AT, CENSUS_REACH_AT, CENSUS_REGION_BYTES, CENSUS_SEED_AT,
  CENSUS_TALLY_BYTES, CHANNEL_AMBIGUOUS, CHANNEL_CHUNK, CHANNEL_DIFFER, CHANNEL_EXCEPTIONS, CHANNEL_RATIO, CHANNEL_VECTORS, MAX_DEPTH, TABLE_BINMIN, TABLE_ENTRIES, TALLY_TABLE_BYTES,
} from "./layout";
import { childImage, childResidue, dropDepth, qpow, stepImage, stepValue, tally, useTables } from "./extend";

let K: i32 = 0;
let Q: u64 = 0;
let H: i64 = 0;
let livePtr: usize = 0;
let stoppedPtr: usize = 0;
let binsPtr: usize = 0;
let countsPtr: usize = 0; // u64: [0] nonpositive images, [1] differ, [2] early descents, [4 + m] slow-path leaves
let chanPtr: usize = 0; // channel c's region at chanPtr + (c - 3) * CENSUS_REGION_BYTES
// entries waiting in the regions of channels 3, 4, 5, 6 and CHANNEL_EXCEPTIONS
let n3: i32 = 0;
let n4: i32 = 0;
let n5: i32 = 0;
let n6: i32 = 0;
let nx: i32 = 0;
let emitVectors: bool = false;
let V: u64 = 0; // the parity vector of the current path, bit j = parity of step j + 1
let best: f64 = 0;
let nodes: u64 = 0;
let binMin: usize = 0; // per m: u64, least members above it are in the coefficient's bin (host-proven)
let ratioMinM: i32 = 0; // the least m whose bound is still >= best
let ratioBoundPtr: usize = 0; // f64[m]: an upper bound on T^j(u)/u over members u >= 1, any j >= m
let reachPtr: usize = 0; // u64 per (m, top): the largest binMin over m..top (host table)
let batchPtr: usize = 0; // CENSUS_BATCH pairs (a, b) of positive least members and images
let batchN: i32 = 0;

@inline function bump(index: i32): void {
  const p = countsPtr + (<usize>index << 3);
  store<u64>(p, load<u64>(p) + 1);
}

function push(ch: i32, x0: u64, x1: u64, x2: u64, x3: u64): void {
  const region = ch == CHANNEL_EXCEPTIONS ? <usize>CENSUS_EXCEPTIONS_AT : <usize>(ch - CHANNEL_AMBIGUOUS) * <usize>CENSUS_REGION_BYTES;
  const n = ch == CHANNEL_AMBIGUOUS ? n3 : ch == CHANNEL_DIFFER ? n4 : ch == CHANNEL_RATIO ? n5 : ch == CHANNEL_VECTORS ? n6 : nx;
  const p = chanPtr + region + (<usize>n << 5);
  store<u64>(p, x0);
  store<u64>(p, x1, 8);
  store<u64>(p, x2, 16);
  store<u64>(p, x3, 24);
  let next = n + 1;
  if (next == CHANNEL_CHUNK) {
    flush(ch, next);
    next = 0;
  }
  if (ch == CHANNEL_AMBIGUOUS) n3 = next;
  else if (ch == CHANNEL_DIFFER) n4 = next;
  else if (ch == CHANNEL_RATIO) n5 = next;
  else if (ch == CHANNEL_VECTORS) n6 = next;
  else nx = next;
}

/** Hands every region's waiting entries to the host. */
function flushAll(): void {
  if (n3 > 0) flush(CHANNEL_AMBIGUOUS, n3);
  if (n4 > 0) flush(CHANNEL_DIFFER, n4);
  if (n5 > 0) flush(CHANNEL_RATIO, n5);
  if (n6 > 0) flush(CHANNEL_VECTORS, n6);
  if (nx > 0) flush(CHANNEL_EXCEPTIONS, nx);
  n3 = n4 = n5 = n6 = nx = 0;
}

/** A member u in [1, 2^K) with T^j(u) = v: report it if it may beat the largest ratio so far. */
@inline function ratioCandidate(u: u64, v: i64, j: i32): void {
  // values < 2^63 (host-proven), so the signed conversions are exact up to rounding
  if (v > 0 && <f64>v >= best * <f64><i64>u) {
    push(CHANNEL_RATIO, u, <u64>v, <u64>j, 0);
    const r = (<f64>v / <f64><i64>u) * (1.0 - 1e-12);
    if (r > best) raiseBest(r);
  }
}

function raiseBest(r: f64): void {
  best = r;
  // the bounds grow with m: classes with fewer odd steps than ratioMinM cannot win any more
  while (ratioMinM <= K && load<f64>(ratioBoundPtr + (<usize>ratioMinM << 3)) < best) ratioMinM++;
}

/**
 * Below the dropped node (a mod 2^j, m), with its early-descent bound and exception bound fixed,
 * nothing is left to find: every least member u >= a of the subtree has u >= early and u > excMax,
 * u > binMin[m'] for every m' in m..m + K - j, and no m' there can beat the best ratio.
 */
@inline function barren(a: u64, m: i32, j: i32, early: u64, excMax: i64): bool {
  const top = m + K - j;
  return top < ratioMinM && a >= early && <i64>a > excMax && a > load<u64>(reachPtr + (<usize>(m * TABLE_ENTRIES + top) << 3)) && !emitVectors;
}

/** The extremes of the class a mod 2^j within [1, 2^K): a itself, and a + 2^j (2^(K-j) - 1). */
@inline function extremes(a: u64, b: i64, m: i32, j: i32): void {
  // every member u >= 1 of a class with m odd steps has T^j(u)/u <= (q/2)^m + max(r, 0) E(m) (host table)
  if (m < ratioMinM) return;
  if (a > 0) ratioCandidate(a, b, j);
  if (j < K) {
    const span = ((<u64>1) << <u64>(K - j)) - 1;
    ratioCandidate(a + (span << <u64>j), <i64>qpow(m) * <i64>span + b, j);
  }
}

/** Early descent at j (before the drop): the new bound below which members descend, or `early`. */
@inline function earlyBound(a: u64, b: i64, m: i32, j: i32, early: u64): u64 {
  // members a + 2^j y with (q^m - 2^j) y < a - b, i.e. y < ceil((a - b) / (q^m - 2^j))
  if (b >= <i64>a) return early;
  const gap = qpow(m) - ((<u64>1) << j);
  const y = (<u64>(<i64>a - b) + gap - 1) / gap;
  const bound = y >= ((<u64>1) << <u64>(K - j)) ? (<u64>1) << <u64>K : a + (y << j);
  return bound > early ? bound : early;
}

/** The largest member a + 2^j y below 2^K that does not descend at the drop: D y <= b - a. */
function exceptionBound(a: u64, b: i64, m: i32, j: i32): i64 {
  const D = ((<u64>1) << j) - qpow(m);
  const y = <u64>(b - <i64>a) / D;
  return y >= ((<u64>1) << <u64>(K - j)) ? (<i64>1) << K : <i64>(a + (y << j));
}


// The quarter edges 2^(i/4), i = -3..3, as round(2^(i/4) 2^31).
const C1: i64 = 1276901417; // 2^-0.75
const C2: i64 = 1518500250; // 2^-0.5
const C3: i64 = 1805811301; // 2^-0.25
const C4: i64 = 2147483648; // 1
const C5: i64 = 2553802834; // 2^0.25
const C6: i64 = 3037000500; // 2^0.5
const C7: i64 = 3611622603; // 2^0.75
/** |X - Y| below this may be an edge: the integer truncations err by less than 2^33. */
const MARGIN: i64 = 1 << 35;

@inline function closeTo(x: i64, y: i64): bool {
  return abs<i64>(x - y) < MARGIN;
}

/**
 * Bins floor(4 log2(b / a)) for a batch, in integers: with la, lb the bit lengths minus one,
 * b / a = 2^(lb - la) B / A where A, B are a, b with the top bit at 63 and B / A in (1/2, 2).
 * X = (B >> 33) 2^31 is compared with Y_i = (A >> 33) C_i; both err by less than 2^33, so a
 * comparison farther apart than 2^35 is exact; closer ones go to the host (CHANNEL_AMBIGUOUS), in BigInt.
 */
function binBatch(): void {
  for (let i = 0; i < batchN; i++) {
    const p = batchPtr + (<usize>i << 4);
    const a = load<u64>(p);
    const b = load<u64>(p, 8);
    const za = clz(a), zb = clz(b);
    const x = <i64>((b << zb) >> 33) << 31;
    const y = <i64>((a << za) >> 33);
    const y1 = y * C1, y2 = y * C2, y3 = y * C3, y4 = y * C4, y5 = y * C5, y6 = y * C6, y7 = y * C7;
    if (closeTo(x, y1) || closeTo(x, y2) || closeTo(x, y3) || closeTo(x, y4) || closeTo(x, y5) || closeTo(x, y6) || closeTo(x, y7)) {
      push(CHANNEL_AMBIGUOUS, a, b, 0, 0);
    } else {
      const t = <i32>(x >= y1) + <i32>(x >= y2) + <i32>(x >= y3) + <i32>(x >= y4) + <i32>(x >= y5) + <i32>(x >= y6) + <i32>(x >= y7) - 4;
      const e = <i32>za - <i32>zb; // (63 - zb) - (63 - za)
      const q = binsPtr + (<usize>(4 * e + t + CENSUS_BIN_OFFSET) << 3);
      store<u64>(q, load<u64>(q) + 1);
    }
  }
  batchN = 0;
}

@inline function leaf(a: u64, b: i64, m: i32, early: u64, excMax: i64): void {
  if (emitVectors) push(CHANNEL_VECTORS, a, V, 0, 0);
  if (a == 0) return; // the least member 0 is not positive
  // bins of log2(T^K(a) / a). b/a = q^m/2^K + c/(2^K a) with |c| bounded per m, and q^m/2^K lies
  // in bin k_m; the host proved (in BigInt) that every a above binMin[m] stays in bin k_m. Those
  // need no work here: the host puts (leaves with m odd steps) - (the others counted below) in k_m.
  // Smaller a (where c matters) are counted per m and binned exactly in batches.
  if (a <= load<u64>(binMin + (<usize>m << 3))) leafSlow(a, b, m);
  // first descent versus coefficient stopping time
  const isEarly = a < early;
  if (isEarly || <i64>a <= excMax) {
    bump(CENSUS_COUNT_DIFFER);
    if (isEarly) bump(CENSUS_COUNT_EARLY);
    push(CHANNEL_DIFFER, a, isEarly ? 1 : 2, 0, 0);
  }
}

function leafSlow(a: u64, b: i64, m: i32): void {
  bump(CENSUS_COUNT_SLOW + m);
  if (b <= 0) bump(CENSUS_COUNT_NONPOSITIVE);
  else {
    const p = batchPtr + (<usize>batchN << 4);
    store<u64>(p, a);
    store<i64>(p, b, 8);
    if (++batchN == CENSUS_BATCH) binBatch();
  }
}

// Compile-time switch for the walkers' bodies: with Leaves the children are leaves (depth K) and
// are finished inline; with Inner the children recurse. Inlining the last two levels this way
// halves the calls, which dominate the cost of the tree walk.
type Leaves = u8;
type Inner = u16;

/**
 * The node (a, b, m) at depth j < K, not yet dropped: its own ratio candidates and early-descent
 * bound, then its children (tallied here, where the drop is known). The path's parity vector is
 * kept in V.
 */
@inline function live<C>(a: u64, b: i64, m: i32, j: i32, early0: u64): void {
  extremes(a, b, m, j);
  const early = earlyBound(a, b, m, j, early0);
  const qm = <i64>qpow(m);
  const aEven = childResidue<i64>(a, b, j, false), aOdd = childResidue<i64>(a, b, j, true);
  const bEven = childImage<i64>(b, qm, false, <i64>Q, H), bOdd = childImage<i64>(b, qm, true, <i64>Q, H);
  const jj = j + 1;
  nodes += 2;
  tally(livePtr, jj, m + 1); // an odd step never drops a live class
  const bit = (<u64>1) << j;
  V |= bit;
  if (sizeof<C>() == 1) atLeaf(aOdd, bOdd, m + 1, earlyBound(aOdd, bOdd, m + 1, jj, early), -1);
  else if (jj == K - 1) live<Leaves>(aOdd, bOdd, m + 1, jj, early);
  else dfsLive(aOdd, bOdd, m + 1, jj, early);
  V &= ~bit;
  if (jj >= dropDepth(m)) {
    tally(stoppedPtr, jj, m);
    let excMax: i64 = -1;
    if (bEven >= <i64>aEven) {
      excMax = exceptionBound(aEven, bEven, m, jj);
      push(CHANNEL_EXCEPTIONS, aEven, <u64>bEven, <u64>jj, <u64>m);
    }
    if (sizeof<C>() == 1) atLeaf(aEven, bEven, m, early, excMax);
    else intoDropped(aEven, bEven, m, jj, early, excMax);
  } else {
    tally(livePtr, jj, m);
    if (sizeof<C>() == 1) atLeaf(aEven, bEven, m, earlyBound(aEven, bEven, m, jj, early), -1);
    else if (jj == K - 1) live<Leaves>(aEven, bEven, m, jj, early);
    else dfsLive(aEven, bEven, m, jj, early);
  }
}

/** A node at or below its drop, depth j < K, not barren: ratio candidates; excMax from the drop. */
@inline function dropped<C>(a: u64, b: i64, m: i32, j: i32, early: u64, excMax: i64): void {
  extremes(a, b, m, j);
  const qm = <i64>qpow(m);
  const aEven = childResidue<i64>(a, b, j, false), aOdd = childResidue<i64>(a, b, j, true);
  const bEven = childImage<i64>(b, qm, false, <i64>Q, H), bOdd = childImage<i64>(b, qm, true, <i64>Q, H);
  const jj = j + 1;
  nodes += 2;
  const bit = (<u64>1) << j;
  V |= bit;
  if (sizeof<C>() == 1) atLeaf(aOdd, bOdd, m + 1, early, excMax);
  else intoDropped(aOdd, bOdd, m + 1, jj, early, excMax);
  V &= ~bit;
  if (sizeof<C>() == 1) atLeaf(aEven, bEven, m, early, excMax);
  else intoDropped(aEven, bEven, m, jj, early, excMax);
}

/** An inner node at or below its drop, depth j < K: walked unless barren. */
function intoDropped(a: u64, b: i64, m: i32, j: i32, early: u64, excMax: i64): void {
  if (barren(a, m, j, early, excMax)) return;
  if (j == K - 1) dropped<Leaves>(a, b, m, j, early, excMax);
  else dfsDropped(a, b, m, j, early, excMax);
}

function dfsLive(a: u64, b: i64, m: i32, j: i32, early: u64): void {
  live<Inner>(a, b, m, j, early);
}

function dfsDropped(a: u64, b: i64, m: i32, j: i32, early: u64, excMax: i64): void {
  dropped<Inner>(a, b, m, j, early, excMax);
}

/** A leaf (depth K): its ratio candidate and the leaf tallies. */
@inline function atLeaf(a: u64, b: i64, m: i32, early: u64, excMax: i64): void {
  if (a > 0 && m >= ratioMinM) ratioCandidate(a, b, K);
  leaf(a, b, m, early, excMax);
}

/**
 * The census of every vector extending `prefix` mod 2^prefixBits, to `depth` (full tree).
 * tables: the per-m tables (layout.ts: TABLE_*, with TABLE_BINMIN). tallies: CENSUS_TALLY_BYTES,
 * zeroed here. scratch: CENSUS_SCRATCH_BYTES, the channel regions, a batch and the host's ratio
 * bounds (CENSUS_RATIO_AT), ratio seed (CENSUS_SEED_AT) and reach table (CENSUS_REACH_AT). With `vectors`, every leaf's (a, parity vector) goes to CHANNEL_VECTORS.
 */
export function census(
  q: u32, r: i32, depth: i32, prefixBits: i32, prefix: u64,
  tables: usize, tallies: usize, scratch: usize, vectors: i32,
): u64 {
  assert(depth >= 1 && depth <= MAX_DEPTH && prefixBits >= 0 && prefixBits <= depth);
  assert((prefix >> <u64>prefixBits) == 0);
  K = depth;
  Q = <u64>q;
  H = (<i64>q + <i64>r) >> 1;
  useTables(tables);
  binMin = tables + TABLE_BINMIN;
  livePtr = tallies;
  stoppedPtr = tallies + TALLY_TABLE_BYTES;
  binsPtr = tallies + CENSUS_BINS_AT;
  countsPtr = tallies + CENSUS_COUNTS_AT;
  memory.fill(tallies, 0, CENSUS_TALLY_BYTES);
  chanPtr = scratch;
  batchPtr = scratch + CENSUS_BATCH_AT;
  ratioBoundPtr = scratch + CENSUS_RATIO_AT;
  reachPtr = scratch + CENSUS_REACH_AT;
  n3 = n4 = n5 = n6 = nx = 0;
  emitVectors = vectors != 0;
  ratioMinM = 0;
  raiseBest(load<f64>(scratch + CENSUS_SEED_AT));
  nodes = 0;
  batchN = 0;
  walk(prefixBits, prefix);
  binBatch();
  flushAll();
  return nodes;
}

function walk(prefixBits: i32, prefix: u64): void {
  // The state at the prefix node, tracked exactly as the full walk would. Each ancestor is tallied
  // by the one shard that is its extension by zero bits (prefix >> j == 0), so the 2^prefixBits
  // shards of a split sum to the whole census. The prefix node itself is handled by the dfs.
  let a: u64 = 0, b: i64 = 0, m: i32 = 0, early: u64 = 0;
  V = 0;
  let alive = true, excMax: i64 = -1;
  if (prefix == 0) {
    tally(livePtr, 0, 0);
    nodes = 1;
  }
  for (let j = 0; j < prefixBits; j++) {
    // ancestors at depth j < prefixBits: the owner runs their node-level work
    if ((prefix >> <u64>j) == 0) extremes(a, b, m, j); // a node owned by this shard
    if (alive) early = earlyBound(a, b, m, j, early);
    const e = (prefix >> <u64>j) & 1;
    const x = stepValue<i64>(b, <i64>qpow(m), e);
    const odd = (x & 1) != 0;
    b = stepImage<i64>(x, <i64>Q, H);
    if (odd) {
      m++;
      V |= (<u64>1) << j;
    }
    a |= e << <u64>j;
    const jj = j + 1;
    const owned = (prefix >> <u64>jj) == 0;
    if (owned) nodes++;
    if (alive && !odd && jj >= dropDepth(m)) {
      alive = false;
      if (owned) tally(stoppedPtr, jj, m);
      if (b >= <i64>a) {
        excMax = exceptionBound(a, b, m, jj);
        if (owned) push(CHANNEL_EXCEPTIONS, a, <u64>b, <u64>jj, <u64>m);
      }
    } else if (alive && owned) {
      tally(livePtr, jj, m);
    }
  }
  if (prefixBits == K) atLeaf(a, b, m, alive ? earlyBound(a, b, m, K, early) : early, excMax);
  else if (!alive) intoDropped(a, b, m, prefixBits, early, excMax);
  else if (prefixBits == K - 1) live<Leaves>(a, b, m, prefixBits, early);
  else dfsLive(a, b, m, prefixBits, early);
}
