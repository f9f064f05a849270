// The sieve mod 2^K: plan shards by residue prefix, run them on the pool, merge the tallies,
// expand the exceptions. One-shot (`runSieve`) and per-shard results agree by construction:
// the top levels 0..d are counted once by a top run, each live prefix at depth d is one shard.
import type { CollatzMap } from "../../core/map.js";
import { checkKernelDepth } from "../../core/map.js";
import type { Level } from "../../core/exact.js";
import { threadKernel } from "../../engine/loader.js";
import { TALLY_STRIDE } from "../../engine/messages.js";
import type { LeafChunk, Mode, ShardRequest, ShardResult } from "../../engine/messages.js";
import { choosePrefixBits } from "../../engine/plan.js";
import { enumerateShard } from "./kernel.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { decodeExceptionClasses, EXCEPTION_LIMIT, expandExceptions } from "./exceptions.js";
import type { ExceptionClass, SieveException } from "./exceptions.js";
import { UsageError } from "../../core/errors.js";

export interface SieveRequest {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly mode: Mode;
  /** Receives the leaves at `depth` (survivors, or all 2^depth classes in full mode), shard by shard. */
  readonly onLeaves?: (chunk: LeafChunk) => void;
  /** Most exceptions listed (the count is always exact). */
  readonly exceptionLimit?: number;
  /** The leaves need only their residues (class tables): b and m are not copied or sent. */
  readonly residuesOnly?: boolean;
}

export interface SieveResult {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly mode: Mode;
  readonly levels: Level[];
  /** live[j][m] and stopped[j][m], m = 0..j. */
  readonly live: bigint[][];
  readonly stopped: bigint[][];
  readonly exceptionClasses: ExceptionClass[];
  /** The smallest exceptions, ascending, at most exceptionLimit of them; the count is exact. */
  readonly exceptions: SieveException[];
  readonly exceptionCount: bigint;
  readonly exceptionLimit: number;
  readonly nodes: bigint;
  readonly shards: number;
  readonly seconds: number;
}

/**
 * Runs the sieve on the pool (the top levels on this thread's own kernel instance).
 * @example const res = await runSieve(pool, { map: parseMap("3x+1"), depth: 30, mode: "survivors" });
 */
export async function runSieve(pool: KernelPool, req: SieveRequest, options: RunOptions = {}): Promise<SieveResult> {
  const { map, depth, mode } = req;
  if (!Number.isInteger(depth) || depth < 0) throw new UsageError("depth must be a non-negative integer");
  checkKernelDepth(map, depth);
  const started = performance.now();
  const d = choosePrefixBits(map, depth, mode, pool.size, req.onLeaves !== undefined);
  const kernel = await threadKernel(pool.module);

  const base = { q: map.q, r: map.r, depth, mode } as const;
  // Top run: levels 0..d exactly, and the live prefixes at depth d as its leaves.
  const prefixes: bigint[] = [];
  const top = enumerateShard(kernel, { ...base, depth: d, prefixBits: 0, prefix: 0n, leaves: true, walkTallies: true }, (c) => {
    if (d === depth) req.onLeaves?.(c);
    for (const a of c.a) prefixes.push(a);
  });
  const merged = new Merger(depth, map.r < 0);
  merged.add(top, d);

  if (d < depth) {
    const shards: ShardRequest[] = prefixes.map((prefix) => ({
      ...base,
      prefixBits: d,
      prefix,
      leaves: req.onLeaves !== undefined,
      residuesOnly: req.residuesOnly === true,
      walkTallies: false,
    }));
    await pool.run(
      shards,
      (api, shard) => api.runShard(shard),
      (_shard, out) => {
        merged.add(out, depth);
        if (out.leaves) req.onLeaves?.(out.leaves);
      },
      options,
    );
  }
  const exceptionLimit = req.exceptionLimit ?? EXCEPTION_LIMIT;
  const { list, count } = expandExceptions(map, merged.exceptionClasses, exceptionLimit);
  return {
    map,
    depth,
    mode,
    ...merged.tables(),
    exceptionClasses: merged.exceptionClasses,
    exceptions: list,
    exceptionCount: count,
    exceptionLimit,
    nodes: merged.nodes,
    shards: d < depth ? prefixes.length : 0,
    seconds: (performance.now() - started) / 1000,
  };
}

/** Sums shard tallies exactly: every sum is a class count at most 2^depth <= 2^63 (no u64 wrap). */
class Merger {
  readonly live: BigUint64Array;
  readonly stopped: BigUint64Array;
  readonly exceptionClasses: ExceptionClass[] = [];
  nodes = 0n;

  constructor(
    private readonly depth: number,
    private readonly signed: boolean,
  ) {
    this.live = new BigUint64Array((depth + 1) * TALLY_STRIDE);
    this.stopped = new BigUint64Array((depth + 1) * TALLY_STRIDE);
  }

  /** Adds a shard's rows 0..rows (shorter for the top run). */
  add(res: ShardResult, rows: number): void {
    const n = (rows + 1) * TALLY_STRIDE;
    for (let i = 0; i < n; i++) {
      this.live[i] = this.live[i]! + res.live[i]!;
      this.stopped[i] = this.stopped[i]! + res.stopped[i]!;
    }
    this.nodes += res.nodes;
    this.exceptionClasses.push(...decodeExceptionClasses(res.exceptionClasses, this.signed));
  }

  tables(): { levels: Level[]; live: bigint[][]; stopped: bigint[][] } {
    const levels: Level[] = [];
    const live: bigint[][] = [];
    const stopped: bigint[][] = [];
    for (let j = 0; j <= this.depth; j++) {
      const row = Array.from(this.live.subarray(j * TALLY_STRIDE, j * TALLY_STRIDE + j + 1));
      const srow = Array.from(this.stopped.subarray(j * TALLY_STRIDE, j * TALLY_STRIDE + j + 1));
      live.push(row);
      stopped.push(srow);
      levels.push({ depth: j, survivors: row.reduce((s, x) => s + x, 0n), stopped: srow.reduce((s, x) => s + x, 0n) });
    }
    return { levels, live, stopped };
  }
}
