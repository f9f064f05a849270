// The memory layout that the host and the kernels share, defined once. Every value is exported as a
// global (assembly/index.ts); the host's loader (src/engine/loader.ts) reads them at instantiation,
// so an offset or a size never has to be copied by hand into TypeScript.

// ---- tallies: u64 tables [64][64], entry (j, m) at index (j << TALLY_SHIFT) + m ----
export const TALLY_SHIFT: i32 = 6;
export const TALLY_STRIDE: i32 = 1 << TALLY_SHIFT;
export const TALLY_TABLE_BYTES: i32 = TALLY_STRIDE * TALLY_STRIDE * 8;

// ---- depths ----
/** The deepest class any kernel walks (depth <= MAX_DEPTH < 64: a residue mod 2^depth and every
 * shift by a depth fit one u64). The host's copy: src/core/map.ts MAX_KERNEL_DEPTH. */
export const MAX_DEPTH: i32 = 63;
/** Entries of every per-m (m = 0..63) and per-(j, m) table: m and j up to MAX_DEPTH. */
export const TABLE_ENTRIES: i32 = MAX_DEPTH + 1;

// ---- per-m tables the host writes (m = 0..63) ----
/** u64 q^m. */
export const TABLE_QPOW: i32 = 0;
/** i32 bitlen(q^m): q^m < 2^j exactly when j >= bitlen(q^m). */
export const TABLE_DROP: i32 = TABLE_QPOW + TABLE_ENTRIES * 8;
/** u64 per m (census only): least members above it lie in the coefficient's own log2 bin. */
export const TABLE_BINMIN: i32 = TABLE_DROP + TABLE_ENTRIES * 4;
export const TABLE_BYTES: i32 = TABLE_BINMIN + TABLE_ENTRIES * 8;

// ---- streaming: chunks handed to the host through env.flush(channel, count) ----
export const CHANNEL_LEAVES: i32 = 0; // enumerate: (a, b, m) struct of arrays
export const CHANNEL_EXCEPTIONS: i32 = 1; // enumerate: (a, b, j, m)
export const CHANNEL_CYCLES: i32 = 2; // cycles: (a, b lo, b hi, j << 32 | m)
export const CHANNEL_AMBIGUOUS: i32 = 3; // census: (a, b, -, -), bins the host decides
export const CHANNEL_DIFFER: i32 = 4; // census: (a, kind, -, -)
export const CHANNEL_RATIO: i32 = 5; // census: (member, T^j(member), j, -)
export const CHANNEL_VECTORS: i32 = 6; // census: (a, parity vector, -, -)
/** Entries of the 4-word channels: 4 u64. */
export const ENTRY_BYTES: i32 = 32;
/** u64 words of a channel entry (ENTRY_BYTES / 8). */
export const ENTRY_WORDS: i32 = ENTRY_BYTES >> 3;
export const CHANNEL_CHUNK: i32 = 1024;
/** Leaves per chunk; the region holds a[LEAF_CHUNK] u64, b[LEAF_CHUNK] u64, m[LEAF_CHUNK] u8. */
export const LEAF_CHUNK: i32 = 1 << 16;
/** A leaf chunk's arrays: a (u64) at 0, b (u64) at LEAF_B_AT, m (u8) at LEAF_M_AT. */
export const LEAF_B_AT: i32 = LEAF_CHUNK * 8;
export const LEAF_M_AT: i32 = LEAF_CHUNK * 16;
export const LEAF_BYTES: i32 = LEAF_CHUNK * 17;

// ---- enumerate ----
/** live[64][64] then stopped[64][64]. */
export const ENUM_TALLY_BYTES: i32 = 2 * TALLY_TABLE_BYTES;
export const ENUM_EXCEPTION_BYTES: i32 = CHANNEL_CHUNK * ENTRY_BYTES;

// ---- census ----
/** log2(T^K(a)/a) in quarter units, bin k at index k + CENSUS_BIN_OFFSET. */
export const CENSUS_BINS: i32 = 1024;
export const CENSUS_BIN_OFFSET: i32 = 512;
/** counts: nonpositive images, differing members, early descents, (one unused), then per m the slow-path leaves. */
export const CENSUS_COUNT_NONPOSITIVE: i32 = 0;
export const CENSUS_COUNT_DIFFER: i32 = 1;
export const CENSUS_COUNT_EARLY: i32 = 2;
export const CENSUS_COUNT_SLOW: i32 = 4;
export const CENSUS_COUNTS: i32 = CENSUS_COUNT_SLOW + TABLE_ENTRIES;
/** live and stopped tables (the live part of the tree only), then bins, then counts. */
export const CENSUS_BINS_AT: i32 = 2 * TALLY_TABLE_BYTES;
export const CENSUS_COUNTS_AT: i32 = CENSUS_BINS_AT + CENSUS_BINS * 8;
export const CENSUS_TALLY_BYTES: i32 = CENSUS_COUNTS_AT + CENSUS_COUNTS * 8;
/** Scratch: one region per channel 3..6 (channel c at (c - 3) * CENSUS_REGION_BYTES), then one for
 * CHANNEL_EXCEPTIONS (at CENSUS_EXCEPTIONS_AT), a batch, the ratio bounds, seed and reach table. */
export const CENSUS_REGION_BYTES: i32 = CHANNEL_CHUNK * ENTRY_BYTES;
export const CENSUS_EXCEPTIONS_AT: i32 = 4 * CENSUS_REGION_BYTES;
export const CENSUS_BATCH: i32 = 1024;
export const CENSUS_BATCH_AT: i32 = 5 * CENSUS_REGION_BYTES;
/** f64 per m, written by the host: an upper bound on T^j(u)/u over members u >= 1 with m odd steps. */
export const CENSUS_RATIO_AT: i32 = CENSUS_BATCH_AT + CENSUS_BATCH * 16;
/** f64, written by the host: a ratio T^K(u)/u of a real member u, rounded down (the search starts above it). */
export const CENSUS_SEED_AT: i32 = CENSUS_RATIO_AT + TABLE_ENTRIES * 8;
/** u64 per (m, top) at m * TABLE_ENTRIES + top, written by the host: the largest TABLE_BINMIN entry over m..top. */
export const CENSUS_REACH_AT: i32 = CENSUS_SEED_AT + 8;
export const CENSUS_SCRATCH_BYTES: i32 = CENSUS_REACH_AT + TABLE_ENTRIES * TABLE_ENTRIES * 8;

// ---- cycles ----
/** q^m low words at 0, high words at CYCLE_QPOW_HIGH (u64, m = 0..63). */
export const CYCLE_QPOW_HIGH: i32 = TABLE_ENTRIES * 8;
export const CYCLE_QPOW_BYTES: i32 = 2 * CYCLE_QPOW_HIGH;
/** Per (j, m), 4 u64 words: inverse of |2^j - q^m| mod 2^w and floor((2^w - 1) / |2^j - q^m|), low then high words. */
export const CYCLE_DIVISOR_WORDS: i32 = 4;
export const CYCLE_DIVISOR_BYTES: i32 = TALLY_STRIDE * TALLY_STRIDE * CYCLE_DIVISOR_WORDS * 8;
export const CYCLE_CANDIDATE_BYTES: i32 = CHANNEL_CHUNK * ENTRY_BYTES;

// ---- verify ----
export const CHANNEL_GLIDE_RECORDS: i32 = 7; // (n, glide in T steps, glide in standard steps, -)
export const CHANNEL_PATH_RECORDS: i32 = 8; // (n, path low word, path high word, -)
export const CHANNEL_HANDOFFS: i32 = 9; // (n, 1 when the host already counts n as sieved, -, -)
export const CHANNEL_CYCLE_MEMBERS: i32 = 10; // (n, period, -, -)
export const CHANNEL_UNRESOLVED: i32 = 11; // (n, -, -, -)
/** The channels of verification, CHANNEL_GLIDE_RECORDS .. CHANNEL_UNRESOLVED (the host's list: src/jobs/verify/kernel.ts). */
export const VERIFY_CHANNELS: i32 = CHANNEL_UNRESOLVED - CHANNEL_GLIDE_RECORDS + 1;
/** Scratch: one region per channel 7..11, channel c at (c - 7) * VERIFY_REGION_BYTES. */
export const VERIFY_REGION_BYTES: i32 = CHANNEL_CHUNK * ENTRY_BYTES;
export const VERIFY_SCRATCH_BYTES: i32 = VERIFY_CHANNELS * VERIFY_REGION_BYTES;
/** n below 2^VERIFY_N_BITS (a u128 pair with a spare bit: n + 1 and h 2^K never wrap); the host's copy: src/jobs/verify/plan.ts. */
export const VERIFY_N_BITS: i32 = 127;
/** Values at or above 2^limit go to the host, limit <= VERIFY_LIMIT_BITS (the width of the kernel's values). */
export const VERIFY_LIMIT_BITS: i32 = 128;
/** The deepest range [1, 2^N) settled class by class (its walk's stack holds the depths below N). */
export const VERIFY_MAX_CLASS_DEPTH: i32 = 62;
/** Bytes of a peak or trough entry: u8 i, u8 m (the step and odd steps where q^m / 2^i is largest or least). */
export const VERIFY_PEAK_BYTES: i32 = 2;
/** Bytes of a class run's least n per glide: u64 n, u64 its glide in steps of T. */
export const VERIFY_GLIDE_MIN_BYTES: i32 = 16;
/** u64 counts: survivors checked, exceptions that descended, cycle members, unresolved, handoffs,
 * then (ranged blocks) sieved n by cut depth j at VERIFY_COUNT_SIEVED + j. */
/** The deepest sieve and step tables a verification run uses (the host plans within them: src/jobs/verify/plan.ts). */
export const VERIFY_MAX_DEPTH: i32 = 30;
export const VERIFY_MAX_STEP_DEPTH: i32 = 20;
export const VERIFY_COUNT_CHECKED: i32 = 0;
export const VERIFY_COUNT_EXCEPTIONS: i32 = 1;
export const VERIFY_COUNT_CYCLES: i32 = 2;
export const VERIFY_COUNT_UNRESOLVED: i32 = 3;
export const VERIFY_COUNT_HANDOFFS: i32 = 4;
/** Leaves of a range from 1 skipped because a smaller number's trajectory reaches them (verifyClasses). */
export const VERIFY_COUNT_PREIMAGE: i32 = 5;
export const VERIFY_COUNT_SIEVED: i32 = 8;
export const VERIFY_COUNTS: i32 = VERIFY_COUNT_SIEVED + 64;

// ---- inverse tree ----
/** Inverse depths the tallies hold (0..INVERSE_LEVELS - 1). */
export const INVERSE_LEVELS: i32 = 128;
/** u64 tallies per inverse depth j, table t at t * INVERSE_LEVELS * 8: nodes, nodes with an odd
 * predecessor, nodes = 0 mod q, least node, largest node, nodes below N, nodes below X. */
export const INVERSE_NODES: i32 = 0;
export const INVERSE_ODD: i32 = 1;
export const INVERSE_ZERO: i32 = 2;
export const INVERSE_MIN: i32 = 3;
export const INVERSE_MAX: i32 = 4;
export const INVERSE_BELOW_N: i32 = 5;
export const INVERSE_BELOW_X: i32 = 6;
export const INVERSE_TABLES: i32 = 7;
export const INVERSE_TALLY_BYTES: i32 = INVERSE_TABLES * INVERSE_LEVELS * 8;

// ---- inverse tree ----
/** Every node the kernel walks lies below 2^INVERSE_BOUND_BITS (the host proves it: max(N, |r|) 2^K), so 2y and 2y - r stay in i64. */
export const INVERSE_BOUND_BITS: i32 = 62;
