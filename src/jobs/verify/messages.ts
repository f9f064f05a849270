// What crosses to the verification's workers: a run's tables, once, then blocks.
import type { BlockSpec } from "./plan.js";

/** The tables of one verification run, sent to each worker once (verifyPrepare). */
export interface VerifyTables {
  /** Names the run (its parameters): a block of another run is refused. */
  readonly key: string;
  readonly q: number;
  readonly r: number;
  /** Sieve depth K and table step depth KS. */
  readonly depth: number;
  readonly stepDepth: number;
  /** Survivors of the depth-K sieve, ascending. */
  readonly residues: Uint32Array;
  /** Standard-step glide of the deepest cut within K: below it, sieved n may be glide records. */
  readonly sievedGlide: number;
  /** m_max: a class cut by depth K has at most m_max odd steps before its cut (bitlen(q^m_max) <= K). */
  readonly sievedPeak: number;
  /** ceil(r (q/2)^L) for L = m_max, K, and 0..KS (clamped to 2^64 - 1): slack of the path bounds. */
  readonly sievedSlack: bigint;
  readonly survivorSlack: bigint;
  readonly slacks: BigUint64Array;
  /**
   * The depth-KS step table as `steps --out` writes it (the bytes the certificate hashes): the kernel's
   * own table of depth KS must equal it byte for byte, or verifyPrepare refuses to run.
   */
  readonly steps: Uint8Array;
  /** Classes mod 2^j stopping at j, j = 0..depth (the exact counter): the sieved counts of aligned blocks. */
  readonly stoppedClasses: BigUint64Array;
  /** A run by classes: its first number, the path bounds per band (pathBounds), ceil(r (q/2)^j) for j = 0..N, the preimage skip, and how many glides get a slot. */
  readonly classes: {
    /** The range's first number, 2^f (1 for a range from 1). */
    readonly from: bigint;
    readonly bounds: BigUint64Array;
    readonly slacks: BigUint64Array;
    readonly preimage: boolean;
    readonly glideCap: number;
  } | null;
}

/**
 * One block of a verification run: whole periods of the sieve (aligned), any first..last (range), or
 * the delays (steps to reach 1) of first..last (delay); on the BigInt engine, walked n by n.
 */
export interface VerifyBlock extends BlockSpec {
  readonly key: string;
  readonly engine: "kernel" | "bigint";
  readonly q: number;
  readonly r: number;
  readonly sieveDepth: number;
  /** aligned and range: the sieve's exceptions in the block, ascending, and the depth of each one's class. */
  readonly exceptions: BigUint64Array;
  readonly exceptionDepths: Uint8Array;
  readonly maxSteps: number;
  /** Values at or above 2^limitBits go to BigInt (128; lower only in tests). */
  readonly limitBits: number;
  /** aligned and range: survivors a smaller number reaches are counted, not walked (the plan's skipReached). */
  readonly skipReached: boolean;
}

/** What the kernel found in a block: counts (layout VERIFY_COUNT_*) and lists of 4 u64 entries. */
export interface VerifyBlockResult {
  readonly index: number;
  readonly visited: bigint;
  readonly counts: BigUint64Array;
  /** (n, glide in T steps, glide in standard steps, -): the block's records, handoffs aside. */
  readonly glideRecords: BigUint64Array;
  /** (n, path low, path high, -). */
  readonly pathRecords: BigUint64Array;
  /** (n, 1 when already counted as sieved, -, -): left to the host (BigInt). */
  readonly handoffs: BigUint64Array;
  readonly cycleMembers: BigUint64Array;
  readonly unresolved: BigUint64Array;
}
