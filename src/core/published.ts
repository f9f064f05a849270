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
