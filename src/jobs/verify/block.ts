// One block of a verification run, finished: the kernel's raw lists (or the BigInt engine's walk)
// turned into whole numbers, its handoffs iterated to the end in BigInt, its unresolved n tried for
// a cycle, and its lists cut to the block's own records. This is what a checkpoint, a cluster part
// and a certificate's block table keep, and what the merge sweeps; it is made in the worker.
import type { CollatzMap } from "../../core/map.js";
import type { VerifyBlock, VerifyBlockResult } from "./messages.js";
import { Smallest } from "../../core/smallest.js";
import { EXCEPTION_LIMIT } from "../sieve/exceptions.js";
import { cycleBudget, cycleEntry, traceBig } from "./trace.js";
import { delayBig } from "../../core/padic.js";

export interface GlideRecord {
  readonly n: bigint;
  /** Glide in standard steps (an odd step counts twice) and in steps of T. */
  readonly standardSteps: number;
  readonly steps: number;
}

export interface PathRecord {
  readonly n: bigint;
  /** The highest value of n's trajectory under T (steps of T: (q n + r)/2 after an odd n). */
  readonly peakT: bigint;
}

export interface CycleMember {
  readonly n: bigint;
  readonly period: number;
}

export interface CycleEntrant {
  readonly n: bigint;
  readonly cycleMin: bigint;
  readonly period: number;
}

/** Counts of a block by outcome; sievedByDepth[j] (j = 0..K) the n cut by the sieve at depth j. */
export interface BlockCounts {
  readonly checked: bigint;
  readonly sievedByDepth: readonly bigint[];
  readonly exceptions: bigint;
  readonly cycleMembers: bigint;
  readonly cycleEntrants: bigint;
  readonly unresolved: bigint;
  /** Runs by classes: leaves skipped because a smaller number's trajectory reaches them. */
  readonly preimage: bigint;
}

export interface DelayPart {
  readonly records: GlideRecord[];
  /** n that do not reach 1 within the cap: the count and the smallest EXCEPTION_LIMIT. */
  readonly unreached: bigint;
  readonly unreachedList: bigint[];
}

/** A finished block: its range, counts, its own records (the last of each list is its maximum) and lists. */
export interface BlockEntry {
  readonly index: number;
  readonly kind: "aligned" | "range" | "delay" | "classes";
  readonly first: bigint;
  readonly last: bigint;
  readonly counts: BlockCounts;
  readonly glideRecords: GlideRecord[];
  readonly pathRecords: PathRecord[];
  readonly cycleMembers: CycleMember[];
  /** The smallest EXCEPTION_LIMIT of each (the counts are exact). */
  readonly cycleEntrants: CycleEntrant[];
  readonly unresolved: bigint[];
  /** Delay blocks only: the delays' records in the block. */
  readonly delay: DelayPart | null;
  /** Numbers the kernel handed to BigInt. */
  readonly handoffs: bigint;
}

export const byN = <T extends { n: bigint }>(u: T, v: T) => (u.n < v.n ? -1 : u.n > v.n ? 1 : 0);

/**
 * The records of a list of candidates: each entry (in n order) whose value beats every earlier
 * one, given the best value so far (strictly: the smallest n wins a tie). One sweep for blocks and
 * for the merge across blocks.
 * @example sweepRecords([{ n: 1n, v: 3 }, { n: 2n, v: 2 }, { n: 3n, v: 5 }], (x) => x.v, -1).records // n = 1, 3
 */
export function sweepRecords<T extends { n: bigint }, V extends number | bigint>(
  candidates: readonly T[],
  value: (x: T) => V,
  best: V,
): { records: T[]; best: V } {
  const sorted = [...candidates].sort(byN);
  const records: T[] = [];
  for (const c of sorted) {
    const v = value(c);
    if (v > best) {
      best = v;
      records.push(c);
    }
  }
  return { records, best };
}

/** The smallest EXCEPTION_LIMIT entries by key, ascending (the capped lists of core/smallest.ts). */
export function smallestBy<T>(xs: Iterable<T>, key: (x: T) => bigint): T[] {
  const kept = new Smallest<T>(EXCEPTION_LIMIT, key);
  for (const x of xs) kept.add(x);
  return kept.sorted();
}

const itself = (x: bigint) => x;

/** n of the kernel's list entry at i: its low word first, its high word last (x0, x1, x2, n high). */
const entryN = (raw: BigUint64Array, i: number) => (raw[i + 3]! << 64n) | raw[i]!;

/** The kernel's glide entries (n, glide in steps of T, in standard steps, n high) as records. */
function glidesOf(raw: BigUint64Array): GlideRecord[] {
  const out: GlideRecord[] = [];
  for (let i = 0; i < raw.length; i += 4) out.push({ n: entryN(raw, i), steps: Number(raw[i + 1]!), standardSteps: Number(raw[i + 2]!) });
  return out;
}

/** Unresolved n tried by Brent's method: a cycle of larger numbers, n's own cycle (a member), or still unresolved. */
function settle(map: CollatzMap, maxSteps: number, unresolved: readonly bigint[]) {
  const members: CycleMember[] = [];
  const entrants: CycleEntrant[] = [];
  const still: bigint[] = [];
  for (const n of unresolved) {
    const c = cycleEntry(map, n, cycleBudget(maxSteps));
    if (c && c.min === n) members.push({ n, period: c.period });
    else if (c && c.min > n) entrants.push({ n, cycleMin: c.min, period: c.period });
    else still.push(n);
  }
  return { members, entrants, still };
}

/** What a block walk found, before its unresolved n are settled and its lists cut to records. */
interface Found {
  checked: bigint;
  exceptions: bigint;
  sievedByDepth: bigint[];
  glides: GlideRecord[];
  paths: PathRecord[];
  cycles: CycleMember[];
  unresolved: bigint[];
  handoffs: bigint;
  preimage: bigint;
}

function finish(map: CollatzMap, maxSteps: number, block: Pick<VerifyBlock, "index" | "kind" | "first" | "last">, f: Found): BlockEntry {
  const s = settle(map, maxSteps, f.unresolved);
  const cycleMembers = [...f.cycles, ...s.members].sort(byN);
  return {
    index: block.index,
    kind: block.kind,
    first: block.first,
    last: block.last,
    counts: {
      checked: f.checked,
      sievedByDepth: f.sievedByDepth,
      exceptions: f.exceptions,
      cycleMembers: BigInt(cycleMembers.length),
      cycleEntrants: BigInt(s.entrants.length),
      unresolved: BigInt(s.still.length),
      preimage: f.preimage,
    },
    glideRecords: sweepRecords(f.glides, (g) => g.standardSteps, -1).records,
    pathRecords: sweepRecords(f.paths, (p) => p.peakT, -1n).records,
    cycleMembers,
    cycleEntrants: smallestBy(s.entrants, (e) => e.n),
    unresolved: smallestBy(s.still, itself),
    delay: null,
    handoffs: f.handoffs,
  };
}

/** One n of a walk in BigInt, tallied (the BigInt engine, and the kernel's handoffs). */
function tally(map: CollatzMap, maxSteps: number, K: number, n: bigint, f: Found, counted: boolean): void {
  const t = traceBig(map, n, maxSteps, K);
  if (!counted) {
    if (t.outcome === "descent") {
      if (t.cutDepth !== null && t.steps === t.cutDepth) f.sievedByDepth[t.cutDepth]!++;
      else if (t.cutDepth !== null) f.exceptions++;
      else f.checked++;
    } else if (t.outcome === "cycle") f.cycles.push({ n, period: t.steps });
    else f.unresolved.push(n);
  }
  if (t.outcome === "descent") {
    f.glides.push({ n, steps: t.steps, standardSteps: t.steps + t.odd });
    f.paths.push({ n, peakT: t.path });
  } else if (t.outcome === "cycle") f.paths.push({ n, peakT: n });
}

const emptyFound = (K: number): Found => ({
  checked: 0n,
  exceptions: 0n,
  sievedByDepth: new Array<bigint>(K + 1).fill(0n),
  glides: [],
  paths: [],
  cycles: [],
  unresolved: [],
  handoffs: 0n,
  preimage: 0n,
});

/** The run-level facts a block is finished with. */
export interface BlockContext {
  readonly map: CollatzMap;
  readonly sieveDepth: number;
  readonly maxSteps: number;
  /** Classes mod 2^j stopping at j, j = 0..K (the exact counter), for aligned blocks. */
  readonly stoppedClasses: readonly bigint[];
}

/**
 * A kernel block finished on this side: counts from the kernel's counters (aligned blocks: the
 * sieved by depth from the stopped classes, less the block's exceptions), records and lists read
 * as whole numbers, the handoffs iterated in BigInt.
 */
export function finishKernelBlock(ctx: BlockContext, block: VerifyBlock, raw: VerifyBlockResult, counters: KernelCounters): BlockEntry {
  const { map, sieveDepth: K, maxSteps } = ctx;
  if (block.kind === "delay") return finishDelay(ctx, block, raw, counters);
  const c = raw.counts;
  const f = emptyFound(K);
  f.checked = c[counters.checked]!;
  f.exceptions = c[counters.exceptions]!;
  f.preimage = c[counters.preimage]!;
  if (block.kind === "aligned") {
    for (let j = 1; j <= K; j++) f.sievedByDepth[j]! += block.periods * ctx.stoppedClasses[j]! * (1n << BigInt(K - j));
    for (const d of block.exceptionDepths) f.sievedByDepth[d]!--;
  } else for (let j = 1; j <= K; j++) f.sievedByDepth[j] = c[counters.sieved + j]!;
  f.glides.push(...glidesOf(raw.glideRecords));
  for (let i = 0; i < raw.pathRecords.length; i += 4)
    f.paths.push({ n: entryN(raw.pathRecords, i), peakT: (raw.pathRecords[i + 2]! << 64n) | raw.pathRecords[i + 1]! });
  for (let i = 0; i < raw.cycleMembers.length; i += 4)
    f.cycles.push({ n: entryN(raw.cycleMembers, i), period: Number(raw.cycleMembers[i + 1]!) });
  for (let i = 0; i < raw.unresolved.length; i += 4) f.unresolved.push(entryN(raw.unresolved, i));
  for (let i = 0; i < raw.handoffs.length; i += 4) {
    f.handoffs++;
    tally(map, maxSteps, K, entryN(raw.handoffs, i), f, raw.handoffs[i + 1]! === 1n);
  }
  return finish(map, maxSteps, block, f);
}

/** Positions of the kernel's counters (assembly/layout.ts VERIFY_COUNT_*, read through the loader). */
export interface KernelCounters {
  readonly checked: number;
  readonly exceptions: number;
  readonly unresolved: number;
  readonly sieved: number;
  readonly preimage: number;
}

function finishDelay(ctx: BlockContext, block: VerifyBlock, raw: VerifyBlockResult, counters: KernelCounters): BlockEntry {
  const found = glidesOf(raw.glideRecords);
  const unreachedList: bigint[] = [];
  for (let i = 0; i < raw.unresolved.length; i += 4) unreachedList.push(entryN(raw.unresolved, i));
  let unreached = raw.counts[counters.unresolved]!;
  let handoffs = 0n;
  for (let i = 0; i < raw.handoffs.length; i += 4) {
    const n = entryN(raw.handoffs, i);
    handoffs++;
    const d = delayBig(ctx.map, n, ctx.maxSteps);
    if (d === null) {
      unreached++;
      unreachedList.push(n);
    } else found.push({ n, steps: d.steps, standardSteps: d.steps + d.odd });
  }
  return delayEntry(ctx.sieveDepth, block, found, unreached, unreachedList, handoffs);
}

function delayEntry(
  K: number,
  block: Pick<VerifyBlock, "index" | "kind" | "first" | "last">,
  found: GlideRecord[],
  unreached: bigint,
  unreachedList: bigint[],
  handoffs: bigint,
): BlockEntry {
  return {
    index: block.index,
    kind: "delay",
    first: block.first,
    last: block.last,
    counts: {
      checked: 0n,
      sievedByDepth: new Array<bigint>(K + 1).fill(0n),
      exceptions: 0n,
      cycleMembers: 0n,
      cycleEntrants: 0n,
      unresolved: 0n,
      preimage: 0n,
    },
    glideRecords: [],
    pathRecords: [],
    cycleMembers: [],
    cycleEntrants: [],
    unresolved: [],
    delay: {
      records: sweepRecords(found, (g) => g.standardSteps, -1).records,
      unreached,
      unreachedList: smallestBy(unreachedList, itself),
    },
    handoffs,
  };
}

/** A block walked n by n in BigInt (the BigInt engine: maps with r < 0, numbers at or above 2^127). */
export function bigintBlock(ctx: BlockContext, block: Pick<VerifyBlock, "index" | "kind" | "first" | "last">): BlockEntry {
  const { map, sieveDepth: K, maxSteps } = ctx;
  if (block.kind === "delay") {
    const found: GlideRecord[] = [];
    const unreachedList: bigint[] = [];
    let best = -1;
    for (let n = block.first; n <= block.last; n++) {
      const d = delayBig(map, n, maxSteps);
      if (d === null) unreachedList.push(n);
      else if (d.steps + d.odd > best) {
        best = d.steps + d.odd;
        found.push({ n, steps: d.steps, standardSteps: d.steps + d.odd });
      }
    }
    return delayEntry(K, block, found, BigInt(unreachedList.length), unreachedList, 0n);
  }
  const f = emptyFound(K);
  for (let n = block.first; n <= block.last; n++) tally(map, maxSteps, K, n, f, false);
  return finish(map, maxSteps, block, f);
}

/** The numbers a block accounts for: its counts by outcome, added. */
export function blockTotal(c: BlockCounts): bigint {
  return (
    c.checked + c.sievedByDepth.reduce((s, x) => s + x, 0n) + c.exceptions + c.cycleMembers + c.cycleEntrants + c.unresolved + c.preimage
  );
}
