// Delays (total stopping times): every n of a block iterated to 1, by table steps where they cannot
// pass over it.

import {
  CHANNEL_GLIDE_RECORDS,
  CHANNEL_HANDOFFS,
  CHANNEL_UNRESOLVED,
  VERIFY_COUNT_CHECKED,
  VERIFY_COUNT_HANDOFFS,
  VERIFY_COUNT_UNRESOLVED,
  VERIFY_LIMIT_BITS,
  VERIFY_MAX_STEP_DEPTH,
} from "../layout";
import { bitlen, carry, leU, rhi, rlo } from "../u128";
import { DONE_DESCENT, DONE_HANDOFF, DONE_UNRESOLVED, begin, bestGlide, bump, end, push } from "./books";
import { HQ, KS, Q, affine, maxSteps, qpowPtr, stepB, stepM, tooLarge } from "./state";

/**
 * Delays (total stopping times) of first..last (as verifyRange): the steps each n takes to reach 1,
 * with the step tables where a table step cannot pass over 1 (v >= 2^(d+1)), single steps below.
 * Records go to CHANNEL_GLIDE_RECORDS as (n, steps of T, standard steps); n that do not reach 1
 * within the step cap to CHANNEL_UNRESOLVED; values past 2^limitBits to CHANNEL_HANDOFFS. Needs verifyPrepare.
 * With r = -s < 0 a table step still cannot pass over 1 unseen: if s < q every step from v >= 1 at
 * least halves ((q - 1) v >= s), and if s >= q the step after 1 is (q - s) / 2 <= 0, from where
 * values stay at or below 0, so the step lands at or below 0 and goes to the host (affine).
 */
export function verifyDelays(
  q: u32, r: i32, stepDepth: i32, steps: i32, limit: i32, tables: usize, firstL: u64, firstH: u64, lastL: u64, lastH: u64,
  counts: usize, scratch: usize,
): u64 {
  assert(r != 0 && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && (firstL | firstH) != 0 && leU(firstL, firstH, lastL, lastH) && limit >= 1 && limit <= VERIFY_LIMIT_BITS);
  begin(q, r, 1, stepDepth, steps, limit, tables, counts, scratch);
  let nl = firstL, nh = firstH;
  let visited: u64 = 0;
  while (true) {
    let vl = nl, vh = nh, t = 0, odd = 0, done = DONE_DESCENT;
    while (vh != 0 || vl != 1) {
      if (t >= maxSteps) {
        done = DONE_UNRESOLVED;
        break;
      }
      let d = bitlen(vl, vh) - 2;
      if (d > KS) d = KS;
      if (d >= 2) {
        const c = <usize>(vl & (((<u64>1) << <u64>d) - 1)) + (((<usize>1) << <usize>d) - 2);
        const sm = <i32>load<u8>(stepM + c);
        affine((vl >> <u64>d) | (vh << <u64>(64 - d)), vh >> <u64>d, load<u64>(qpowPtr + (<usize>sm << 3)), load<u64>(stepB + (c << 3)));
        t += d;
        odd += sm;
      } else if ((vl & 1) == 0) {
        rlo = (vl >> 1) | (vh << 63);
        rhi = vh >> 1;
        carry = false;
        t++;
      } else {
        affine((vl >> 1) | (vh << 63), vh >> 1, Q, HQ);
        t++;
        odd++;
      }
      if (carry || tooLarge(rlo, rhi)) {
        done = DONE_HANDOFF;
        break;
      }
      vl = rlo;
      vh = rhi;
    }
    if (done == DONE_DESCENT) {
      bump(VERIFY_COUNT_CHECKED);
      if (t + odd > bestGlide) {
        bestGlide = t + odd;
        push(CHANNEL_GLIDE_RECORDS, nl, <u64>t, <u64>(t + odd), nh);
      }
    } else if (done == DONE_UNRESOLVED) {
      bump(VERIFY_COUNT_UNRESOLVED);
      push(CHANNEL_UNRESOLVED, nl, 0, 0, nh);
    } else {
      bump(VERIFY_COUNT_HANDOFFS);
      push(CHANNEL_HANDOFFS, nl, 0, 0, nh);
    }
    visited++;
    if (nl == lastL && nh == lastH) break;
    nl++;
    if (nl == 0) nh++;
  }
  end();
  return visited;
}
