// The inverse tree of N: every positive n whose trajectory reaches N, counted level by level (inverse
// depth j: the n with T^j(n) = N first). The top levels are walked here in BigInt and cut into
// subtrees; the kernel (assembly/inverse.ts) walks the subtrees in the pool where every node
// provably fits (below 2^62); past that, the whole walk runs here in BigInt, up to a node cap.
import type { CollatzMap } from "../../core/map.js";
import { LimitError, UsageError } from "../../core/errors.js";
import { CancelledError } from "../../engine/pool.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { runWhole, shardEstimate, shardPrefixes, largestShare } from "../../engine/plan.js";
import type { JobKind, PartBase } from "../../engine/plan.js";
import type { InverseShardResult } from "./messages.js";
import type { JobApi } from "../../engine/worker.js";
import type { treeHandlers } from "./kernel.js";
import { INVERSE_BOUND_BITS } from "./messages.js";
import { bigintField, choiceField, intField, mapField, nullable, paramsCodec } from "../../engine/codec.js";

/** "T": steps of T (n/2, (q n + r)/2); "standard": steps of n/2 and q n + r. */
export type StepConvention = "T" | "standard";

export const MAX_TREE_DEPTH = 100;
/** Most nodes the BigInt engine walks (trees whose nodes pass 2^62). */
export const MAX_BIGINT_TREE_NODES = 2 ** 22;
/** Every node below this fits the kernel's signed 64-bit arithmetic (2y - r included). */
const KERNEL_BOUND = 1n << BigInt(INVERSE_BOUND_BITS);

export interface TreeParams {
  readonly map: CollatzMap;
  readonly n: bigint;
  readonly depth: number;
  readonly steps: StepConvention;
  /** Nodes below X are counted too (null: not asked). */
  readonly below: bigint | null;
}

export interface TreeLevel {
  readonly depth: number;
  readonly nodes: bigint;
  /** Nodes with an odd predecessor in the tree (a positive one other than N). */
  readonly withOdd: bigint;
  readonly zeroModQ: bigint;
  /** The least and largest node (null when the level is empty). */
  readonly min: bigint | null;
  readonly max: bigint | null;
  readonly belowN: bigint;
  readonly belowX: bigint | null;
}

export interface TreeResult {
  readonly map: CollatzMap;
  readonly n: bigint;
  readonly depth: number;
  readonly steps: StepConvention;
  readonly below: bigint | null;
  readonly engine: "kernel" | "bigint";
  readonly levels: TreeLevel[];
  /** Predecessors of N within depth K (N itself not counted), and those of them below X. */
  readonly total: bigint;
  readonly totalBelowX: bigint | null;
  readonly seconds: number;
}

/**
 * The predecessors of y that are new nodes of N's tree: 2y, and the odd one when it is a positive
 * integer (T: (2y - r) / q; standard: (y - r) / q, odd); a predecessor equal to N closes the cycle
 * through N and is left out.
 * @example predecessors(parseMap("3x+1"), "T", 1n, 8n) // [16n, 5n]
 */
export function predecessors(map: CollatzMap, steps: StepConvention, n: bigint, y: bigint): bigint[] {
  const out: bigint[] = [];
  if (2n * y !== n) out.push(2n * y);
  const x = oddPredecessor(map, steps, y);
  if (x !== null && x !== n) out.push(x);
  return out;
}

/** The odd predecessor of y, or null (common practice: the rules above). */
export function oddPredecessor(map: CollatzMap, steps: StepConvention, y: bigint): bigint | null {
  const q = BigInt(map.q);
  const v = steps === "T" ? 2n * y - BigInt(map.r) : y - BigInt(map.r);
  if (v <= 0n || v % q !== 0n) return null;
  const x = v / q;
  return steps === "standard" && x % 2n === 0n ? null : x;
}

/** The growth per level that the heuristic predicts: 1 + 1/q for T; for standard steps, where an odd
 * edge of T takes two steps, the root of λ^2 = λ + 1/q (derived from it). For reading only. */
export function heuristicGrowth(q: number, steps: StepConvention): number {
  return steps === "T" ? 1 + 1 / q : (1 + Math.sqrt(1 + 4 / q)) / 2;
}

/** Checks the request: one clear line for each kind of bad input. */
export function checkTree(p: TreeParams): void {
  const q = BigInt(p.map.q);
  if (p.n < 1n) throw new UsageError(`N must be a positive integer, got ${p.n}`);
  if (p.n % q === 0n)
    throw new UsageError(
      `N = ${p.n} is a multiple of q = ${p.map.q}: neither it nor any 2^i N has an odd predecessor, so its tree is the single chain N, 2N, 4N, ...`,
    );
  if (!Number.isInteger(p.depth) || p.depth < 0 || p.depth > MAX_TREE_DEPTH)
    throw new UsageError(`depth must be a whole number from 0 to ${MAX_TREE_DEPTH}, got ${p.depth}`);
  if (p.below !== null && p.below < 1n) throw new UsageError(`--below must be a positive integer, got ${p.below}`);
}

/** Kernel when every node provably stays below 2^62: nodes <= max(N, |r|) 2^K (2y doubles, an odd predecessor is smaller unless y < |r|). */
function engineFor(p: TreeParams): "kernel" | "bigint" {
  const top = p.n > BigInt(Math.abs(p.map.r)) ? p.n : BigInt(Math.abs(p.map.r));
  return top << BigInt(p.depth) < KERNEL_BOUND ? "kernel" : "bigint";
}

/**
 * The levels of N's tree from the top, each sorted by value: level j holds the n with T^j(n) = N first.
 * @example [...treeLevels(parseMap("3x+1"), "T", 1n, 4)].map((l) => l.length) // [1, 1, 1, 1, 2]
 */
export function* treeLevels(map: CollatzMap, steps: StepConvention, n: bigint, depth: number): Generator<bigint[]> {
  let level = [n];
  for (let j = 0; j <= depth; j++) {
    yield level;
    if (j < depth) level = level.flatMap((y) => predecessors(map, steps, n, y)).sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  }
}

/** Sums per level, exactly (bigints), from kernel tallies and from the BigInt walk alike. */
class TreeTally {
  readonly nodes: bigint[];
  readonly withOdd: bigint[];
  readonly zeroModQ: bigint[];
  readonly belowN: bigint[];
  readonly belowX: bigint[];
  readonly min: (bigint | null)[];
  readonly max: (bigint | null)[];

  constructor(private readonly p: TreeParams) {
    const zero = () => new Array<bigint>(p.depth + 1).fill(0n);
    this.nodes = zero();
    this.withOdd = zero();
    this.zeroModQ = zero();
    this.belowN = zero();
    this.belowX = zero();
    this.min = new Array<bigint | null>(p.depth + 1).fill(null);
    this.max = new Array<bigint | null>(p.depth + 1).fill(null);
  }

  node(y: bigint, j: number): void {
    const { map, steps, n, below } = this.p;
    this.nodes[j]! += 1n;
    const x = oddPredecessor(map, steps, y);
    if (x !== null && x !== n) this.withOdd[j]! += 1n;
    if (y % BigInt(map.q) === 0n) this.zeroModQ[j]! += 1n;
    if (y < n) this.belowN[j]! += 1n;
    if (below !== null && y < below) this.belowX[j]! += 1n;
    this.extremes(j, y, y);
  }

  private extremes(j: number, lo: bigint, hi: bigint): void {
    if (this.min[j] === null || lo < this.min[j]!) this.min[j] = lo;
    if (this.max[j] === null || hi > this.max[j]!) this.max[j] = hi;
  }

  addShard(res: InverseShardResult): void {
    for (let j = 0; j <= this.p.depth; j++) {
      if (res.nodes[j] === 0n) continue;
      this.nodes[j]! += res.nodes[j]!;
      this.withOdd[j]! += res.withOdd[j]!;
      this.zeroModQ[j]! += res.zeroModQ[j]!;
      this.belowN[j]! += res.belowN[j]!;
      this.belowX[j]! += res.belowX[j]!;
      this.extremes(j, res.min[j]!, res.max[j]!);
    }
  }

  addPart(t: TreePart): void {
    for (let j = 0; j <= this.p.depth; j++) {
      if (t.nodes[j] === 0n) continue;
      for (const key of ["nodes", "withOdd", "zeroModQ", "belowN", "belowX"] as const) this[key][j]! += t[key][j]!;
      this.extremes(j, t.min[j]!, t.max[j]!);
    }
  }

  part(seconds: number): TreePart {
    const { nodes, withOdd, zeroModQ, belowN, belowX, min, max } = this;
    return { nodes, withOdd, zeroModQ, belowN, belowX, min, max, seconds };
  }

  levels(): TreeLevel[] {
    const x = this.p.below !== null;
    return this.nodes.map((nodes, j) => ({
      depth: j,
      nodes,
      withOdd: this.withOdd[j]!,
      zeroModQ: this.zeroModQ[j]!,
      min: this.min[j]!,
      max: this.max[j]!,
      belowN: this.belowN[j]!,
      belowX: x ? this.belowX[j]! : null,
    }));
  }
}

/** A shard's per-level sums (min and max null where it has no node at that depth). */
export interface TreePart extends PartBase {
  readonly nodes: bigint[];
  readonly withOdd: bigint[];
  readonly zeroModQ: bigint[];
  readonly belowN: bigint[];
  readonly belowX: bigint[];
  readonly min: (bigint | null)[];
  readonly max: (bigint | null)[];
}

/** Subtrees per task the layout aims for, per worker. */
const TASKS_PER_WORKER = 16;

export const treeJob: JobKind<TreeParams, TreePart, TreeResult> = {
  name: "tree",
  describe: (p) => `inverse tree of ${p.n} under ${p.map.name} to depth ${p.depth} (${p.steps === "T" ? "steps of T" : "standard steps"})`,
  codec: paramsCodec<TreeParams>({
    map: mapField,
    n: bigintField,
    depth: intField,
    steps: choiceField("T", "standard"),
    below: nullable(bigintField),
  }),
  estimate(plan, cpus) {
    // nodes below a root grow by about 4/3 a level; a generous bound of 2 a level
    const levels = BigInt(plan.params.depth - plan.prefixBits);
    return shardEstimate(BigInt(largestShare(plan).tasks) << levels, 2e7, cpus, 2 ** 24);
  },
  async layout(_pool, p, parallelism) {
    checkTree(p);
    if (engineFor(p) === "bigint") return { prefixBits: 0, prefixes: [p.n], tasks: 1 };
    // the top levels here, until one holds enough subtrees for the workers (or the depth is reached)
    let d = 0;
    let frontier: bigint[] = [p.n];
    for (const level of treeLevels(p.map, p.steps, p.n, p.depth)) {
      frontier = level;
      if (level.length >= TASKS_PER_WORKER * parallelism || d === p.depth) break;
      d++;
    }
    return { prefixBits: d, prefixes: frontier, tasks: frontier.length };
  },
  async runShard(pool, plan, shard, options = {}) {
    const started = performance.now();
    const p = plan.params;
    const tally = new TreeTally(p);
    const roots = shardPrefixes(plan, shard);
    if (engineFor(p) === "bigint") {
      walkBig(p, tally, options.signal);
    } else {
      if (shard === 0) {
        // the levels above the subtrees, once, in the first shard
        let j = 0;
        for (const level of treeLevels(p.map, p.steps, p.n, plan.prefixBits - 1)) {
          for (const y of level) tally.node(y, j);
          j++;
        }
      }
      const groups = Math.min(roots.length, 4 * pool.size);
      const tasks = Array.from({ length: groups }, (_, g) => BigUint64Array.from(roots.filter((_, i) => i % groups === g)));
      await pool.run(
        tasks,
        (api: JobApi<typeof treeHandlers>, r) =>
          api.runInverse({
            q: p.map.q,
            r: p.map.r,
            steps: p.steps === "T" ? 0 : 1,
            depth: p.depth,
            n: p.n,
            below: p.below ?? 0n,
            rootDepth: plan.prefixBits,
            roots: r,
          }),
        (_t, out) => tally.addShard(out),
        options,
      );
    }
    return tally.part((performance.now() - started) / 1000);
  },
  async merge(_pool, plan, parts) {
    const tally = new TreeTally(plan.params);
    for (const part of parts) tally.addPart(part);
    return treeResult(
      plan.params,
      tally,
      engineFor(plan.params),
      parts.reduce((s, x) => s + x.seconds, 0),
    );
  },
};

function treeResult(p: TreeParams, tally: TreeTally, engine: "kernel" | "bigint", seconds: number): TreeResult {
  const levels = tally.levels();
  const past = levels.slice(1);
  return {
    map: p.map,
    n: p.n,
    depth: p.depth,
    steps: p.steps,
    below: p.below,
    engine,
    levels,
    total: past.reduce((s, l) => s + l.nodes, 0n),
    totalBelowX: p.below === null ? null : past.reduce((s, l) => s + l.belowX!, 0n),
    seconds,
  };
}

/**
 * The whole tree walked here in BigInt, whatever its size (the engine past 2^62; the kernel's reference).
 * @example treeByBigInt({ map: parseMap("3x+1"), n: 1n, depth: 5, steps: "T", below: null }).levels[5].nodes // 3n
 */
export function treeByBigInt(p: TreeParams): TreeResult {
  checkTree(p);
  const started = performance.now();
  const tally = new TreeTally(p);
  walkBig(p, tally);
  return treeResult(p, tally, "bigint", (performance.now() - started) / 1000);
}

/** The whole tree in BigInt (nodes past 2^62), refused past MAX_BIGINT_TREE_NODES. */
function walkBig(p: TreeParams, tally: TreeTally, signal?: AbortSignal): void {
  let count = 0;
  let j = 0;
  for (const level of treeLevels(p.map, p.steps, p.n, p.depth)) {
    count += level.length;
    if (count > MAX_BIGINT_TREE_NODES)
      throw new LimitError(
        `the tree of ${p.n} to depth ${p.depth} passes 2^62, where it runs in BigInt, and holds over ${MAX_BIGINT_TREE_NODES.toLocaleString("en-US")} nodes: choose a smaller depth`,
      );
    if (signal?.aborted) throw new CancelledError();
    for (const y of level) tally.node(y, j);
    j++;
  }
}

/**
 * The tree and its edges from one BigInt walk (tree --out): each edge goes to `onEdge` in level order,
 * ascending within a level, as the tallies are made; a callback that throws ends the walk.
 * @example await walkWithEdges({ map: parseMap("3x+1"), n: 1n, depth: 4, steps: "T", below: null }, async () => {}) // total 4n
 */
export async function walkWithEdges(
  p: TreeParams,
  onEdge: (e: TreeEdge) => void | Promise<void>,
  options: RunOptions = {},
): Promise<TreeResult> {
  checkTree(p);
  const started = performance.now();
  const tally = new TreeTally(p);
  let depth = 0;
  for (const e of treeEdges(p.map, p.steps, p.n, p.depth)) {
    if (e.depth !== depth) {
      depth = e.depth;
      if (options.signal?.aborted) throw new CancelledError();
      options.onProgress?.(depth, p.depth);
    }
    tally.node(e.node, e.depth);
    await onEdge(e);
  }
  return treeResult(p, tally, "bigint", (performance.now() - started) / 1000);
}

/**
 * The inverse tree of N to depth K: level counts, extremes, nodes below N and X.
 * @example (await runTree(pool, { map: parseMap("3x+1"), n: 1n, depth: 5, steps: "T", below: null })).levels[5].nodes // 3n
 */
export function runTree(pool: KernelPool, params: TreeParams, options: RunOptions = {}): Promise<TreeResult> {
  return runWhole(pool, treeJob, params, options);
}

/** One edge of the tree: node -> parent is one step of the map (the root N has none). */
export interface TreeEdge {
  readonly node: bigint;
  readonly parent: bigint | null;
  readonly depth: number;
  readonly kind: "root" | "even" | "odd";
}

/**
 * Every node to `depth` with its parent, level by level, each level sorted by node value.
 * @example [...treeEdges(parseMap("3x+1"), "T", 1n, 4)].at(-1) // { node: 16n, parent: 8n, depth: 4, kind: "even" }
 */
export function* treeEdges(map: CollatzMap, steps: StepConvention, n: bigint, depth: number): Generator<TreeEdge> {
  let level: TreeEdge[] = [{ node: n, parent: null, depth: 0, kind: "root" }];
  for (let j = 0; j <= depth; j++) {
    yield* level;
    if (j === depth) break;
    level = level
      .flatMap((e) =>
        predecessors(map, steps, n, e.node).map(
          (x): TreeEdge => ({ node: x, parent: e.node, depth: j + 1, kind: x === 2n * e.node ? "even" : "odd" }),
        ),
      )
      .sort((a, b) => (a.node < b.node ? -1 : a.node > b.node ? 1 : 0));
  }
}
