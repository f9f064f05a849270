// The complete cycle search: every integer cycle of period <= K, positive and negative, each once.
// Complete by construction (not a scan of start values): the elements of a cycle of period p have
// periodic parity vectors, so each element's class at depth p is a node where 2^p - q^m divides
// b - a (assembly/cycles.ts tests every node). The host solves for the periodic point, walks the
// cycle in BigInt, and keeps each cycle once, with its minimal period.
import type { CollatzMap } from "../../core/map.js";
import { kernelDepthLimit } from "../../core/map.js";
import { concatU64, threadKernel } from "../../engine/loader.js";
import type { CycleShard } from "./messages.js";
import { choosePrefixBits, largestShare, runWhole, shardEstimate, shardPrefixes } from "../../engine/plan.js";
import type { JobKind, PartBase } from "../../engine/plan.js";
import { cycleShard } from "./kernel.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { cycleRepresentative, iterate } from "../../core/padic.js";
import { LimitError, UsageError } from "../../core/errors.js";
import type { JobApi } from "../../engine/worker.js";
import type { cyclesHandlers } from "./kernel.js";
import { intField, mapField, paramsCodec } from "../../engine/codec.js";

export const MAX_CYCLE_PERIOD = 63;

export interface IntegerCycle {
  /** The element of least absolute value (the minimum for a positive cycle). */
  readonly representative: bigint;
  readonly min: bigint;
  readonly max: bigint;
  /** Minimal period in steps of T. */
  readonly period: number;
  readonly odd: number;
  /** The elements in orbit order, starting at the representative. */
  readonly elements: bigint[];
}

export interface CycleSearchResult {
  readonly map: CollatzMap;
  readonly maxPeriod: number;
  readonly width: 64 | 128;
  /** Sorted: positive cycles by minimum, then negative cycles by |representative|. */
  readonly cycles: IntegerCycle[];
  readonly candidates: number;
  readonly nodes: bigint;
  readonly seconds: number;
}

/** The arithmetic width a search to `maxPeriod` needs, or a refusal. */
export function cycleWidth(map: CollatzMap, maxPeriod: number): 64 | 128 {
  if (maxPeriod <= kernelDepthLimit(map, 64)) return 64;
  const wide = Math.min(kernelDepthLimit(map, 128), MAX_CYCLE_PERIOD);
  if (maxPeriod <= wide) return 128;
  throw new LimitError(`period ${maxPeriod} is beyond the exact 128-bit range for ${map.name} (at most ${wide})`);
}

/** Decodes candidates into their cycles, keeping each cycle once (keyed by its representative). */
export class CycleCollector {
  private readonly found = new Map<bigint, IntegerCycle>();
  candidates = 0;

  constructor(private readonly map: CollatzMap) {}

  add(raw: BigUint64Array): void {
    const q = BigInt(this.map.q);
    for (let i = 0; i < raw.length; i += 4) {
      this.candidates++;
      const a = raw[i]!;
      const b = BigInt.asIntN(128, (raw[i + 2]! << 64n) | raw[i + 1]!);
      const j = Number(raw[i + 3]! >> 32n);
      const m = Number(raw[i + 3]! & 0xffffffffn);
      const D = (1n << BigInt(j)) - q ** BigInt(m);
      const x = (b - a) / D; // exact: the kernel tested divisibility
      if (x * D !== b - a) throw new Error(`internal error: candidate ${a} mod 2^${j} is not a periodic integer`);
      const n = a + (1n << BigInt(j)) * x;
      if (n === 0n) continue; // the fixed point 0 is not a cycle of interest
      this.addCycleThrough(n, j);
    }
  }

  private addCycleThrough(n: bigint, j: number): void {
    const elements = [n];
    let odd = (n & 1n) === 1n ? 1 : 0;
    for (let v = iterate(this.map, n, 1); v !== n; v = iterate(this.map, v, 1)) {
      if (elements.length >= j) throw new Error(`internal error: ${n} does not return within ${j} steps`);
      elements.push(v);
      if ((v & 1n) === 1n) odd++;
    }
    const rep = cycleRepresentative(elements);
    if (this.found.has(rep)) return;
    const k = elements.indexOf(rep);
    const ordered = [...elements.slice(k), ...elements.slice(0, k)];
    let min = rep,
      max = rep;
    for (const v of ordered) {
      if (v < min) min = v;
      if (v > max) max = v;
    }
    this.found.set(rep, { representative: rep, min, max, period: elements.length, odd, elements: ordered });
  }

  sorted(): IntegerCycle[] {
    const all = [...this.found.values()];
    const pos = all.filter((c) => c.representative > 0n).sort((u, v) => (u.min < v.min ? -1 : 1));
    const neg = all.filter((c) => c.representative < 0n).sort((u, v) => (u.representative > v.representative ? -1 : 1));
    return [...pos, ...neg];
  }
}

export interface CycleParams {
  readonly map: CollatzMap;
  readonly maxPeriod: number;
}

/** A shard's raw candidates (4 u64 each, as the kernel gives them) and its node count. */
export interface CyclePart extends PartBase {
  readonly nodes: bigint;
  readonly candidates: BigUint64Array;
}

export const cycleJob: JobKind<CycleParams, CyclePart, CycleSearchResult> = {
  name: "cycles",
  describe: (p) => `cycles of ${p.map.name} to period ${p.maxPeriod}`,
  codec: paramsCodec<CycleParams>({ map: mapField, maxPeriod: intField }),
  estimate(plan, cpus) {
    const { maxPeriod } = plan.params;
    const share =
      plan.tasks === 0 ? 1n << BigInt(maxPeriod + 1) : BigInt(largestShare(plan).tasks) << BigInt(maxPeriod + 1 - plan.prefixBits);
    return shardEstimate(share, 2e7, cpus, 2 ** 26);
  },
  async layout(_pool, p, parallelism) {
    if (!Number.isInteger(p.maxPeriod) || p.maxPeriod < 1 || p.maxPeriod > MAX_CYCLE_PERIOD)
      throw new UsageError(`maximum period must be between 1 and ${MAX_CYCLE_PERIOD}`);
    cycleWidth(p.map, p.maxPeriod);
    const d = Math.min(choosePrefixBits(p.map, p.maxPeriod, "full", parallelism, false), p.maxPeriod);
    // depths 1..d are the top walk's (shard 0); each prefix at d is a task for depths d+1..maxPeriod
    return { prefixBits: d, prefixes: null, tasks: d < p.maxPeriod ? 2 ** d : 0 };
  },
  async runShard(pool, plan, shard, options = {}) {
    const started = performance.now();
    const { map, maxPeriod } = plan.params;
    const prefixes = shardPrefixes(plan, shard);
    const base = { q: map.q, r: map.r, wide: cycleWidth(map, maxPeriod) === 128 } as const;
    const d = plan.prefixBits;
    const found: BigUint64Array[] = [];
    let nodes = 0n;
    if (shard === 0) {
      const kernel = await threadKernel(pool.module);
      const top = cycleShard(kernel, { ...base, depth: d, prefixBits: 0, prefix: 0n, walkTallies: true });
      found.push(top.candidates);
      nodes += top.nodes + 1n;
    }
    const tasks: CycleShard[] = prefixes.map((prefix) => ({ ...base, depth: maxPeriod, prefixBits: d, prefix, walkTallies: false }));
    await pool.run(
      tasks,
      (api: JobApi<typeof cyclesHandlers>, task) => api.runCycles(task),
      (_s, out) => {
        found.push(out.candidates);
        nodes += out.nodes;
      },
      options,
    );
    return { nodes, candidates: concatU64(found), seconds: (performance.now() - started) / 1000 };
  },
  async merge(_pool, plan, parts) {
    const { map, maxPeriod } = plan.params;
    const collector = new CycleCollector(map);
    for (const p of parts) collector.add(p.candidates);
    return {
      map,
      maxPeriod,
      width: cycleWidth(map, maxPeriod),
      cycles: collector.sorted(),
      candidates: collector.candidates,
      nodes: parts.reduce((s, p) => s + p.nodes, 0n),
      seconds: parts.reduce((s, p) => s + p.seconds, 0),
    };
  },
};

/**
 * Every integer cycle of period <= maxPeriod: one shard of the plan layer, merged.
 * @example (await searchCycles(pool, parseMap("3x+1"), 12)).cycles.map((c) => c.representative) // [1n, -1n, -5n, -17n]
 */
export function searchCycles(pool: KernelPool, map: CollatzMap, maxPeriod: number, options: RunOptions = {}): Promise<CycleSearchResult> {
  return runWhole(pool, cycleJob, { map, maxPeriod }, options);
}
