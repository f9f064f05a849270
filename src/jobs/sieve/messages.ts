// What crosses to the sieve's workers: a shard of the enumeration, its leaves and tallies, a bucket
// of residues to sort, and a class table to export.
import type { Mode } from "../../engine/messages.js";
import type { ToolStamp } from "../../engine/messages.js";

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
