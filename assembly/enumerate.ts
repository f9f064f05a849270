// Depth-first enumeration of the Terras tree of T(n) = n/2 | (q n + r)/2.
//
// The node at depth j is a class a mod 2^j together with (m, b) such that
// T^j(a + 2^j x) = q^m x + b for every integer x (m = odd steps among the first j).
// Its children extend a by one bit e chosen so that the next parity is 0 or 1:
//   v = b + e q^m is T^j(a + e 2^j); parity 0 gives (m, v/2), parity 1 gives (m+1, (q v + r)/2).
//
// Overflow: the host proves |b| and the intermediate v fit the chosen width before calling
// (src/core/map.ts, kernelDepthLimit); for r > 0 the width is u64, for r < 0 it is i64.
// The drop test q^m < 2^j is exact: the host passes bitlen(q^m) per m, and q^m < 2^j iff j >= bitlen(q^m).

import { flush } from "./buffers";
import { CHANNEL_CHUNK, CHANNEL_EXCEPTIONS, CHANNEL_LEAVES, LEAF_B_AT, LEAF_CHUNK, LEAF_M_AT, MAX_DEPTH, TALLY_STRIDE, TALLY_TABLE_BYTES } from "./layout";
import { childImage, childResidue, dropDepth, qpow, stepImage, stepValue, tally, useTables } from "./extend";

export const MODE_SURVIVORS: i32 = 0;
export const MODE_FULL: i32 = 1;

let K: i32 = 0;
let full: bool = false;
let emit: bool = false;
let Q: u64 = 0;
let H: i64 = 0; // (q + r) / 2, exact since q and r are odd
let livePtr: usize = 0; // u64[j][m]: classes alive (not yet dropped) at depth j
let stoppedPtr: usize = 0; // u64[j][m]: classes whose coefficient first drops at depth j
let leafA: usize = 0;
let leafB: usize = 0;
let leafM: usize = 0;
let leafN: i32 = 0;
let excPtr: usize = 0;
let excN: i32 = 0;
let nodes: u64 = 0;

function pushLeaf(a: u64, b: u64, m: i32): void {
  const i = <usize>leafN;
  store<u64>(leafA + (i << 3), a);
  store<u64>(leafB + (i << 3), b);
  store<u8>(leafM + i, <u8>m);
  if (++leafN == LEAF_CHUNK) {
    flush(CHANNEL_LEAVES, leafN);
    leafN = 0;
  }
}

/** A dropping class with b >= a: some members fail to descend at the drop depth (host expands). */
function pushException(a: u64, b: u64, j: i32, m: i32): void {
  const p = excPtr + (<usize>excN << 5);
  store<u64>(p, a);
  store<u64>(p, b, 8);
  store<u64>(p, <u64>j, 16);
  store<u64>(p, <u64>m, 24);
  if (++excN == CHANNEL_CHUNK) {
    flush(CHANNEL_EXCEPTIONS, excN);
    excN = 0;
  }
}

// Compile-time switch for the walkers' bodies: with Leaves the children are leaves (depth K); with
// Inner they are inner nodes, walked inline when they sit just above the leaves and by a call
// otherwise. Inlining the last two levels halves the calls, which dominate the walk.
type Leaves = u8;
type Inner = u16;

/** Below a live class: tallies, the drop test, exceptions; survivors mode cuts dropped classes. */
@inline function live<T, C>(a: u64, b: T, m: i32, j: i32): void {
  // children: the Terras construction (extend.ts)
  const qm = <T>qpow(m);
  const aEven = childResidue<T>(a, b, j, false), aOdd = childResidue<T>(a, b, j, true);
  const bEven = childImage<T>(b, qm, false, <T>Q, <T>H), bOdd = childImage<T>(b, qm, true, <T>Q, <T>H);
  const jj = j + 1;
  if (jj >= dropDepth(m)) {
    tally(stoppedPtr, jj, m);
    if (bEven >= <T>aEven) pushException(aEven, <u64>bEven, jj, m);
    if (full) {
      nodes++;
      if (sizeof<C>() == 1) {
        if (emit) pushLeaf(aEven, <u64>bEven, m);
      } else if (jj == K - 1) dropped<T, Leaves>(aEven, bEven, m, jj);
      else dfsDropped<T>(aEven, bEven, m, jj);
    }
  } else {
    nodes++;
    tally(livePtr, jj, m);
    if (sizeof<C>() == 1) {
      if (emit) pushLeaf(aEven, <u64>bEven, m);
    } else if (jj == K - 1) live<T, Leaves>(aEven, bEven, m, jj);
    else dfsLive<T>(aEven, bEven, m, jj);
  }
  // An odd step never drops a live class: q^m >= 2^j implies q^(m+1) > 2^(j+1).
  nodes++;
  tally(livePtr, jj, m + 1);
  if (sizeof<C>() == 1) {
    if (emit) pushLeaf(aOdd, <u64>bOdd, m + 1);
  } else if (jj == K - 1) live<T, Leaves>(aOdd, bOdd, m + 1, jj);
  else dfsLive<T>(aOdd, bOdd, m + 1, jj);
}

/** Full mode below a dropped class: every vector is still visited, nothing more is tallied. */
@inline function dropped<T, C>(a: u64, b: T, m: i32, j: i32): void {
  const qm = <T>qpow(m);
  const aEven = childResidue<T>(a, b, j, false), aOdd = childResidue<T>(a, b, j, true);
  const bEven = childImage<T>(b, qm, false, <T>Q, <T>H), bOdd = childImage<T>(b, qm, true, <T>Q, <T>H);
  const jj = j + 1;
  nodes += 2;
  if (sizeof<C>() == 1) {
    if (emit) pushLeaf(aEven, <u64>bEven, m);
  } else if (jj == K - 1) dropped<T, Leaves>(aEven, bEven, m, jj);
  else dfsDropped<T>(aEven, bEven, m, jj);
  if (sizeof<C>() == 1) {
    if (emit) pushLeaf(aOdd, <u64>bOdd, m + 1);
  } else if (jj == K - 1) dropped<T, Leaves>(aOdd, bOdd, m + 1, jj);
  else dfsDropped<T>(aOdd, bOdd, m + 1, jj);
}

function dfsLive<T>(a: u64, b: T, m: i32, j: i32): void {
  live<T, Inner>(a, b, m, j);
}

function dfsDropped<T>(a: u64, b: T, m: i32, j: i32): void {
  dropped<T, Inner>(a, b, m, j);
}

function run<T>(prefixBits: i32, prefix: u64, walkTallies: bool): void {
  // Walk down to the prefix class; each ancestor is tallied by the one shard that is its
  // extension by zero bits (prefix >> j == 0), so the shards of a split sum to the whole run.
  // With walkTallies off the walk tallies nothing (the caller counted levels 0..prefixBits).
  let a: u64 = 0;
  let b: T = <T>0;
  let m: i32 = 0;
  let alive = true;
  if (walkTallies && prefix == 0) {
    tally(livePtr, 0, 0);
    nodes = 1;
  }
  for (let j = 0; j < prefixBits; j++) {
    const e = (prefix >> <u64>j) & 1;
    const v = stepValue<T>(b, <T>qpow(m), e);
    const even = (v & <T>1) == <T>0;
    b = stepImage<T>(v, <T>Q, <T>H);
    if (!even) m++;
    a |= e << <u64>j;
    const jj = j + 1;
    const owned = walkTallies && (prefix >> <u64>jj) == 0;
    if (owned) nodes++;
    if (alive && even && jj >= dropDepth(m)) {
      if (owned) {
        if (!full) nodes--;
        tally(stoppedPtr, jj, m);
        if (b >= <T>a) pushException(a, <u64>b, jj, m);
      }
      alive = false;
      if (!full) return;
    } else if (alive && owned) {
      tally(livePtr, jj, m);
    }
  }
  if (prefixBits == K) {
    if (emit) pushLeaf(a, <u64>b, m);
  } else if (prefixBits == K - 1) {
    if (alive) live<T, Leaves>(a, b, m, prefixBits);
    else dropped<T, Leaves>(a, b, m, prefixBits);
  } else if (alive) dfsLive<T>(a, b, m, prefixBits);
  else dfsDropped<T>(a, b, m, prefixBits);
}

/**
 * Enumerates every class extending `prefix` mod 2^prefixBits down to `depth`.
 * tables: the per-m tables (layout.ts, TABLE_*); tallies: ENUM_TALLY_BYTES, live[64][64] then
 * stopped[64][64], zeroed here for rows 0..depth; leaves: LEAF_BYTES, a[LEAF_CHUNK] (u64),
 * b[LEAF_CHUNK] (u64), m[LEAF_CHUNK] (u8); exceptions: CHANNEL_CHUNK entries (a, b, j, m).
 * walkTallies = 0: tally only the levels below the prefix (a plan that counted the top itself).
 * Returns the number of tree nodes visited by this shard: the root and every live class in
 * survivors mode (cut classes are not visited), every node in full mode (2^(depth+1) - 1 in all).
 */
export function enumerate(
  q: u32,
  r: i32,
  depth: i32,
  mode: i32,
  prefixBits: i32,
  prefix: u64,
  tables: usize,
  tallies: usize,
  leaves: usize,
  emitLeaves: i32,
  exceptions: usize,
  walkTallies: i32,
): u64 {
  assert(depth >= 0 && depth <= MAX_DEPTH && prefixBits >= 0 && prefixBits <= depth);
  assert((prefix >> <u64>prefixBits) == 0);
  K = depth;
  full = mode == MODE_FULL;
  emit = emitLeaves != 0;
  Q = <u64>q;
  H = (<i64>q + <i64>r) >> 1;
  useTables(tables);
  livePtr = tallies;
  stoppedPtr = tallies + TALLY_TABLE_BYTES;
  const rowBytes = <usize>(depth + 1) * TALLY_STRIDE * 8;
  memory.fill(livePtr, 0, rowBytes);
  memory.fill(stoppedPtr, 0, rowBytes);
  leafA = leaves;
  leafB = leaves + <usize>LEAF_B_AT;
  leafM = leaves + <usize>LEAF_M_AT;
  leafN = 0;
  excPtr = exceptions;
  excN = 0;
  nodes = 0;
  if (r < 0) run<i64>(prefixBits, prefix, walkTallies != 0);
  else run<u64>(prefixBits, prefix, walkTallies != 0);
  if (leafN > 0) flush(CHANNEL_LEAVES, leafN);
  if (excN > 0) flush(CHANNEL_EXCEPTIONS, excN);
  leafN = 0;
  excN = 0;
  return nodes;
}
