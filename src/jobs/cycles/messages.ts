// What crosses to the cycle search's workers.

/** One shard of the cycle search: every node of depth 1..depth below the prefix is a candidate. */
export interface CycleShard {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  /** Signed 128-bit arithmetic (the host proved 64 bits insufficient and 128 sufficient). */
  readonly wide: boolean;
  readonly prefixBits: number;
  readonly prefix: bigint;
  readonly walkTallies: boolean;
}

export interface CycleShardResult {
  readonly nodes: bigint;
  /** 4 u64 per candidate: a, b low word, b high word (b signed 128-bit), (j << 32) | m. */
  readonly candidates: BigUint64Array;
}
