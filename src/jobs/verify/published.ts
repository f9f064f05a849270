// The published record lists of 3x+1 that `verify --known-published` takes as the records below a
// range: OEIS A060412 (starting values of glide records) and A006884 (starting values of path
// records), those of src/core/published.ts (below 2^32) continued. Written from memory, not copied
// from a file: test/global.test.ts checks every entry below 2^24 against a brute force written in
// the test, every entry below 2^32 against a run of [1, 2^32), and that each entry's glide (path)
// beats every earlier entry's. Above 2^32 the entries are checked only for that order: a term
// missing there would not be found. (That check removed four terms written here from memory that
// were no records: 1766763775675711 of A060412, glide 39, and three of A006884 past 9016346070511.)
//
// Conventions. A060412 counts the glide in standard steps (n -> 3n + 1 and n -> n/2 each a step, to
// the first value below n), as `verify` does; n = 1 never goes below itself and has no glide, so the
// list starts at 2. A006884 orders starting values by the largest value of the whole standard
// trajectory (to 1); `verify` orders them by peakT, the largest value under T before the first
// descent. The two orders give the same records: the largest value of n's whole trajectory is the
// larger of its largest value before the descent and the whole-trajectory maximum of a smaller
// number, so n beats every smaller n in one order exactly when it does in the other. Where the path
// rises above n (every record above 2), its largest value follows an odd step v, and the standard
// value there, 3v + 1, is twice T's: the standard maximum is 2 * peakT. The test checks that both
// orders give these lists below its bound.
import * as BELOW_2_32 from "../../core/published.js";

/** OEIS A060412 from 2^32 on (from memory): the terms below 2^32 are src/core/published.ts's. */
const A060412_ABOVE_2_32: readonly bigint[] = [
  12235060455n,
  898696369947n,
  2081751768559n,
  13179928405231n,
  31835572457967n,
  70665924117439n,
  739448869367967n,
  1008932249296231n,
];

/** OEIS A006884 from 2^32 on (from memory): the terms below 2^32 are src/core/published.ts's. */
const A006884_ABOVE_2_32: readonly bigint[] = [
  8528817511n,
  12327829503n,
  23035537407n,
  45871962271n,
  51739336447n,
  59152641055n,
  59436135663n,
  70141259775n,
  77566362559n,
  110243094271n,
  204430613247n,
  231913730799n,
  272025660543n,
  446559217279n,
  567839862631n,
  871673828443n,
  2674309547647n,
  3716509988199n,
  9016346070511n,
];

/** OEIS A060412 from 2: n whose glide (standard steps) beats every smaller n. */
export const A060412: readonly bigint[] = [...BELOW_2_32.A060412, ...A060412_ABOVE_2_32];

/** OEIS A006884: n whose largest trajectory value beats every smaller n (1 counts as its own path). */
export const A006884: readonly bigint[] = [...BELOW_2_32.A006884, ...A006884_ABOVE_2_32];

/**
 * The numbers the shipped lists cover: a list is complete up to its last entry (no record between
 * two entries), so the records below FROM are known for FROM up to the smaller last entry plus one.
 */
export const PUBLISHED_COVER: bigint = (() => {
  const last = (xs: readonly bigint[]) => xs[xs.length - 1]!;
  const a = last(A060412);
  const b = last(A006884);
  return (a < b ? a : b) + 1n;
})();

/** Where the shipped lists come from, as a floor's source names them. */
export const PUBLISHED_SOURCE =
  "OEIS A060412 (glide records) and A006884 (path records) as glidepath ships them (written from memory; complete below 2^32 by its tests, above that checked only as record sequences)";
