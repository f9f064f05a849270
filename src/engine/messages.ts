// What crosses the worker boundary (comlink): shard requests and results of every kernel job, as
// plain data and typed arrays, and the one object each worker exposes.
import type { BlockEntry } from "../jobs/verify/block.js";
import type { ToolStamp } from "../outputs/manifest.js";

export type Mode = "survivors" | "full";

/**
 * Row stride of every tally table in a result: entry (j, m) at j * TALLY_STRIDE + m. The kernels'
 * own value (assembly/layout.ts) is checked against it when a kernel is loaded (engine/tables.ts).
 */
export const TALLY_STRIDE = 64;

/** One sieve shard: every class extending `prefix` mod 2^prefixBits, enumerated to `depth`. */
export interface ShardRequest {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  readonly mode: Mode;
  readonly prefixBits: number;
  readonly prefix: bigint;
  /** Stream the leaves (a, m, b) at `depth`; tallies and exceptions always come back. */
  readonly leaves: boolean;
  /** Only the residues a of the leaves (b and m come back empty): for class tables. */
  readonly residuesOnly?: boolean;
  /**
   * With residuesOnly: the worker groups the residues by their top `bits` bits and keeps buckets
   * from..to-1 only (one pass of a table's sort), so the host only appends whole groups.
   */
  readonly buckets?: BucketRange;
  /**
   * false: tally only levels deeper than prefixBits (the plan counted levels 0..prefixBits in a top
   * run); true: also the ancestors this shard owns, so the 2^prefixBits shards sum to the whole run.
   */
  readonly walkTallies: boolean;
}

/** Leaves in struct-of-arrays form; b holds the raw 64 bits, signed when r < 0; b and m are empty
 * when only residues were asked for. */
export interface LeafChunk {
  readonly a: BigUint64Array;
  readonly b: BigInt64Array | BigUint64Array;
  readonly m: Uint8Array;
}

export interface ShardResult {
  readonly nodes: bigint;
  /** live[j * 64 + m], j = 0..depth: classes at depth j whose coefficient has not dropped below 1. */
  readonly live: BigUint64Array;
  /** stopped[j * 64 + m]: classes whose coefficient q^m / 2^j first drops below 1 at depth j. */
  readonly stopped: BigUint64Array;
  /** Dropping classes with b >= a, 4 entries each: a, b (raw bits), j, m. */
  readonly exceptionClasses: BigUint64Array;
}

export interface ShardOutput extends ShardResult {
  /** The shard's leaves at the target depth, when asked for (concatenated chunks). */
  readonly leaves?: LeafChunk;
  /** With `buckets`: the leaves' residues grouped by bucket instead. */
  readonly grouped?: GroupedResidues;
}

/** Buckets from..to-1 of residues mod 2^depth by their top `bits` bits. */
export interface BucketRange {
  readonly bits: number;
  readonly from: number;
  readonly to: number;
}

/** Residues grouped by bucket: the low depth - bits bits of each, bucket after bucket. */
export interface GroupedResidues {
  readonly low: Uint32Array;
  /** counts[k]: residues of bucket from + k, in that order in `low`. */
  readonly counts: Uint32Array;
}

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
  /** [nonpositive images, differing members, early descents, -, then per m the least members
   * a >= 1 binned on the slow path]; the others with m odd steps belong in the bin of the
   * coefficient q^m/2^K (coefficientBins). */
  readonly counts: BigUint64Array;
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

/** A class table export made in a worker: the rows' (m, b) come from each residue, in BigInt. */
export interface TableExport {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  readonly format: "csv" | "arrow";
  /** Sorted survivors (depth <= 32). */
  readonly residues: Uint32Array;
  /** Stamped into the Arrow schema's metadata. */
  readonly tool: ToolStamp;
}

/** The object each worker exposes. */
export interface KernelWorkerApi {
  /** Instantiates the kernel from a compiled module (compiled once by the pool's owner). */
  init(module: WebAssembly.Module): Promise<void>;
  runShard(req: ShardRequest): Promise<ShardOutput>;
  runCycles(req: CycleShard): Promise<CycleShardResult>;
  runCensus(req: CensusShard): Promise<CensusShardResult>;
  runInverse(req: InverseShard): Promise<InverseShardResult>;
  exportTable(req: TableExport): Promise<Uint8Array>;
  /** Sorts one bucket of a class table and writes it out (outputs/tables.ts finishBucket). */
  sortBucket(keys: Uint32Array, bits: number, high: number, wide: boolean): Promise<Uint32Array>;
  /** Keeps a verification run's tables in the worker's kernel (once per run). */
  verifyPrepare(tables: VerifyTables): Promise<void>;
  /** Runs one block (on the tables prepared for its run, or in BigInt) and finishes it there. */
  verifyBlock(block: VerifyBlock): Promise<BlockEntry>;
}

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
  /** Classes mod 2^j stopping at j, j = 0..depth (the exact counter): the sieved counts of aligned blocks. */
  readonly stoppedClasses: BigUint64Array;
}

/**
 * One block of a verification run: whole periods of the sieve (aligned), any first..last (range), or
 * the delays (steps to reach 1) of first..last (delay); on the BigInt engine, walked n by n.
 */
export interface VerifyBlock {
  readonly key: string;
  readonly engine: "kernel" | "bigint";
  readonly q: number;
  readonly r: number;
  readonly sieveDepth: number;
  readonly index: number;
  readonly kind: "aligned" | "range" | "delay";
  /** The numbers first..last (inclusive). */
  readonly first: bigint;
  readonly last: bigint;
  /** aligned: n = a + 2^K h for h0 <= h < h0 + periods. */
  readonly h0: bigint;
  readonly periods: bigint;
  /** aligned: the sieve's exceptions in the block, ascending, and the depth of each one's class. */
  readonly exceptions: BigUint64Array;
  readonly exceptionDepths: Uint8Array;
  readonly maxSteps: number;
  /** Values at or above 2^limitBits go to BigInt (128; lower only in tests). */
  readonly limitBits: number;
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
