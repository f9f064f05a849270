// What crosses to the census's workers.

/** One shard of the census: every vector extending the prefix, tallies of assembly/census.ts. */
export interface CensusShard {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  readonly prefixBits: number;
  readonly prefix: bigint;
  /** Also stream (a, parity vector as bits) for every leaf (the conjugacy permutation). */
  readonly vectors: boolean;
}

export interface CensusShardResult {
  readonly nodes: bigint;
  /** [j * 64 + m], j = 0..depth: the live part of the tree (the exact counter's cross-check). */
  readonly live: BigUint64Array;
  readonly stopped: BigUint64Array;
  /** bins[k + binOffset]: least members with floor(4 log2(T^K(a)/a)) = k, decided in the kernel. */
  readonly bins: BigUint64Array;
  readonly binOffset: number;
  /** Least members with a nonpositive image, members that differ from their class, early descents. */
  readonly nonpositive: bigint;
  readonly differCount: bigint;
  readonly early: bigint;
  /** Per m = 0..63: the least members a >= 1 binned on the slow path; the others with m odd steps
   * belong in the bin of the coefficient q^m/2^K (coefficientBins). */
  readonly slow: BigUint64Array;
  /** 4 u64 per entry, (a, b raw bits, -, -): least members whose bin the host decides exactly. */
  readonly ambiguous: BigUint64Array;
  /** 4 u64 per entry, (a, kind, -, -): kind 1 early descent, 2 no descent at the drop. */
  readonly differ: BigUint64Array;
  /** 4 u64 per entry, (member, T^j(member) raw bits, j, -): may hold the largest ratio. */
  readonly ratio: BigUint64Array;
  /** 4 u64 per entry, (a, b raw bits, j, m): dropping classes with b >= a (as the sieve's). */
  readonly exceptionClasses: BigUint64Array;
  /** (a, parity vector as bits) as u32 pairs, when asked for (depth <= 32). */
  readonly leafVectors?: Uint32Array;
}
