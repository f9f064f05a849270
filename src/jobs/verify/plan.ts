// A verification request checked and cut into blocks: the sieve's partial periods at both ends as
// ranged blocks, whole periods in between as aligned blocks, and (with delays) blocks of delays.
// The defaults and limits of a run are defined here once.
import { LimitError, UsageError } from "../../core/errors.js";
import type { CollatzMap } from "../../core/map.js";
import { kernelDepthLimit } from "../../core/map.js";
import { checkRange } from "../../core/parse.js";

export const DEFAULT_SIEVE_DEPTH = 26;
export const DEFAULT_STEP_DEPTH = 12;
export const MAX_VERIFY_SIEVE_DEPTH = 30;
export const MAX_VERIFY_STEP_DEPTH = 20;
export const DEFAULT_MAX_STEPS = 100_000;
export const MAX_MAX_STEPS = 100_000_000;
/** Numbers a run may take through BigInt alone (n >= 2^127): it is slow. */
export const MAX_BIGINT_NUMBERS = 1n << 22n;
/** Numbers per ranged block (partial periods, iterated one by one). */
const RANGE_BLOCK = 1n << 20n;
/** Numbers per block on the BigInt engine (about a tenth of a second each). */
const BIGINT_BLOCK = 1n << 12n;
/** The kernel takes n below 2^KERNEL_N_BITS (a 128-bit pair; assembly/layout.ts VERIFY_N_BITS). */
export const KERNEL_N_BITS = 127;
const KERNEL_LIMIT = 1n << BigInt(KERNEL_N_BITS);
/** The kernel's values are 128 bits wide: limitBits is at most this (assembly/layout.ts VERIFY_LIMIT_BITS). */
export const MAX_LIMIT_BITS = 128;
/** The deepest range [1, 2^N) the kernel settles class by class (assembly/layout.ts VERIFY_MAX_CLASS_DEPTH). */
export const MAX_CLASS_DEPTH = 62;

export interface VerifyRequest {
  readonly map: CollatzMap;
  readonly from: bigint;
  readonly to: bigint;
  /** Sieve depth K and table step depth KS (DEFAULT_SIEVE_DEPTH, DEFAULT_STEP_DEPTH). */
  readonly sieveDepth?: number;
  readonly stepDepth?: number;
  readonly maxSteps?: number;
  /** About how many blocks (default: from the range's size); the result does not depend on it. */
  readonly blocks?: number;
  /** Values at or above 2^limitBits are finished in BigInt (128; lower it only to test that path). */
  readonly limitBits?: number;
  /** Also the delay of every n (its total stopping time: the steps to reach 1) and its records. */
  readonly delay?: boolean;
  /**
   * A range [2^f, 2^N) (from 1: f = 0) is settled class by class (the kernel's verifyClasses) unless this
   * is false or a sieve depth is given; the preimage skip of its leaves unless `preimage` is false.
   */
  readonly classes?: boolean;
  readonly preimage?: boolean;
  /**
   * By periods: survivors that a smaller number reaches within three steps (every value between above
   * it), wherever that number lies, are counted, not iterated (README: global records). The records
   * are then those among the numbers not skipped; with the records known below FROM the new records
   * among all n stay exact. r > 0, q < 256, n below 2^127.
   */
  readonly skipReached?: boolean;
}

/** One block of a plan: first..last (inclusive); aligned blocks are n = a + 2^K h, h0 <= h < h0 + periods. */
export interface BlockSpec {
  readonly index: number;
  /** classes: the roots c mod 2^D with first <= c <= last (D = rootDepth), 2^(N - D) numbers each (periods), 0 left out. */
  readonly kind: "aligned" | "range" | "delay" | "classes";
  readonly first: bigint;
  readonly last: bigint;
  /** aligned: the first period h0 (0 for the other kinds). */
  readonly h0: bigint;
  readonly periods: bigint;
  /** classes: the depth D of the roots (0 for the other kinds). */
  readonly rootDepth: number;
  /** classes: how many numbers of the roots' classes lie below FROM (left out). */
  readonly below: bigint;
}

/** A checked request with its defaults filled in. */
export interface VerifyPlan {
  readonly map: CollatzMap;
  readonly from: bigint;
  readonly to: bigint;
  readonly sieveDepth: number;
  readonly stepDepth: number;
  readonly maxSteps: number;
  readonly limitBits: number;
  readonly engine: "kernel" | "bigint";
  readonly delay: boolean;
  /** "classes": [1, 2^N) settled class by class to depth N = sieveDepth; "periods": the depth-K sieve's periods and ranges. */
  readonly method: "classes" | "periods";
  /** classes: leaves with a smaller number reaching them are skipped (the preimage sieve). */
  readonly preimage: boolean;
  /** periods: survivors a smaller number reaches are skipped, wherever it lies (the request's skipReached). */
  readonly skipReached: boolean;
  /** The request's block count (null: from the range's size), which certificates keep to re-plan the run. */
  readonly blockTarget: number | null;
  /** Names the parameters: checkpoints and blocks of another plan are refused. */
  readonly key: string;
  readonly blocks: readonly BlockSpec[];
}

/** The size of a block (numbers). */
export const blockSize = (b: Pick<BlockSpec, "kind" | "first" | "last" | "periods" | "below">) =>
  b.kind === "classes" ? (b.last - b.first + 1n) * b.periods - b.below : b.last - b.first + 1n;

/** Roots of a run by classes: residues mod 2^min(N, ROOT_DEPTH). */
const ROOT_DEPTH = 16;

const isPowerOfTwo = (x: bigint) => x >= 1n && (x & (x - 1n)) === 0n;

/**
 * N when [from, to) is [2^f, 2^N) (f = 0: from 1) and can be settled class by class (r > 0, classes
 * within 64 bits), else null.
 */
export function classDepthOf(map: CollatzMap, from: bigint, to: bigint): number | null {
  if (map.r < 0 || to < 2n || !isPowerOfTwo(from) || !isPowerOfTwo(to) || from >= to) return null;
  const N = to.toString(2).length - 1;
  return N <= Math.min(kernelDepthLimit(map), MAX_CLASS_DEPTH) ? N : null;
}

/** Numbers below from = 2^f in the classes of roots first..last mod 2^D (0 included). */
function belowFrom(from: bigint, D: number, first: bigint, last: bigint): bigint {
  const roots = last - first + 1n;
  if (from >= 1n << BigInt(D)) return roots * (from >> BigInt(D)); // 2^(f - D) in each class
  const end = last < from - 1n ? last : from - 1n; // the roots below from hold one each
  return end >= first ? end - first + 1n : 0n;
}

/**
 * Checks a request and splits it into blocks.
 * @example planVerify({ map: parseMap("3x+1"), from: 1n, to: 1n << 30n }).blocks.length // 17
 */
export function planVerify(req: VerifyRequest): VerifyPlan {
  const { map, from, to } = req;
  checkRange(from, to);
  const maxSteps = req.maxSteps ?? DEFAULT_MAX_STEPS;
  // (a class settled at depth j counts its members as descending at step j: within the cap)
  const fits = (N: number | null) => (N !== null && N <= maxSteps ? N : null);
  const classDepth = req.classes === false || req.sieveDepth !== undefined ? null : fits(classDepthOf(map, from, to));
  const method = classDepth === null ? "periods" : "classes";
  const preimage = method === "classes" && req.preimage !== false;
  const skipReached = req.skipReached === true;
  if (skipReached) {
    if (map.r < 0)
      throw new UsageError(`the skip of numbers a smaller number reaches needs r > 0 (README: global records), not ${map.name}`);
    if (map.q >= 256)
      throw new LimitError(`the skip of numbers a smaller number reaches is for q below 256 (its residue table mod q^2), not ${map.name}`);
    if (method === "classes")
      throw new UsageError(
        `[${from}, ${to}) goes class by class, whose preimage skip is on already (behind a smaller number in the range): give --periods to skip behind any smaller number`,
      );
    if (to > KERNEL_LIMIT)
      throw new LimitError(`the skip of numbers a smaller number reaches runs in the kernel: n below 2^${KERNEL_N_BITS}`);
  }
  const sieveDepth = classDepth ?? req.sieveDepth ?? DEFAULT_SIEVE_DEPTH;
  const stepDepth = req.stepDepth ?? DEFAULT_STEP_DEPTH;
  const limitBits = req.limitBits ?? MAX_LIMIT_BITS;
  const depthLimit = Math.min(MAX_VERIFY_SIEVE_DEPTH, kernelDepthLimit(map));
  if (method === "periods" && (!Number.isInteger(sieveDepth) || sieveDepth < 1 || sieveDepth > depthLimit))
    throw new LimitError(`sieve depth ${sieveDepth} is out of range for ${map.name}: 1 to ${depthLimit} (the sieve table's exact limit)`);
  const stepLimit = Math.min(MAX_VERIFY_STEP_DEPTH, kernelDepthLimit(map));
  if (!Number.isInteger(stepDepth) || stepDepth < 1 || stepDepth > stepLimit)
    throw new LimitError(`step depth ${stepDepth} is out of range: 1 to ${stepLimit}`);
  if (!Number.isInteger(maxSteps) || maxSteps < 1 || maxSteps > MAX_MAX_STEPS)
    throw new UsageError(`max steps must be from 1 to ${MAX_MAX_STEPS}`);
  // the sieve counts its classes as descending at their cut depth j <= K, which a smaller cap would contradict
  if (method === "periods" && maxSteps < sieveDepth)
    throw new UsageError(
      `max steps ${maxSteps} is below the sieve depth ${sieveDepth}: give a sieve depth of at most ${maxSteps}, or more steps`,
    );
  if (!Number.isInteger(limitBits) || limitBits < 8 || limitBits > MAX_LIMIT_BITS)
    throw new UsageError(`limitBits must be from 8 to ${MAX_LIMIT_BITS}`);
  const engine = to <= KERNEL_LIMIT ? "kernel" : "bigint";
  if (engine === "bigint" && to - from > MAX_BIGINT_NUMBERS)
    throw new LimitError(
      `numbers at or above 2^${KERNEL_N_BITS} are verified in BigInt, one by one: at most ${MAX_BIGINT_NUMBERS} numbers a run, got ${to - from}`,
    );
  const delay = req.delay === true;
  const blockTarget = req.blocks ?? null;
  if (blockTarget !== null && (!Number.isInteger(blockTarget) || blockTarget < 1))
    throw new UsageError("blocks must be a positive whole number");
  const key = `${map.name}|${from}|${to}|${sieveDepth}|${stepDepth}|${maxSteps}|${limitBits}${delay ? "|delay" : ""}${blockTarget === null ? "" : `|blocks ${blockTarget}`}${method === "classes" ? `|classes${preimage ? "+preimage" : ""}` : ""}${skipReached ? "|skip-reached" : ""}`;
  const blocks: BlockSpec[] = [];
  const push = (kind: BlockSpec["kind"], first: bigint, last: bigint, h0 = 0n, periods = 0n, below = 0n, rootDepth = 0) =>
    blocks.push({ index: blocks.length, kind, first, last, h0, periods, rootDepth, below });
  // the plan, with the blocks pushed so far
  const planned = (): VerifyPlan => {
    const params: Omit<VerifyPlan, "blockTarget" | "key" | "blocks"> = {
      map,
      from,
      to,
      sieveDepth,
      stepDepth,
      maxSteps,
      limitBits,
      engine,
      delay,
      method,
      preimage,
      skipReached,
    };
    return { ...params, blockTarget, key, blocks };
  };
  const chunks = (kind: "range" | "delay", first: bigint, end: bigint, size: bigint) => {
    for (let s = first; s < end; s += size) push(kind, s, s + size < end ? s + size - 1n : end - 1n);
  };
  if (engine === "bigint") {
    chunks("range", from, to, BIGINT_BLOCK);
    if (delay) chunks("delay", from, to, BIGINT_BLOCK);
    return planned();
  }
  if (method === "classes") {
    const D = Math.min(sieveDepth, ROOT_DEPTH);
    const roots = 1n << BigInt(D);
    const target = BigInt(Math.max(1, blockTarget ?? Math.max(16, Math.min(4096, Number((to - from) >> 26n)))));
    const per = (roots + target - 1n) / target;
    for (let c = 0n; c < roots; c += per) {
      const last = c + per <= roots ? c + per - 1n : roots - 1n;
      push("classes", c, last, 0n, 1n << BigInt(sieveDepth - D), belowFrom(from, D, c, last), D);
    }
    if (delay) chunks("delay", from, to, RANGE_BLOCK);
    return planned();
  }
  const period = 1n << BigInt(sieveDepth);
  // aligned periods: [hA 2^K, hB 2^K), all below 2^127
  const hA = (from + period - 1n) / period;
  const hB = to / period;
  if (hB <= hA) chunks("range", from, to, RANGE_BLOCK);
  else {
    if (from < hA * period) chunks("range", from, hA * period, RANGE_BLOCK);
    const periods = hB - hA;
    const target = BigInt(Math.max(1, blockTarget ?? Math.max(16, Math.min(4096, Number((periods * period) >> 26n)))));
    const per = (periods + target - 1n) / target;
    for (let h = hA; h < hB; h += per) {
      const count = h + per <= hB ? per : hB - h;
      push("aligned", h * period, (h + count) * period - 1n, h, count);
    }
    if (hB * period < to) chunks("range", hB * period, to, RANGE_BLOCK);
  }
  if (delay) chunks("delay", from, to, RANGE_BLOCK);
  return planned();
}
