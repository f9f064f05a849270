// The tables of a verification run, built once on the pool: the depth-K sieve's survivors (sorted),
// its exceptions, the step table of depth KS, and the bounds the kernel's shortcuts rely on.
import { LimitError } from "../../core/errors.js";
import { exactCounts } from "../../core/exact.js";
import type { CollatzMap } from "../../core/map.js";
import { dropDepth, stoppingOdds } from "../../core/map.js";
import type { VerifyTables } from "./messages.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { ResidueSorter } from "../sieve/sort.js";
import { expandExceptions } from "../sieve/exceptions.js";
import { runSieve } from "../sieve/sieve.js";
import { stepTable, stepTableRaw } from "../steps.js";
import type { VerifyPlan } from "./plan.js";
import { traceBig } from "./trace.js";
import { coefficientStoppingTime } from "../../core/padic.js";
import type { ProbeChunk } from "./bounds.js";
import type { JobApi } from "../../engine/worker.js";
import type { boundsHandlers } from "./bounds.js";

/** Exceptions a run may carry (they are listed and iterated one by one). */
const MAX_EXCEPTIONS = 1n << 24n;
const TWO64 = 1n << 64n;

/**
 * ceil(r (q/2)^L), at most 2^64 - 1 (the kernel reads 2^64 - 1 as no bound); 0 when r < 0, where
 * every c_i of T^i(v) = (q^(m_i) v + c_i) / 2^i is at most 0.
 */
function slack(map: CollatzMap, L: number): bigint {
  if (map.r < 0) return 0n;
  const v = (BigInt(map.r) * BigInt(map.q) ** BigInt(L) + (1n << BigInt(L)) - 1n) >> BigInt(L);
  return v >= TWO64 ? TWO64 - 1n : v;
}

/** What the tables of a run are made of, for certificates: the raw bytes of each as its file would hold it. */
export interface VerifyTableData {
  readonly tables: VerifyTables;
  /** The sieve's survivors as little-endian u32 (as `glidepath sieve --out` writes them). */
  readonly sieveBytes: Uint8Array;
  /** The step table as `glidepath steps --out` writes it (odd_steps u8, padding, image u64). */
  readonly stepBytes: Uint8Array;
  /** The sieve's exceptions, ascending, with their class depths. */
  readonly exceptions: { readonly n: bigint; readonly classDepth: number }[];
  /** Classes mod 2^j stopping at j, j = 0..K (the exact counter). */
  readonly stoppedClasses: bigint[];
}

/**
 * Builds the sieve and step tables of a plan once (on the pool).
 * @example const data = await verifyTables(pool, planVerify({ map, from: 1n, to: 1000n }));
 */
export async function verifyTables(pool: KernelPool, plan: VerifyPlan, options: RunOptions = {}): Promise<VerifyTableData> {
  const { map, sieveDepth: K, stepDepth: KS } = plan;
  const levels = exactCounts(map, K).levels;
  if (plan.method === "classes") {
    // no sieve table: the classes are extended in the kernel; the step tables as for every run
    return tableData(plan, levels, await stepBytesOf(pool, map, KS, options), [], {
      residues: new Uint32Array(0),
      sievedGlide: 0,
      sievedPeak: 0,
      sievedSlack: 0n,
      classes: {
        from: plan.from,
        bounds: await pathBoundsOnPool(pool, map, K, plan.maxSteps, plan.from, options.signal),
        slacks: BigUint64Array.from({ length: K + 1 }, (_, j) => slack(map, j)),
        preimage: plan.preimage,
        glideCap: Math.min(2 * plan.maxSteps + 2, GLIDE_CAP),
      },
    });
  }
  const rows = levels[K]!.survivors;
  const sorter = new ResidueSorter(K, Math.min(K, 10), 0, 1 << Math.min(K, 10));
  const sieve = await runSieve(
    pool,
    { map, depth: K, mode: "survivors", onLeaves: (c) => sorter.add(c), residuesOnly: true, exceptionLimit: 0 },
    { signal: options.signal },
  );
  if (sieve.exceptionCount > MAX_EXCEPTIONS)
    throw new LimitError(
      `the depth-${K} sieve of ${map.name} has ${sieve.exceptionCount} exceptions, over the ${MAX_EXCEPTIONS} a run iterates: use another depth`,
    );
  const exceptions = expandExceptions(map, sieve.exceptionClasses, Number(sieve.exceptionCount)).list.map((e) => ({
    n: e.n,
    classDepth: e.classDepth,
  }));
  const early = earlyDescentBound(map, K);
  if (early > 0n) addEarlyDescents(plan, early, exceptions);
  const residues = new Uint32Array(Number(rows));
  let at = 0;
  for (const part of sorter.sorted()) {
    residues.set(part, at);
    at += part.length;
  }
  if (BigInt(at) !== rows) throw new Error(`internal error: ${at} survivors sorted, the exact counter says ${rows}`);
  const stepBytes = await stepBytesOf(pool, map, KS, options);
  // the deepest cut within K, and the most odd steps a class cut by K can have before its cut
  const odds = stoppingOdds(map.q, K);
  let sievedGlide = 0;
  odds.forEach((m, j) => {
    if (m !== null) sievedGlide = Math.max(sievedGlide, j + m);
  });
  let sievedPeak = 0;
  while (dropDepth(map.q, sievedPeak + 1) <= K) sievedPeak++;
  return tableData(plan, levels, stepBytes, exceptions, {
    residues,
    sievedGlide,
    sievedPeak,
    sievedSlack: slack(map, sievedPeak),
    classes: null,
  });
}

/** A run's tables from what its method builds, with the parts every run shares. */
function tableData(
  plan: VerifyPlan,
  levels: readonly { stopped: bigint }[],
  stepBytes: Uint8Array,
  exceptions: VerifyTableData["exceptions"],
  own: Pick<VerifyTables, "residues" | "sievedGlide" | "sievedPeak" | "sievedSlack" | "classes">,
): VerifyTableData {
  const { map, sieveDepth: K, stepDepth: KS } = plan;
  const tables: VerifyTables = {
    key: plan.key,
    q: map.q,
    r: map.r,
    depth: K,
    stepDepth: KS,
    ...own,
    survivorSlack: slack(map, K),
    slacks: BigUint64Array.from({ length: KS + 1 }, (_, d) => slack(map, d)),
    steps: stepBytes,
    stoppedClasses: BigUint64Array.from(levels, (l) => l.stopped),
  };
  const stoppedClasses = levels.map((l) => l.stopped);
  return { tables, sieveBytes: new Uint8Array(own.residues.buffer), stepBytes, exceptions, stoppedClasses };
}

/** The step table of depth KS as `glidepath steps --out` writes it. */
async function stepBytesOf(pool: KernelPool, map: CollatzMap, KS: number, options: RunOptions): Promise<Uint8Array> {
  const stepParts = stepTableRaw(await stepTable(pool, map, KS, { signal: options.signal }));
  const stepBytes = new Uint8Array(stepParts.reduce((s, p) => s + p.length, 0));
  let offset = 0;
  for (const part of stepParts) {
    stepBytes.set(part, offset);
    offset += part.length;
  }
  return stepBytes;
}

/** Standard glides a run by classes keeps one least n for (larger ones are sent as they come). */
const GLIDE_CAP = 1 << 16;
/** Every n of [FROM, FROM + 2^PROBE_BITS) is a probe of the path bounds, and 2^k - 1, 2^k - 3 above. */
const PROBE_BITS = 12;

/**
 * Lower bounds on the largest path of the numbers of [from, from + 2^(i-1)), band i = 0..N (n - from
 * in [2^(i-1), 2^i); band 0 is n = from), as (low, high) u64 pairs: the largest path (the highest
 * value before the number goes below itself; n itself on a cycle) of the probes there, each iterated
 * exactly in BigInt (a probe past the cap is left out). n is a path record of a run from FROM only if
 * its path beats its band's bound: the kernel iterates a number for its path only when a bound on it could.
 * @example pathBounds(parseMap("3x+1"), 8, 1000, 1n)[2 * 4] // 26n: the path of 7 (T: 7, 11, 17, 26, ...)
 */
export function pathBounds(map: CollatzMap, N: number, maxSteps: number, from: bigint): BigUint64Array {
  const probes = pathProbes(N, from);
  return boundsFromPaths(
    N,
    from,
    probes,
    probes.map((n) => probePath(map, n, maxSteps)),
  );
}

/**
 * The probes of pathBounds, ascending: every n of [from, from + 2^PROBE_BITS), then from + 2^t - 1
 * (2^t - 1 from 1: t odd steps up), those below from + 2^(N-1) (the bands' end) only.
 */
function pathProbes(N: number, from: bigint): bigint[] {
  const probes: bigint[] = [];
  const top = 1n << BigInt(N);
  for (let n = from; n < from + (1n << BigInt(PROBE_BITS)) && n < top; n++) probes.push(n);
  for (let t = 2; t < N; t++) {
    const p = (from === 1n ? 0n : from) + (1n << BigInt(t)) - 1n;
    if (p > probes.at(-1)! && p < top) probes.push(p);
  }
  const end = from + (1n << BigInt(Math.max(0, N - 1)));
  return probes.filter((n) => n < end);
}

/** A probe's path: the highest value before it goes below itself, n itself on a cycle, 0 past the cap. */
export function probePath(map: CollatzMap, n: bigint, maxSteps: number): bigint {
  const t = traceBig(map, n, maxSteps, 0);
  return t.outcome === "descent" ? t.path : t.outcome === "cycle" ? n : 0n;
}

/** The bounds of pathBounds from its probes' paths (in the probes' order). */
function boundsFromPaths(N: number, from: bigint, probes: readonly bigint[], paths: readonly bigint[]): BigUint64Array {
  const out = new BigUint64Array(2 * (N + 1));
  let best = 0n;
  let at = 0;
  for (let i = 1; i <= N; i++) {
    // the probes below from + 2^(i-1)
    for (; at < probes.length && probes[at]! < from + (1n << BigInt(i - 1)); at++) if (paths[at]! > best) best = paths[at]!;
    if (best >> 128n !== 0n) throw new Error("internal error: a path bound past 128 bits");
    out[2 * i] = BigInt.asUintN(64, best);
    out[2 * i + 1] = best >> 64n;
  }
  return out;
}

/**
 * pathBounds with its probes iterated in the pool's workers, a few chunks a worker: the same bounds,
 * and the host's thread (a page's main thread) stays free: a probe that does not descend costs the
 * whole step cap in BigInt (seconds a probe for 5x+1).
 */
async function pathBoundsOnPool(pool: KernelPool, map: CollatzMap, N: number, maxSteps: number, from: bigint, signal?: AbortSignal) {
  const probes = pathProbes(N, from);
  const size = Math.max(1, Math.ceil(probes.length / (8 * pool.size)));
  const chunks: ProbeChunk[] = [];
  for (let i = 0; i < probes.length; i += size) chunks.push({ first: i, q: map.q, r: map.r, maxSteps, probes: probes.slice(i, i + size) });
  const paths = new Array<bigint>(probes.length).fill(0n);
  await pool.run(
    chunks,
    (api: JobApi<typeof boundsHandlers>, c) => api.verifyProbePaths(c),
    (c, out) => {
      for (let j = 0; j < out.length; j++) paths[c.first + j] = out[j]!;
    },
    { signal },
  );
  return boundsFromPaths(N, from, probes, paths);
}

/** Most numbers below the early-descent bound that a run iterates here to list them. */
const MAX_EARLY = 1n << 22n;

/**
 * With r = -s < 0 a member of a class can go below n before the class's coefficient drops (for
 * r > 0 it cannot: every c_i is positive). Below this bound only: with C_u = q^(m_u) / 2^u > 1 for
 * every u <= i (the class not yet cut), T^i(n) = C_i (n - (s/2) sum over odd steps t of 1/C_(t+1))
 * > C_i (n - s m / 2), which is at least n once n >= C_i s m / (2 (C_i - 1)) = q^m s m / (2 (q^m - 2^i)).
 * The bound is the largest of these over 1 <= i < K, m <= i with q^m > 2^i, and at least s / (q - 1)
 * (from there on no step more than halves, which the table steps rely on). 0 when r > 0.
 * @example earlyDescentBound(parseMap("3x-1"), 26) // 447n
 */
export function earlyDescentBound(map: CollatzMap, K: number): bigint {
  if (map.r > 0) return 0n;
  const q = BigInt(map.q);
  const s = BigInt(-map.r);
  let bound = s / (q - 1n) + 1n;
  let qm = 1n;
  for (let m = 1; m < K; m++) {
    qm *= q;
    for (let i = m; i < K; i++) {
      const gap = qm - (1n << BigInt(i));
      if (gap <= 0n) break;
      const den = 2n * gap;
      const b = (qm * s * BigInt(m) + den - 1n) / den + 1n;
      if (b > bound) bound = b;
    }
  }
  return bound;
}

/**
 * Adds to the exceptions every n below the bound that is in a class cut within K but does not go
 * below itself exactly at the cut (it goes below earlier): a run iterates them one by one and counts
 * them as checked (their own trajectory never reaches the cut).
 */
function addEarlyDescents(plan: VerifyPlan, bound: bigint, exceptions: { n: bigint; classDepth: number }[]): void {
  const { map, sieveDepth: K, maxSteps } = plan;
  if (bound > MAX_EARLY)
    throw new LimitError(
      `${map.name} at sieve depth ${K}: members below ${bound} may go below themselves before their class is cut, over the ${MAX_EARLY} a run lists: use a smaller depth`,
    );
  const listed = new Set(exceptions.map((e) => e.n));
  for (let n = 1n; n < bound; n++) {
    // the depth at which n's class (its first K parities) is cut, whatever its trajectory does
    const cut = coefficientStoppingTime(map, n, K);
    if (cut === null || listed.has(n)) continue;
    const t = traceBig(map, n, maxSteps, K);
    if (t.outcome !== "descent" || t.steps !== cut) exceptions.push({ n, classDepth: cut });
  }
  exceptions.sort((u, v) => (u.n < v.n ? -1 : u.n > v.n ? 1 : 0));
}

/** Per block: what the BigInt side needs beyond the kernel (the exceptions in it and their depths). */
export function exceptionsIn(data: VerifyTableData, first: bigint, last: bigint) {
  const list = data.exceptions;
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (list[mid]!.n < first) lo = mid + 1;
    else hi = mid;
  }
  const out: { n: bigint; classDepth: number }[] = [];
  for (let i = lo; i < list.length && list[i]!.n <= last; i++) out.push(list[i]!);
  return out;
}
