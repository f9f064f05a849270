// Published tables, each with its source, for display beside computed counts (web app) and as
// check values in the tests.

/**
 * OEIS A076227 (https://oeis.org/A076227; terms checked against the published entry): survivors of
 * the 3x+1 coefficient stopping time sieve mod 2^k, k = 0..32.
 */
export const A076227: readonly bigint[] = [
  1, 1, 1, 2, 3, 4, 8, 13, 19, 38, 64, 128, 226, 367, 734, 1295, 2114, 4228, 7495, 14990, 27328, 46611, 93222, 168807, 286581, 573162,
  1037374, 1762293, 3524586, 6385637, 12771274, 23642078, 41347483,
].map(BigInt);

/**
 * OEIS A100982 (https://oeis.org/A100982; terms checked against the published entry): the nonzero
 * counts of classes stopping exactly at depth j, which occur only at j = 1 + floor(m log2 3).
 */
export const A100982_DEPTHS: readonly number[] = [1, 2, 4, 5, 7, 8, 10, 12, 13, 15, 16, 18, 20, 21, 23, 24, 26, 27, 29, 31, 32];
export const A100982: readonly bigint[] = [
  1, 1, 1, 2, 3, 7, 12, 30, 85, 173, 476, 961, 2652, 8045, 17637, 51033, 108950, 312455, 663535, 1900470, 5936673,
].map(BigInt);

/**
 * OEIS A060412 (https://oeis.org/A060412, from memory): the n of 3x+1 whose glide (standard steps
 * until the trajectory first falls below n) beats that of every smaller n; the terms below 2^32,
 * the whole list there. test/records.test.ts checks them against a BigInt brute force below 10^6
 * and that each term's glide beats the term before it.
 */
export const A060412: readonly bigint[] = [
  2, 3, 7, 27, 703, 10087, 35655, 270271, 362343, 381727, 626331, 1027431, 1126015, 8088063, 13421671, 20638335, 26716671, 56924955,
  63728127, 217740015, 1200991791, 1827397567, 2788008987,
].map(BigInt);

/**
 * OEIS A006884 (https://oeis.org/A006884, from memory): the n of 3x+1 whose highest trajectory value
 * beats that of every smaller n (path records); the terms below 2^32, the whole list there. Checked
 * in test/records.test.ts as A060412 is.
 */
export const A006884: readonly bigint[] = [
  1, 2, 3, 7, 15, 27, 255, 447, 639, 703, 1819, 4255, 4591, 9663, 20895, 26623, 31911, 60975, 77671, 113383, 138367, 159487, 270271, 665215,
  704511, 1042431, 1212415, 1441407, 1875711, 1988859, 2643183, 2684647, 3041127, 3873535, 4637979, 5656191, 6416623, 6631675, 19638399,
  38595583, 80049391, 120080895, 210964383, 319804831, 1410123943,
].map(BigInt);

/** A060412 and A006884 above hold every term below this bound (2^32). */
export const RECORDS_LISTED_BELOW = 1n << 32n;
