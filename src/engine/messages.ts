// What crosses the worker boundary: one typed surface (comlink), plain data and typed arrays.
import type { CensusShard, CensusShardResult, CycleShard, CycleShardResult, LeafChunk, ShardRequest, ShardResult } from "./kernel.js";

export interface ShardOutput extends ShardResult {
  /** The shard's leaves at the target depth, when asked for (concatenated chunks). */
  readonly leaves?: LeafChunk;
}

/** A class table export made in a worker: the rows' (m, b) come from each residue, in BigInt. */
export interface TableExport {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  readonly format: "csv" | "arrow";
  /** Sorted survivors (depth <= 32). */
  readonly residues: Uint32Array;
}

/** The object each worker exposes. */
export interface KernelWorkerApi {
  /** Instantiates the kernel from a compiled module (compiled once by the pool's owner). */
  init(module: WebAssembly.Module): Promise<void>;
  runShard(req: ShardRequest): Promise<ShardOutput>;
  runCycles(req: CycleShard): Promise<CycleShardResult>;
  runCensus(req: CensusShard): Promise<CensusShardResult>;
  exportTable(req: TableExport): Promise<Uint8Array>;
}
