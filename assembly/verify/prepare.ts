// A run's tables, prepared once per worker: the survivors' classes (m, b) and peaks, the step tables
// of every depth up to KS with their peaks, and the troughs of the deepest (state.ts holds where).

import { VERIFY_MAX_DEPTH, VERIFY_MAX_STEP_DEPTH } from "../layout";
import { dropDepth, useTables } from "../extend";
import { setMap, step64, stepB, stepM, stepPeak, stepTrough, survA, survB, survM, survPeak } from "./state";

/** The peak (ip, mp) of q^(m_i) / 2^i over i < len along the parities of a (exact comparison). */
function peakOf(a: u64, len: i32, out: usize): void {
  let v = a, m = 0, ip = 0, mp = 0;
  for (let i = 1; i < len; i++) {
    if ((v & 1) != 0) m++;
    v = step64(v); // within the host-proven width for i < len <= the sieve's limit
    // q^m / 2^i > q^mp / 2^ip iff q^(m - mp) > 2^(i - ip) iff i - ip < bitlen(q^(m - mp))
    if (m > mp && i - ip < dropDepth(m - mp)) {
      ip = i;
      mp = m;
    }
  }
  store<u8>(out, <u8>ip);
  store<u8>(out, <u8>mp, 1);
}

/** The trough (it, mt) of q^(m_i) / 2^i over 0 <= i <= len along the parities of a (exact comparison). */
function troughOf(a: u64, len: i32, out: usize): void {
  let v = a, m = 0, it = 0, mt = 0;
  for (let i = 1; i <= len; i++) {
    if ((v & 1) != 0) m++;
    v = step64(v);
    // q^m / 2^i < q^mt / 2^it iff q^(m - mt) < 2^(i - it) iff bitlen(q^(m - mt)) <= i - it
    if (dropDepth(m - mt) <= i - it) {
      it = i;
      mt = m;
    }
  }
  store<u8>(out, <u8>it);
  store<u8>(out, <u8>mt, 1);
}

/** The class of a mod 2^len: (m, b) with T^len(a + 2^len x) = q^m x + b, b = T^len(a) (within the proven width). */
function classOf(a: u64, len: i32, mOut: usize, bOut: usize): void {
  let v = a, odd = 0;
  for (let j = 0; j < len; j++) {
    if ((v & 1) != 0) odd++;
    v = step64(v);
  }
  store<u8>(mOut, <u8>odd);
  store<u64>(bOut, v);
}

/**
 * Prepares a run's tables once per worker: for every survivor a of the depth-K sieve (given as
 * ascending u32 residues) its (m, b) with T^K(a + 2^K x) = q^m x + b and the peak of its first K
 * steps; the step tables of every depth d <= KS (entry 2^d - 2 onwards: m, b and the peak of its d
 * steps). tables: the per-m tables (TABLE_*). Every other address is an output.
 */
export function verifyPrepare(
  q: u32, r: i32, depth: i32, stepDepth: i32, tables: usize, survivors: i32,
  a: usize, m: usize, b: usize, peak: usize, sm: usize, sb: usize, speak: usize, trough: usize,
): void {
  assert(r != 0 && depth >= 1 && depth <= VERIFY_MAX_DEPTH && stepDepth >= 1 && stepDepth <= VERIFY_MAX_STEP_DEPTH && survivors >= 0);
  setMap(q, r);
  useTables(tables);
  survA = a;
  survM = m;
  survB = b;
  survPeak = peak;
  stepM = sm;
  stepB = sb;
  stepPeak = speak;
  stepTrough = trough;
  for (let i = 0; i < survivors; i++) {
    const at = <usize>i;
    const res = <u64>load<u32>(a + (at << 2));
    peakOf(res, depth, peak + (at << 1));
    classOf(res, depth, m + at, b + (at << 3));
  }
  for (let d = 1; d <= stepDepth; d++) {
    const base = ((<usize>1) << <usize>d) - 2;
    for (let c: u64 = 0; c < (<u64>1) << <u64>d; c++) {
      const at = base + <usize>c;
      peakOf(c, d, speak + (at << 1));
      if (d == stepDepth) troughOf(c, d, trough + (<usize>c << 1));
      classOf(c, d, sm + at, sb + (at << 3));
    }
  }
}
