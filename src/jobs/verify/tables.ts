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

/** Exceptions a run may carry (they are listed and iterated one by one). */
const MAX_EXCEPTIONS = 1n << 24n;
const TWO64 = 1n << 64n;

/** ceil(r (q/2)^L), at most 2^64 - 1 (the kernel reads 2^64 - 1 as no bound). */
function slack(map: CollatzMap, L: number): bigint {
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
  const residues = new Uint32Array(Number(rows));
  let at = 0;
  for (const part of sorter.sorted()) {
    residues.set(part, at);
    at += part.length;
  }
  if (BigInt(at) !== rows) throw new Error(`internal error: ${at} survivors sorted, the exact counter says ${rows}`);
  const stepParts = stepTableRaw(await stepTable(pool, map, KS, { signal: options.signal }));
  const stepBytes = new Uint8Array(stepParts.reduce((s, p) => s + p.length, 0));
  let offset = 0;
  for (const part of stepParts) {
    stepBytes.set(part, offset);
    offset += part.length;
  }
  // the deepest cut within K, and the most odd steps a class cut by K can have before its cut
  const odds = stoppingOdds(map.q, K);
  let sievedGlide = 0;
  odds.forEach((m, j) => {
    if (m !== null) sievedGlide = Math.max(sievedGlide, j + m);
  });
  let sievedPeak = 0;
  while (dropDepth(map.q, sievedPeak + 1) <= K) sievedPeak++;
  const tables: VerifyTables = {
    key: plan.key,
    q: map.q,
    r: map.r,
    depth: K,
    stepDepth: KS,
    residues,
    sievedGlide,
    sievedPeak,
    sievedSlack: slack(map, sievedPeak),
    survivorSlack: slack(map, K),
    slacks: BigUint64Array.from({ length: KS + 1 }, (_, d) => slack(map, d)),
    stoppedClasses: BigUint64Array.from(levels, (l) => l.stopped),
  };
  return { tables, sieveBytes: new Uint8Array(residues.buffer), stepBytes, exceptions, stoppedClasses: levels.map((l) => l.stopped) };
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
