// The verification kernel's run: the map's constants, the run's parameters and tables (set by
// books.ts begin, and by prepare.ts for the tables a worker keeps between blocks), and the map's
// 128-bit arithmetic on values.
//
// Arithmetic is unsigned 128-bit (hi, lo) with the carry out of every product and sum checked; a
// value at or above 2^limitBits (128 at most) hands n to the host, which finishes it in BigInt.
// With r < 0 the images b of the tables are signed (i64) and an odd step subtracts; a value that
// would be zero or below is handed to the host too (only n below |r| can get there, common practice:
// from v >= n > |r| / q an odd step stays positive).

import { VERIFY_LIMIT_BITS } from "../layout";
import { carry, mulAdd, rhi, rlo } from "../u128";

export let Q: u64 = 0;
export let slackK: u64 = 0; // r (q/2)^K, rounded up (the first K steps of a survivor)
export let slackPtr: usize = 0; // u64 r (q/2)^d rounded up, d = 0..KS (host)
export let HQ: u64 = 0; // (q + r) / 2, two's complement: the odd step is q (v >> 1) + HQ
export let NEG: bool = false; // r < 0: the images b (and HQ) are signed
// r > 0 and no lowered limit below 2^64: fast() may take its last single steps in one word, an odd
// step from v while v >> 1 <= tightHalf = (2^64 - 1 - HQ) / q (then q (v >> 1) + HQ < 2^64)
export let tight: bool = false;
export let tightHalf: u64 = 0;
export let SIGN: u64 = 0; // all ones when r < 0: b & SIGN is negative exactly when a signed b is
export let K: i32 = 0; // sieve depth
export let KS: i32 = 0; // table step depth
export let maxSteps: i32 = 0;
export let limitBits: i32 = VERIFY_LIMIT_BITS;
export let qpowPtr: usize = 0; // u64 q^m, m = 0..63
export let survA: usize = 0; // u32 residues of the survivors mod 2^K, ascending
export let survM: usize = 0; // u8 m
export let survB: usize = 0; // u64 b
export let survPeak: usize = 0; // u8 ip, u8 mp per survivor: the peak of q^(m_i)/2^i over i < K
// Step tables of every depth d = 1..KS, the one of depth d at entry 2^d - 2: m (u8), b (u64) and the
// peak (u8 ip, u8 mp) of the coefficients over its d steps, per residue mod 2^d.
export let stepM: usize = 0;
export let stepB: usize = 0;
export let stepPeak: usize = 0;
// The trough (u8 it, u8 mt) of the depth-KS table per residue: the least q^(m_i) / 2^i over i <= KS
// (i = 0 included). With r > 0, T^i(v) >= q^(m_i) v / 2^i, so q^mt v > n 2^it shows that no value
// inside a full table step from v goes below n (or meets it).
export let stepTrough: usize = 0;

/** The map's constants: q, (q + r) / 2 in two's complement, and whether r < 0. */
export function setMap(q: u32, r: i32): void {
  Q = <u64>q;
  HQ = <u64>((<i64>q + <i64>r) >> 1);
  NEG = r < 0;
  SIGN = NEG ? <u64>-1 : 0;
}

/** The value is at or above 2^limitBits (so n goes to the host). */
@inline export function tooLarge(lo: u64, hi: u64): bool {
  if (limitBits >= VERIFY_LIMIT_BITS) return false;
  if (limitBits >= 64) return (hi >> <u64>(limitBits - 64)) != 0;
  return hi != 0 || (lo >> <u64>limitBits) != 0;
}

@inline export function slackD(d: i32): u64 {
  return load<u64>(slackPtr + (<usize>d << 3));
}

/**
 * (hi, lo) y + b into (rhi, rlo), b read as signed when r < 0; carry when the result needs more than
 * 128 bits or is zero or below (the host finishes n in BigInt).
 */
@inline export function affine(lo: u64, hi: u64, y: u64, b: u64): void {
  if (<i64>(b & SIGN) >= 0) {
    mulAdd(lo, hi, y, b);
    return;
  }
  mulAdd(lo, hi, y, 0);
  const d = <u64>-(<i64>b);
  const l = rlo - d;
  if (l > rlo) {
    if (rhi == 0) carry = true;
    rhi--;
  }
  rlo = l;
  if (rlo == 0 && rhi == 0) carry = true;
}

/** One step of T on a value within the host-proven width (signed when r < 0), for the class tables. */
@inline export function step64(v: u64): u64 {
  const half = NEG ? <u64>(<i64>v >> 1) : v >> 1;
  return (v & 1) == 0 ? half : Q * half + HQ;
}

/**
 * An upper bound on the values T^i(v) inside L steps from v, given the peak (ip, mp) of the
 * coefficients q^(m_i)/2^i over those steps and slack >= r (q/2)^L (host, BigInt): with
 * T^i(v) = (q^(m_i) v + c_i) / 2^i and c_i / 2^i <= r (q/2)^(m_i), the bound is
 * q^mp v / 2^ip + slack + 1. carry: too large for 128 bits (treat as unbounded).
 */
@inline export function peakBound(vl: u64, vh: u64, ip: i32, mp: i32, slack: u64): void {
  mulAdd(vl, vh, load<u64>(qpowPtr + (<usize>mp << 3)), 0);
  const over = carry;
  if (ip > 0) {
    rlo = (rlo >> <u64>ip) | (rhi << <u64>(64 - ip));
    rhi >>= <u64>ip;
  }
  const l = rlo + slack;
  if (l < rlo) rhi++;
  rlo = l + 1;
  if (rlo == 0) rhi++;
  // a slack of 2^64 - 1 is the host's clamp of a larger one: no bound then
  carry = over || rhi == 0xffffffffffffffff || slack == 0xffffffffffffffff;
}
