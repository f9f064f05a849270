// The merge of a verification run: finished blocks swept in range order. Counts add; a record of
// the union is a block record that beats the running maximum of every block before it (a record of
// the whole range is a record of its own block, so the sweep is exact); lists are the smallest of
// the union. Equal for any split of the range: the one merge for threads, checkpoints and clusters,
// and what `verify --check` re-derives from a certificate's block table.
import { blockTotal, byN, smallestBy, sweepRecords } from "./block.js";
import { blockSize } from "./plan.js";
import type { BlockEntry, CycleEntrant, CycleMember, GlideRecord, PathRecord } from "./block.js";
import type { BlockSpec, VerifyPlan } from "./plan.js";
import { UsageError } from "../../core/errors.js";

/** Delays of a run: the records (steps to reach 1, in standard steps and steps of T) and the n that do not reach 1. */
export interface DelayResult {
  readonly records: GlideRecord[];
  readonly max: GlideRecord | null;
  /** n that did not reach 1 within maxSteps (on another cycle, or unresolved): their count and the smallest. */
  readonly unreached: bigint;
  readonly unreachedList: bigint[];
}

export interface VerifyCounts {
  readonly numbers: bigint;
  /** Survivors of the sieve iterated to their descent. */
  readonly checked: bigint;
  /** n in classes cut by the sieve at depth j (they descend at step j): by depth j = 0..K, and in all. */
  readonly sievedByDepth: bigint[];
  readonly sieved: bigint;
  /** The sieve's exceptions, iterated to their descent. */
  readonly exceptions: bigint;
  readonly cycleMembers: bigint;
  /** n whose trajectory enters a cycle of larger numbers (shown by Brent's method) instead of descending. */
  readonly cycleEntrants: bigint;
  readonly unresolved: bigint;
  /** Leaves (runs by classes) or survivors (skipReached) skipped because a smaller number's trajectory reaches them. */
  readonly preimage: bigint;
}

/** A run's result: its plan's parameters (engine: "kernel", u128 in wasm and BigInt past 128 bits, or "bigint"), and what it found. */
export interface VerifyResult
  extends Pick<
    VerifyPlan,
    "map" | "from" | "to" | "sieveDepth" | "stepDepth" | "maxSteps" | "blockTarget" | "engine" | "method" | "preimage" | "skipReached"
  > {
  readonly counts: VerifyCounts;
  /** Each n whose glide (standard steps), or path, beats every smaller n of the range. */
  readonly glideRecords: GlideRecord[];
  readonly pathRecords: PathRecord[];
  /** The largest glide and path with their n (the smallest n on ties); null when none. */
  readonly maxGlide: GlideRecord | null;
  readonly maxPath: PathRecord | null;
  /** n on a cycle (each is its cycle's least element), with the period. */
  readonly cycleMembers: CycleMember[];
  /** n that enter a cycle of larger numbers: the cycle's least element and period (the smallest 100,000 n). */
  readonly cycleEntrants: CycleEntrant[];
  /** n that neither descended, returned nor were shown to enter a cycle within maxSteps (the smallest 100,000). */
  readonly unresolvedList: bigint[];
  /** With `delay`: the delays' records. */
  readonly delay: DelayResult | null;
  /** Numbers the kernel handed to BigInt (values past 2^limitBits). */
  readonly handoffs: bigint;
  /** The block table: every block's finished entry, in plan order. */
  readonly entries: readonly BlockEntry[];
  /**
   * Seconds of this process (runVerify: its wall time, every pass included; a merge of parts: the
   * parts' seconds added), not of the whole run when a checkpoint brought blocks.
   */
  readonly seconds: number;
  /** Blocks and numbers this process ran: after --resume, those the checkpoint lacked (else all). */
  readonly blocksRun: number;
  readonly numbersRun: bigint;
  /** 2 when a run by classes met a non-descending n with the preimage skip on and ran again without it; else 1. */
  readonly passes: 1 | 2;
  /** The seconds of the first, abandoned pass when passes is 2 (included in `seconds`); else null. */
  readonly firstPassSeconds: number | null;
}

/** Blocks of a plan that an entry list does not match (missing, extra, or another range): one line, or null. */
export function entryMismatch(blocks: readonly BlockSpec[], entries: readonly BlockEntry[]): string | null {
  if (entries.length !== blocks.length) return `the block table has ${entries.length} entries, the plan ${blocks.length} blocks`;
  for (let i = 0; i < blocks.length; i++) {
    const b = blocks[i]!;
    const e = entries[i]!;
    if (e.index !== b.index || e.kind !== b.kind || e.first !== b.first || e.last !== b.last)
      return `block ${i}: the entry is ${e.kind} [${e.first}, ${e.last}], the plan's block is ${b.kind} [${b.first}, ${b.last}]`;
    if (b.kind !== "delay" && blockTotal(e.counts) !== blockSize(b))
      return `block ${i}: its counts add up to ${blockTotal(e.counts)}, the block has ${blockSize(b)} numbers`;
  }
  return null;
}

/** The plan's parameters a result repeats. */
function pickParams(p: VerifyPlan) {
  const { map, from, to, sieveDepth, stepDepth, maxSteps, blockTarget, engine, method, preimage, skipReached } = p;
  return { map, from, to, sieveDepth, stepDepth, maxSteps, blockTarget, engine, method, preimage, skipReached };
}

/** Records of consecutive candidate lists: each list swept against the best of all before it. */
function recordSweep<T extends { n: bigint }, V extends number | bigint>(value: (x: T) => V, start: V) {
  let best = start;
  const records: T[] = [];
  return {
    records,
    add(candidates: readonly T[]) {
      const r = sweepRecords(candidates, value, best);
      best = r.best;
      records.push(...r.records);
    },
  };
}

/**
 * Sweeps the entries (in plan order, one per block) into the run's result. One sweep on purpose (90
 * lines): the counts, the capped lists and the three record sweeps read each entry once, in order.
 * @example mergeVerify(plan, entries, seconds).counts.numbers === plan.to - plan.from
 */
export function mergeVerify(plan: VerifyPlan, entries: readonly BlockEntry[], seconds: number): VerifyResult {
  const bad = entryMismatch(plan.blocks, entries);
  if (bad) throw new Error(`internal error: ${bad}`);
  const K = plan.sieveDepth;
  const sievedByDepth = new Array<bigint>(K + 1).fill(0n);
  const t = { checked: 0n, exceptions: 0n, cycles: 0n, entrants: 0n, unresolved: 0n, handoffs: 0n, unreached: 0n, preimage: 0n };
  const cycleMembers: CycleMember[] = [];
  const cycleEntrants: CycleEntrant[] = [];
  const unresolvedList: bigint[] = [];
  const unreachedList: bigint[] = [];
  // the records: each block's own, swept in range order against the running best
  const glides = recordSweep<GlideRecord, number>((g) => g.standardSteps, -1);
  const paths = recordSweep<PathRecord, bigint>((p) => p.peakT, -1n);
  const delays = recordSweep<GlideRecord, number>((g) => g.standardSteps, -1);
  for (const e of entries) {
    const c = e.counts;
    t.checked += c.checked;
    t.exceptions += c.exceptions;
    t.cycles += c.cycleMembers;
    t.entrants += c.cycleEntrants;
    t.unresolved += c.unresolved;
    t.preimage += c.preimage;
    t.handoffs += e.handoffs;
    c.sievedByDepth.forEach((x, j) => {
      sievedByDepth[j]! += x;
    });
    cycleMembers.push(...e.cycleMembers);
    cycleEntrants.push(...e.cycleEntrants);
    unresolvedList.push(...e.unresolved);
    // blocks of classes interleave in n: their candidates are swept once, together, below
    if (e.kind !== "classes") {
      glides.add(e.glideRecords);
      paths.add(e.pathRecords);
    }
    if (e.delay) {
      t.unreached += e.delay.unreached;
      unreachedList.push(...e.delay.unreachedList);
      delays.add(e.delay.records);
    }
  }
  const classes = entries.filter((e) => e.kind === "classes");
  glides.add(classes.flatMap((e) => e.glideRecords));
  paths.add(classes.flatMap((e) => e.pathRecords));
  const { checked, exceptions, cycles, entrants, unresolved, handoffs, unreached, preimage } = t;
  // lists the skip may have cut short: runVerify falls back in the run (verify.ts), a cluster's merge refuses
  if (plan.preimage && (unresolved > 0n || entrants > 0n))
    throw new UsageError(
      `the run met ${unresolved} unresolved numbers and ${entrants} cycle entrants with the preimage sieve on, which may have skipped more of them: plan it again with --no-preimage (glidepath batch verify ... --no-preimage)`,
    );
  // (the skip of slices: a cycle member u of the range could hide the other members of its cycle, which descend but past u's)
  if (plan.skipReached && (unresolved > 0n || entrants > 0n || cycles > 0n))
    throw new UsageError(
      `the run met ${unresolved} unresolved numbers, ${entrants} cycle entrants and ${cycles} cycle members with the skip of numbers a smaller number reaches on, which may have skipped numbers they reach: plan it again without --skip-reached`,
    );
  const glideRecords = glides.records;
  const pathRecords = paths.records;
  const delayRecords = delays.records;
  const sieved = sievedByDepth.reduce((s, x) => s + x, 0n);
  return {
    ...pickParams(plan),
    counts: {
      numbers: plan.to - plan.from,
      checked,
      sievedByDepth,
      sieved,
      exceptions,
      cycleMembers: cycles,
      cycleEntrants: entrants,
      unresolved,
      preimage,
    },
    glideRecords,
    pathRecords,
    maxGlide: glideRecords.at(-1) ?? null,
    maxPath: pathRecords.at(-1) ?? null,
    cycleMembers: cycleMembers.sort(byN),
    cycleEntrants: smallestBy(cycleEntrants, (e) => e.n),
    unresolvedList: smallestBy(unresolvedList, (n) => n),
    delay: plan.delay
      ? {
          records: delayRecords,
          max: delayRecords.at(-1) ?? null,
          unreached,
          unreachedList: smallestBy(unreachedList, (n) => n),
        }
      : null,
    handoffs,
    entries,
    seconds,
    blocksRun: entries.length,
    numbersRun: plan.blocks.reduce((s, b) => s + blockSize(b), 0n),
    passes: 1,
    firstPassSeconds: null,
  };
}
