// The sieve mod 2^K as a job of the plan layer: the top levels 0..d are walked once (by shard 0),
// each live prefix at depth d is one kernel task; shards are contiguous runs of prefixes, weighted
// by their exact survivor counts; a part is the shard's tallies and exception classes (and, when
// asked for, its sorted class table); merging sums them and expands the exceptions.
import { transfer } from "comlink";
import type { CollatzMap } from "../../core/map.js";
import { checkKernelDepth, dropDepths, makeMap } from "../../core/map.js";
import type { Level } from "../../core/exact.js";
import { exactCounts } from "../../core/exact.js";
import { threadKernel } from "../../engine/loader.js";
import type { Kernel } from "../../engine/loader.js";
import { TALLY_STRIDE } from "../../engine/messages.js";
import type { LeafChunk, ShardRequest, ShardResult } from "./messages.js";
import type { Mode } from "../../engine/messages.js";
import { choosePrefixBits, largestShare, runWhole, shardEstimate, shardPrefixes } from "../../engine/plan.js";
import type { JobKind, PartBase, ShardOptions } from "../../engine/plan.js";
import { enumerateShard } from "./kernel.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { decodeExceptionClasses, EXCEPTION_LIMIT, expandExceptions } from "./exceptions.js";
import type { ExceptionClass, SieveException } from "./exceptions.js";
import { UsageError } from "../../core/errors.js";
import { DEFAULT_PASS_BUDGET, passPlan, ResidueSorter } from "./sort.js";
import type { JobApi } from "../../engine/worker.js";
import type { sieveHandlers } from "./kernel.js";
import { boolField, choiceField, intField, mapField, paramsCodec } from "../../engine/codec.js";

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
  /** Kernel tasks the run was cut into (0: the top walk did it all). */
  readonly shards: number;
  readonly seconds: number;
}

/** What plan.json keeps of a sieve. `leaves`: the shards will stream their leaves (smaller tasks). */
export interface SieveParams {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly mode: Mode;
  readonly leaves: boolean;
  readonly exceptionLimit: number;
}

/** A shard's tallies, as the Merger holds them, and the rows of its table when one was written. */
export interface SievePart extends PartBase {
  readonly nodes: bigint;
  readonly live: BigUint64Array;
  readonly stopped: BigUint64Array;
  /** The kernel's (a, b, j, m) quadruples of dropping classes with b >= a. */
  readonly exceptionClasses: BigUint64Array;
  /** Leaves at the target depth in this shard (exact: the plan's weights). */
  readonly rows: bigint;
}

export interface SieveShardOptions extends ShardOptions {
  /** The shard's leaves, chunk by chunk, in tree order (in-process callers). */
  readonly onLeaves?: (chunk: LeafChunk) => void;
  readonly residuesOnly?: boolean;
}

/**
 * Leaves at depth K below a node alive at depth d with m odd steps, for m = 0..d: lattice paths that
 * stay alive (q^m >= 2^j at every j), by dynamic programming; the odd child of a live node is alive.
 */
export function liveDescendants(q: number, d: number, K: number, mode: Mode): bigint[] {
  if (mode === "full") return new Array<bigint>(d + 1).fill(1n << BigInt(K - d));
  const drop = dropDepths(q, K);
  const alive = (j: number, m: number) => j < drop[m]!;
  let f: bigint[] = Array.from({ length: K + 1 }, (_, m) => (alive(K, m) ? 1n : 0n));
  for (let j = K - 1; j >= d; j--) {
    const g = new Array<bigint>(K + 1).fill(0n);
    for (let m = 0; m <= j; m++) if (alive(j, m)) g[m] = (alive(j + 1, m) ? f[m]! : 0n) + f[m + 1]!;
    f = g;
  }
  return f.slice(0, d + 1);
}

/** The top walk (levels 0..d) of a plan, on this thread's kernel. */
function topRun(kernel: Kernel, p: SieveParams, d: number, onLeaves: (c: LeafChunk) => void, residuesOnly: boolean): ShardResult {
  const req: ShardRequest = {
    q: p.map.q,
    r: p.map.r,
    depth: d,
    mode: p.mode,
    prefixBits: 0,
    prefix: 0n,
    leaves: true,
    residuesOnly,
    walkTallies: true,
  };
  return enumerateShard(kernel, req, onLeaves);
}

export const sieveJob: JobKind<SieveParams, SievePart, SieveResult> = {
  name: "sieve",
  describe: (p) => `sieve ${p.map.name} mod 2^${p.depth}${p.mode === "full" ? " (all classes)" : ""}`,
  codec: paramsCodec<SieveParams>({
    map: mapField,
    depth: intField,
    mode: choiceField("survivors", "full"),
    leaves: boolField,
    exceptionLimit: intField,
  }),

  estimate(plan, cpus) {
    const { map, depth, mode } = plan.params;
    const levels = exactCounts(map, depth).levels;
    const nodes = mode === "full" ? (1n << BigInt(depth + 1)) - 1n : levels.reduce((s, l) => s + l.survivors, 0n);
    const rows = mode === "full" ? 1n << BigInt(depth) : levels[depth]!.survivors;
    const w = plan.tasks === 0 ? rows : largestShare(plan).weight;
    // nodes in proportion to the leaves, and about 25 node-times per row written (grouping, sorting,
    // hashing); the sorter holds 4 bytes a row, at most a pass's budget
    const work = (nodes * w) / (rows || 1n) + 25n * w + 1n;
    return shardEstimate(work, 4e7, cpus, Math.min(Number(w) * 4, DEFAULT_PASS_BUDGET) + 2 ** 26);
  },

  async layout(pool, p, parallelism) {
    const { map, depth, mode } = p;
    if (!Number.isInteger(depth) || depth < 0) throw new UsageError("depth must be a non-negative integer");
    checkKernelDepth(map, depth);
    const d = choosePrefixBits(map, depth, mode, parallelism, p.leaves);
    if (d === depth) return { prefixBits: d, prefixes: [], tasks: 0, weights: [] };
    const kernel = await threadKernel(pool.module);
    const prefixes: bigint[] = [];
    const odd: number[] = [];
    topRun(
      kernel,
      p,
      d,
      (c) => {
        for (let i = 0; i < c.a.length; i++) {
          prefixes.push(c.a[i]!);
          odd.push(c.m[i]!);
        }
      },
      false,
    );
    const below = liveDescendants(map.q, d, depth, mode);
    return { prefixBits: d, prefixes, tasks: prefixes.length, weights: odd.map((m) => below[m]!) };
  },

  // one piece on purpose (91 lines): the passes, the sorted output and the table's merge share the
  // pass plan and the sorter's state; split, they would pass half a dozen values back and forth
  async runShard(pool, plan, shard, options: SieveShardOptions = {}) {
    const started = performance.now();
    const p = plan.params;
    const { depth } = p;
    const d = plan.prefixBits;
    const prefixes = shardPrefixes(plan, shard); // checks the shard number
    const kernel = await threadKernel(pool.module);
    const top = shard === 0;
    const range = plan.shards[shard]!;
    const all = p.mode === "full" ? 1n << BigInt(depth) : exactCounts(p.map, depth).levels[depth]!.survivors;
    const rows = (plan.weights ?? []).slice(range.first, range.end).reduce((s, w) => s + w, 0n) + (top && d === depth ? all : 0n);
    const tasks: ShardRequest[] = prefixes.map((prefix) => ({
      q: p.map.q,
      r: p.map.r,
      depth,
      mode: p.mode,
      prefixBits: d,
      prefix,
      leaves: options.onLeaves !== undefined || options.out !== undefined,
      residuesOnly: options.out !== undefined || options.residuesOnly === true,
      walkTallies: false,
    }));
    // one enumeration per memory pass when the sorted table is asked for; tallies from the first
    const table = options.out;
    const passes = table ? passPlan(depth, rows) : { bucketBits: 0, passes: 1 };
    const buckets = 1 << passes.bucketBits;
    let merged: Merger | null = null;
    let written = 0n;
    for (let pass = 0; pass < passes.passes; pass++) {
      const sorter = table
        ? new ResidueSorter(
            depth,
            passes.bucketBits,
            Math.floor((pass * buckets) / passes.passes),
            Math.floor(((pass + 1) * buckets) / passes.passes),
          )
        : null;
      const sink = sorter ? (c: LeafChunk) => sorter.add(c) : options.onLeaves;
      // a table's residues come grouped by bucket from the workers (the host only appends groups)
      const passTasks = sorter
        ? tasks.map((t) => ({ ...t, buckets: { bits: sorter.bucketBits, from: sorter.from, to: sorter.to } }))
        : tasks;
      const m = new Merger(depth, p.map.r < 0);
      if (top) m.add(topRun(kernel, p, d, d === depth && sink ? sink : () => {}, sorter !== null || options.residuesOnly === true), d);
      if (tasks.length > 0)
        await pool.run(
          passTasks,
          (api: JobApi<typeof sieveHandlers>, task) => api.runShard(task),
          (_task, out) => {
            m.add(out, depth);
            if (out.grouped) sorter!.addGrouped(out.grouped);
            else if (out.leaves) sink?.(out.leaves);
          },
          {
            signal: options.signal,
            onProgress: (done, total) => options.onProgress?.(pass * total + done, passes.passes * total),
          },
        );
      merged ??= m;
      if (sorter && table) {
        // the buckets taken out and sorted in workers a few at a time (so that memory stays within the
        // sorter's), and written in order
        const sortAndWrite = async (some: { k: number; keys: Uint32Array }[]) => {
          const done = new Map<number, Uint32Array>();
          await pool.run(
            some,
            (api: JobApi<typeof sieveHandlers>, b) =>
              api.sortBucket(transfer({ keys: b.keys, bits: sorter.keyBits, high: sorter.highOf(b.k), wide: depth > 32 }, [b.keys.buffer])),
            (b, out) => done.set(b.k, out),
            { signal: options.signal },
          );
          for (const b of some) {
            const part = done.get(b.k)!;
            await table.write(new Uint8Array(part.buffer, part.byteOffset, part.byteLength));
          }
        };
        let some: { k: number; keys: Uint32Array }[] = [];
        for (const b of sorter.takeBuckets()) {
          some.push(b);
          if (some.length === 8 * pool.size) {
            await sortAndWrite(some);
            some = [];
          }
        }
        if (some.length > 0) await sortAndWrite(some);
        written += BigInt(sorter.count);
      }
    }
    if (table && written !== rows) throw new Error(`internal error: shard ${shard} wrote ${written} residues, its plan says ${rows}`);
    return { ...merged!.part(), rows, seconds: (performance.now() - started) / 1000 };
  },

  async merge(_pool, plan, parts) {
    const p = plan.params;
    const merged = new Merger(p.depth, p.map.r < 0);
    let rows = 0n;
    for (const part of parts) {
      merged.add(part, p.depth);
      rows += part.rows;
    }
    const tables = merged.tables();
    if (p.mode === "survivors" && rows !== tables.levels[p.depth]!.survivors)
      throw new Error(`internal error: the parts hold ${rows} rows, their tallies ${tables.levels[p.depth]!.survivors}`);
    const { list, count } = expandExceptions(p.map, merged.exceptionClasses, p.exceptionLimit);
    return {
      map: p.map,
      depth: p.depth,
      mode: p.mode,
      ...tables,
      exceptionClasses: merged.exceptionClasses,
      exceptions: list,
      exceptionCount: count,
      exceptionLimit: p.exceptionLimit,
      nodes: merged.nodes,
      shards: plan.tasks,
      seconds: parts.reduce((s, x) => s + x.seconds, 0),
    };
  },
};

/** The sieve's parameters from a request. */
export function sieveParams(req: Omit<SieveRequest, "onLeaves" | "residuesOnly">, leaves: boolean): SieveParams {
  return {
    map: makeMap(req.map.q, req.map.r),
    depth: req.depth,
    mode: req.mode,
    leaves,
    exceptionLimit: req.exceptionLimit ?? EXCEPTION_LIMIT,
  };
}

/**
 * Runs the sieve on the pool: one shard of the plan layer, merged.
 * @example const res = await runSieve(pool, { map: parseMap("3x+1"), depth: 30, mode: "survivors" });
 */
export function runSieve(pool: KernelPool, req: SieveRequest, options: RunOptions = {}): Promise<SieveResult> {
  const params = { ...sieveParams(req, req.onLeaves !== undefined), map: req.map };
  return runWhole(pool, sieveJob, params, { ...options, onLeaves: req.onLeaves, residuesOnly: req.residuesOnly } as SieveShardOptions);
}

/** Sums tallies exactly: every sum is a class count at most 2^depth <= 2^63 (no u64 wrap). */
class Merger {
  readonly live: BigUint64Array;
  readonly stopped: BigUint64Array;
  readonly exceptionClasses: ExceptionClass[] = [];
  private readonly rawExceptions: BigUint64Array[] = [];
  nodes = 0n;

  constructor(
    private readonly depth: number,
    private readonly signed: boolean,
  ) {
    this.live = new BigUint64Array((depth + 1) * TALLY_STRIDE);
    this.stopped = new BigUint64Array((depth + 1) * TALLY_STRIDE);
  }

  /** Adds a shard's rows 0..rows (shorter for the top run). */
  add(res: Pick<ShardResult, "nodes" | "live" | "stopped" | "exceptionClasses">, rows: number): void {
    const n = (rows + 1) * TALLY_STRIDE;
    for (let i = 0; i < n; i++) {
      this.live[i] = this.live[i]! + res.live[i]!;
      this.stopped[i] = this.stopped[i]! + res.stopped[i]!;
    }
    this.nodes += res.nodes;
    this.rawExceptions.push(res.exceptionClasses);
    this.exceptionClasses.push(...decodeExceptionClasses(res.exceptionClasses, this.signed));
  }

  part(): Omit<SievePart, "rows" | "seconds"> {
    const raw = new BigUint64Array(this.rawExceptions.reduce((s, x) => s + x.length, 0));
    let o = 0;
    for (const x of this.rawExceptions) {
      raw.set(x, o);
      o += x.length;
    }
    return { nodes: this.nodes, live: this.live, stopped: this.stopped, exceptionClasses: raw };
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
