// What crosses to the inverse tree's workers.

/** Subtrees of the inverse tree of n: the roots (all at inverse depth rootDepth) walked to depth. */
export interface InverseShard {
  readonly q: number;
  readonly r: number;
  /** 0: steps of T; 1: standard steps. */
  readonly steps: 0 | 1;
  readonly depth: number;
  readonly n: bigint;
  /** Nodes below it are counted per depth (0: none). */
  readonly below: bigint;
  readonly rootDepth: number;
  readonly roots: BigUint64Array;
}

/** Per inverse depth j = 0..127 (INVERSE_LEVELS): one array per tally (layout.ts: INVERSE_*). */
export interface InverseShardResult {
  readonly nodes: BigUint64Array;
  readonly withOdd: BigUint64Array;
  readonly zeroModQ: BigUint64Array;
  /** 2^64 - 1 where a depth has no node. */
  readonly min: BigUint64Array;
  readonly max: BigUint64Array;
  readonly belowN: BigUint64Array;
  readonly belowX: BigUint64Array;
}

/** Every node the kernel walks lies below 2^62 (assembly/layout.ts INVERSE_BOUND_BITS, checked when a shard runs). */
export const INVERSE_BOUND_BITS = 62;
