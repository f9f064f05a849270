// Survivors through run pairs in four interleaved lanes (q = 3, r > 0, n and T^K(n) below 2^63): each
// lane's run pair is a serial chain (add, ctz, shift, multiply, ctz, shift), so four independent ones
// in one loop keep the processor busy; a lane that finishes takes the next survivor of the batch.
// The lanes stop where walk.ts runPairs stops (a value that would leave the word or reach the best
// path at the batch's start, the step cap a run pair away, a return to n): such a survivor is walked
// again by the caller in general steps. The caller books every survivor in n order, so records and
// counts are those of one survivor after another. The four lanes are written out one after another
// on purpose: each keeps its state in locals (a helper would pass it through globals, in memory).

import { DONE_DESCENT } from "./books";
import { RUN_MAX, fillRunLimits, firstHalvingBelow, runLimits, runPow, runR, runStepCap } from "./walk";

export const LANE_BATCH: i32 = 256;
/** A batch: n, v = T^K(n), its odd steps among the first K (set by the caller). */
export const lN = new StaticArray<u64>(LANE_BATCH);
export const lV = new StaticArray<u64>(LANE_BATCH);
export const lM = new StaticArray<i32>(LANE_BATCH);
/** Per entry: DONE_DESCENT with its glide lT (steps of T) and odd steps lOdd, or -1 (walk it again). */
export const lDone = new StaticArray<i32>(LANE_BATCH);
export const lT = new StaticArray<i32>(LANE_BATCH);
export const lOdd = new StaticArray<i32>(LANE_BATCH);

/** A lane's descent at the first halving of x below n, or n again (-1: the caller's general steps report the cycle). */
@inline function finish(j: i32, n: u64, x: u64, s: i32, o: i32): void {
  const t = firstHalvingBelow(n, x);
  if (t < 0) {
    unchecked((lDone[j] = -1));
    return;
  }
  unchecked((lDone[j] = DONE_DESCENT));
  unchecked((lT[j] = s + t));
  unchecked((lOdd[j] = o));
}

/** Runs the batch's entries 0..count-1 (each from step K). */
export function runLanes(count: i32, K: i32): void {
  fillRunLimits();
  const r = runR;
  const cap = runStepCap();
  let next = 0;
  let j0: i32 = -1, n0: u64 = 0, v0: u64 = 0, s0: i32 = 0, o0: i32 = 0;
  if (next < count) {
    j0 = next++;
    n0 = unchecked(lN[j0]);
    v0 = unchecked(lV[j0]);
    s0 = K;
    o0 = unchecked(lM[j0]);
  }
  let j1: i32 = -1, n1: u64 = 0, v1: u64 = 0, s1: i32 = 0, o1: i32 = 0;
  if (next < count) {
    j1 = next++;
    n1 = unchecked(lN[j1]);
    v1 = unchecked(lV[j1]);
    s1 = K;
    o1 = unchecked(lM[j1]);
  }
  let j2: i32 = -1, n2: u64 = 0, v2: u64 = 0, s2: i32 = 0, o2: i32 = 0;
  if (next < count) {
    j2 = next++;
    n2 = unchecked(lN[j2]);
    v2 = unchecked(lV[j2]);
    s2 = K;
    o2 = unchecked(lM[j2]);
  }
  let j3: i32 = -1, n3: u64 = 0, v3: u64 = 0, s3: i32 = 0, o3: i32 = 0;
  if (next < count) {
    j3 = next++;
    n3 = unchecked(lN[j3]);
    v3 = unchecked(lV[j3]);
    s3 = K;
    o3 = unchecked(lM[j3]);
  }
  while (j0 >= 0 || j1 >= 0 || j2 >= 0 || j3 >= 0) {
    if (j0 >= 0) {
      const y = v0 + r;
      let a = <i32>ctz(y);
      if (a > RUN_MAX) a = RUN_MAX;
      const c = y >> <u64>a;
      if (c > unchecked(runLimits[a]) || s0 >= cap) {
        unchecked((lDone[j0] = -1));
        j0 = -1;
      } else {
        const x = c * unchecked(runPow[a]) - r;
        s0 += a;
        o0 += a;
        const z = <i32>ctz(x);
        const w = x >> <u64>z;
        if (w <= n0) {
          finish(j0, n0, x, s0, o0);
          j0 = -1;
        } else {
          s0 += z;
          v0 = w;
        }
      }
      if (j0 < 0 && next < count) {
        j0 = next++;
        n0 = unchecked(lN[j0]);
        v0 = unchecked(lV[j0]);
        s0 = K;
        o0 = unchecked(lM[j0]);
      }
    }
    if (j1 >= 0) {
      const y = v1 + r;
      let a = <i32>ctz(y);
      if (a > RUN_MAX) a = RUN_MAX;
      const c = y >> <u64>a;
      if (c > unchecked(runLimits[a]) || s1 >= cap) {
        unchecked((lDone[j1] = -1));
        j1 = -1;
      } else {
        const x = c * unchecked(runPow[a]) - r;
        s1 += a;
        o1 += a;
        const z = <i32>ctz(x);
        const w = x >> <u64>z;
        if (w <= n1) {
          finish(j1, n1, x, s1, o1);
          j1 = -1;
        } else {
          s1 += z;
          v1 = w;
        }
      }
      if (j1 < 0 && next < count) {
        j1 = next++;
        n1 = unchecked(lN[j1]);
        v1 = unchecked(lV[j1]);
        s1 = K;
        o1 = unchecked(lM[j1]);
      }
    }
    if (j2 >= 0) {
      const y = v2 + r;
      let a = <i32>ctz(y);
      if (a > RUN_MAX) a = RUN_MAX;
      const c = y >> <u64>a;
      if (c > unchecked(runLimits[a]) || s2 >= cap) {
        unchecked((lDone[j2] = -1));
        j2 = -1;
      } else {
        const x = c * unchecked(runPow[a]) - r;
        s2 += a;
        o2 += a;
        const z = <i32>ctz(x);
        const w = x >> <u64>z;
        if (w <= n2) {
          finish(j2, n2, x, s2, o2);
          j2 = -1;
        } else {
          s2 += z;
          v2 = w;
        }
      }
      if (j2 < 0 && next < count) {
        j2 = next++;
        n2 = unchecked(lN[j2]);
        v2 = unchecked(lV[j2]);
        s2 = K;
        o2 = unchecked(lM[j2]);
      }
    }
    if (j3 >= 0) {
      const y = v3 + r;
      let a = <i32>ctz(y);
      if (a > RUN_MAX) a = RUN_MAX;
      const c = y >> <u64>a;
      if (c > unchecked(runLimits[a]) || s3 >= cap) {
        unchecked((lDone[j3] = -1));
        j3 = -1;
      } else {
        const x = c * unchecked(runPow[a]) - r;
        s3 += a;
        o3 += a;
        const z = <i32>ctz(x);
        const w = x >> <u64>z;
        if (w <= n3) {
          finish(j3, n3, x, s3, o3);
          j3 = -1;
        } else {
          s3 += z;
          v3 = w;
        }
      }
      if (j3 < 0 && next < count) {
        j3 = next++;
        n3 = unchecked(lN[j3]);
        v3 = unchecked(lV[j3]);
        s3 = K;
        o3 = unchecked(lM[j3]);
      }
    }
  }
}
