// Blocks by classes: a range [1, 2^N) or [2^f, 2^N) settled class by class.
// Classes a mod 2^j are extended one bit at a time from a root mod 2^D (D <= N). A class is settled
// at the first depth j where its coefficient q^m / 2^j drops below 1: its members n = a + 2^D x below
// 2^N (x < 2^(N - D)) descend at step j exactly (r > 0: before j every coefficient is above 1, so
// every value is above n), except the few small ones where q^m (n >> j) + b >= n, which are iterated.
// A class not settled by depth N has one member, n = a: a leaf, iterated on from T^N(n) = b. A leaf
// with a smaller number u whose trajectory reaches n (a preimage chain, preimage.ts) is skipped.
// Records are kept as candidates (books.ts).

import {
  CHANNEL_PATH_RECORDS,
  VERIFY_COUNT_CHECKED,
  VERIFY_COUNT_EXCEPTIONS,
  VERIFY_COUNT_PREIMAGE,
  VERIFY_COUNT_SIEVED,
  VERIFY_MAX_CLASS_DEPTH,
  VERIFY_MAX_STEP_DEPTH,
} from "../layout";
import { childImage, childResidue, dropDepth, stepImage, stepValue } from "../extend";
import { bitlen, carry, leU, ltU, mulAdd, rhi, rlo } from "../u128";
import {
  DONE_CYCLE,
  DONE_DESCENT,
  bandBound,
  begin,
  bestPathBits,
  bump,
  classMode,
  countsPtr,
  end,
  exceededPath,
  fromN,
  glideCap,
  glideMinPtr,
  glideOdd,
  glideT,
  glideTop,
  lbPtr,
  noteGlideMin,
  notePathCandidate,
  pathHi,
  pathLo,
  push,
  pushGlideMins,
  settle,
} from "./books";
import { prepareSkip, skipped } from "./preimage";
import { HQ, Q, peakBound, qpowPtr, slackPtr } from "./state";
import { descend, exact, setRuns } from "./walk";

let classSlack: usize = 0; // u64 r (q/2)^j rounded up, j = 0..N
let nTop: i32 = 0; // N
let usePreimage: bool = false;
// the DFS stack: per depth, a node (a, m, b, peak ip, mp) and which children are done; level s holds
// depth D + s < N <= VERIFY_MAX_CLASS_DEPTH
const stA = new StaticArray<u64>(VERIFY_MAX_CLASS_DEPTH);
const stB = new StaticArray<u64>(VERIFY_MAX_CLASS_DEPTH);
const stM = new StaticArray<i32>(VERIFY_MAX_CLASS_DEPTH);
const stIp = new StaticArray<i32>(VERIFY_MAX_CLASS_DEPTH);
const stMp = new StaticArray<i32>(VERIFY_MAX_CLASS_DEPTH);
const stState = new StaticArray<i32>(VERIFY_MAX_CLASS_DEPTH);

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
 * The nodes below the root c mod 2^D (m odd steps, image b, peak ip, mp), depth first down to depth
 * N: each class settled at its drop, each leaf iterated. Returns the leaves visited.
 */
function below(c: u64, D: i32, N: i32, m: i32, b: u64, ip: i32, mp: i32): u64 {
  let leaves: u64 = 0;
  // stack level s holds the node at depth D + s
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
    // st 0: the even child, st 1: the odd child
    const ca = childResidue<u64>(na, nb, d, st != 0);
    const cm = st == 0 ? nm : nm + 1;
    const cb = childImage<u64>(nb, qm, st != 0, Q, HQ);
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
  return leaves;
}

/** The root c mod 2^D: its first D parities, then its class settled, its leaf, or the nodes below. Returns the leaves visited. */
function root(c: u64, D: i32, N: i32): u64 {
  let m = 0, b: u64 = 0, ip = 0, mp = 0, j = 0;
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
      settleClass(c, D, j, m, b, ip, mp);
      return 0;
    }
  }
  if (D == N) {
    leaf(c, m, b, ip, mp);
    return 1;
  }
  return below(c, D, N, m, b, ip, mp);
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
  assert(r > 0 && N >= 1 && N <= VERIFY_MAX_CLASS_DEPTH && D >= 0 && D <= N && first <= last && from >= 1 && from < (<u64>1) << <u64>N && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && cap >= 1);
  begin(q, r, N, stepDepth, steps, limit, tables, counts, scratch);
  setRuns();
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
    leaves += root(c, D, N);
    if (c == last) break;
  }
  pushGlideMins();
  end();
  return leaves;
}
