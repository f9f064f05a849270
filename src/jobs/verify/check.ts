// `verify --check`: what a certificate states, re-derived. The digests (document and block entries),
// the block table against the plan, every global field against the merge of the block table, the
// sieved counts by depth against the sieve itself restricted to the range, the tables rebuilt and
// hashed, every listed number iterated again in BigInt, and a random sample of whole blocks (or all
// of them) run again and compared with their entries. It stops at the first field that differs.
import type { CollatzMap } from "../../core/map.js";
import { dropDepths } from "../../core/map.js";
import { exactCounts } from "../../core/exact.js";
import type { KernelPool } from "../../engine/pool.js";
import { toExactJson } from "../../core/json.js";
import { digestOf, entryJson, tableHashes, verifyFindings } from "./certificate.js";
import type { ReadCertificate } from "./certificate.js";
import { entryMismatch, mergeVerify } from "./merge.js";
import type { VerifyCounts } from "./merge.js";
import { planVerify } from "./plan.js";
import type { VerifyPlan } from "./plan.js";
import { verifyTables } from "./tables.js";
import { cycleBudget, cycleEntry, traceBig } from "./trace.js";
import { delayBig } from "../../core/padic.js";
import { runBlocks } from "./verify.js";

/** What a check did, line by line, and the first difference found (null: the certificate holds). */
export interface CheckReport {
  readonly checked: string[];
  readonly failure: string | null;
}

export interface CheckOptions {
  readonly pool: KernelPool;
  readonly sha256: (bytes: Uint8Array) => string | Promise<string>;
  /** Blocks to run again, chosen at random (all of them with `full`). */
  readonly sample: number;
  readonly full?: boolean;
  /** A random integer in [0, n) (the platform's crypto). */
  readonly randomBelow: (n: number) => number;
}

/** Thrown inside the check at the first difference: the line that names it. */
class Differs extends Error {}

const show = (v: unknown) => {
  const t = v === undefined ? "nothing" : toExactJson(v);
  return t.length > 120 ? `${t.slice(0, 117)}...` : t;
};

/** The first path at which two JSON values differ, with both values shown, or null. */
export function firstDifference(stated: unknown, derived: unknown, path: string): { path: string; stated: string; derived: string } | null {
  if (toExactJson(stated) === toExactJson(derived)) return null;
  const isObj = (v: unknown) => v !== null && typeof v === "object";
  if (Array.isArray(stated) && Array.isArray(derived)) {
    for (let i = 0; i < Math.min(stated.length, derived.length); i++) {
      const d = firstDifference(stated[i], derived[i], `${path}[${i}]`);
      if (d) return d;
    }
    return { path, stated: `${stated.length} entries`, derived: `${derived.length} entries` };
  }
  if (isObj(stated) && isObj(derived) && !Array.isArray(stated) && !Array.isArray(derived)) {
    const keys = new Set([...Object.keys(stated as object), ...Object.keys(derived as object)]);
    for (const k of keys) {
      const d = firstDifference((stated as Record<string, unknown>)[k], (derived as Record<string, unknown>)[k], path ? `${path}.${k}` : k);
      if (d) return d;
    }
  }
  return { path, stated: show(stated), derived: show(derived) };
}

function expectSame(stated: unknown, derived: unknown, path: string, source: string): void {
  const d = firstDifference(stated, derived, path);
  if (d) throw new Differs(`${d.path}: ${d.stated} in the certificate; ${source} gives ${d.derived}`);
}

/**
 * n cut by the depth-K sieve at each depth j in [from, to), its exceptions left out, derived from the
 * exact counter (whole periods: each class mod 2^j stopping at j is 2^(K-j) classes mod 2^K) and,
 * for the partial periods at the ends, each n's residue walked through its first K parities.
 */
export function sievedInRange(
  map: CollatzMap,
  K: number,
  from: bigint,
  to: bigint,
  exceptions: { n: bigint; classDepth: number }[],
): bigint[] {
  const out = new Array<bigint>(K + 1).fill(0n);
  const period = 1n << BigInt(K);
  const hA = (from + period - 1n) / period;
  const hB = to / period;
  const partial: [bigint, bigint][] = [];
  if (hB > hA) {
    const stopped = exactCounts(map, K).levels.map((l) => l.stopped);
    for (let j = 1; j <= K; j++) out[j]! += (hB - hA) * stopped[j]! * (1n << BigInt(K - j));
    if (from < hA * period) partial.push([from, hA * period]);
    if (hB * period < to) partial.push([hB * period, to]);
  } else partial.push([from, to]);
  const drop = dropDepths(map.q, K);
  const mask = Number(period - 1n);
  for (const [lo, hi] of partial) {
    const start = Number(lo & (period - 1n));
    const count = Number(hi - lo);
    for (let i = 0; i < count; i++) {
      // v holds the trajectory mod 2^(K - s) after s steps: enough for the parities up to step K
      let v = (start + i) & mask;
      let m = 0;
      for (let s = 1; s <= K; s++) {
        const mod = 2 ** (K - s + 1);
        if (v % 2 === 1) {
          v = ((((map.q * v + map.r) % mod) + mod) % mod) / 2;
          m++;
        } else v /= 2;
        if (s >= drop[m]!) {
          out[s]!++;
          break;
        }
      }
    }
  }
  for (const e of exceptions) if (e.n >= from && e.n < to) out[e.classDepth]!--;
  return out;
}

/**
 * A run by classes against the exact counter: at each depth j at most the members below 2^N of the
 * classes cut at j (each 2^(N - j) numbers, 0 among them at depth 1); the members not counted there
 * were iterated one by one (exceptions, cycle members and the like), and the leaves (checked and
 * skipped) are at most the depth-N survivors, the missing ones also iterated one by one.
 */
function classCounts(plan: VerifyPlan, c: VerifyCounts): void {
  const N = plan.sieveDepth;
  const levels = exactCounts(plan.map, N).levels;
  let cut = 0n;
  for (let j = 1; j <= N; j++) {
    const members = levels[j]!.stopped * (1n << BigInt(N - j)) - (j === 1 ? 1n : 0n);
    if (c.sievedByDepth[j]! > members)
      throw new Differs(
        `counts.sievedByDepth at depth ${j}: ${c.sievedByDepth[j]} in the certificate; the exact counter's classes hold ${members}`,
      );
    cut += members;
  }
  const others = c.exceptions + c.cycleMembers + c.cycleEntrants + c.unresolved;
  const leaves = levels[N]!.survivors;
  // (the numbers below FROM are left out, in cut classes and leaves alike)
  const missing = cut - c.sieved + (leaves - c.checked - c.preimage) - (plan.from - 1n);
  if (c.checked + c.preimage > leaves || missing !== others)
    throw new Differs(
      `counts: ${c.checked} checked and ${c.preimage} skipped of ${leaves} survivors at depth ${N}, ${others} iterated one by one; the exact counter leaves ${missing} for those`,
    );
}

/** Every number the certificate lists, iterated again in BigInt: how many. */
function iterateListed(plan: VerifyPlan, doc: ReturnType<typeof verifyFindings>): number {
  const { map, maxSteps } = plan;
  const inRange = (n: bigint) => n >= plan.from && n < plan.to;
  let count = 0;
  const fail = (what: string) => {
    throw new Differs(what);
  };
  for (const [i, g] of doc.glideRecords.entries()) {
    count++;
    const t = traceBig(map, g.n, maxSteps, 0);
    if (!inRange(g.n)) fail(`glideRecords[${i}].n: ${g.n} is outside the range [${plan.from}, ${plan.to})`);
    if (t.outcome !== "descent" || t.steps !== g.steps || t.steps + t.odd !== g.standardSteps)
      fail(
        `glideRecords[${i}] (n = ${g.n}): ${g.standardSteps} standard steps (${g.steps} of T) in the certificate; BigInt iteration gives ${t.outcome === "descent" ? `${t.steps + t.odd} (${t.steps} of T)` : t.outcome}`,
      );
  }
  for (const [i, p] of doc.pathRecords.entries()) {
    count++;
    const t = traceBig(map, p.n, maxSteps, 0);
    if (!inRange(p.n)) fail(`pathRecords[${i}].n: ${p.n} is outside the range [${plan.from}, ${plan.to})`);
    const peak = t.outcome === "cycle" ? p.n : t.path;
    if (t.outcome === "unresolved" || peak !== p.peakT)
      fail(
        `pathRecords[${i}].peakT (n = ${p.n}): ${p.peakT} in the certificate; BigInt iteration gives ${t.outcome === "unresolved" ? "no descent" : peak}`,
      );
  }
  for (const [i, m] of doc.cycleMembers.entries()) {
    count++;
    const c = cycleEntry(map, m.n, cycleBudget(maxSteps));
    if (!inRange(m.n) || c?.min !== m.n || c.period !== m.period)
      fail(
        `cycleMembers[${i}] (n = ${m.n}, period ${m.period}): BigInt iteration ${c ? `finds the cycle of ${c.min}, period ${c.period}` : "finds no cycle"}`,
      );
  }
  for (const [i, e] of doc.cycleEntrants.entries()) {
    count++;
    const c = cycleEntry(map, e.n, cycleBudget(maxSteps));
    if (!inRange(e.n) || c?.min !== e.cycleMin || c.period !== e.period || traceBig(map, e.n, maxSteps, 0).outcome !== "unresolved")
      fail(`cycleEntrants[${i}] (n = ${e.n}): BigInt iteration does not show it entering the cycle of ${e.cycleMin}`);
  }
  for (const [i, n] of doc.unresolved.entries()) {
    count++;
    if (!inRange(n) || traceBig(map, n, maxSteps, 0).outcome !== "unresolved")
      fail(`unresolved[${i}]: ${n} resolves within ${maxSteps} steps`);
  }
  for (const [i, g] of (doc.delay?.records ?? []).entries()) {
    count++;
    const d = delayBig(map, g.n, maxSteps);
    if (!inRange(g.n) || d === null || d.steps !== g.steps || d.steps + d.odd !== g.standardSteps)
      fail(
        `delay.records[${i}] (n = ${g.n}): ${g.standardSteps} standard steps in the certificate; BigInt iteration gives ${d ? d.steps + d.odd : "no arrival at 1"}`,
      );
  }
  return count;
}

/**
 * Checks a certificate read by readCertificate.
 * @example const report = await checkCertificate(readCertificate(text), { pool, sha256, sample: 8, randomBelow });
 */
export async function checkCertificate(c: ReadCertificate, o: CheckOptions): Promise<CheckReport> {
  const checked: string[] = [];
  try {
    const { digest, ...body } = c.document;
    const docDigest = await digestOf(body);
    if (digest !== docDigest)
      throw new Differs(
        `digest: ${String(digest)} in the certificate; its content gives ${docDigest} (it was changed after it was written)`,
      );
    checked.push("the digest over the whole document");
    const plan = planVerify(c.request);
    expectSame(c.document.q, BigInt(plan.map.q), "q", `the map ${plan.map.name}`);
    expectSame(c.document.r, BigInt(plan.map.r), "r", `the map ${plan.map.name}`);
    expectSame(c.engine, plan.engine, "engine", "the plan");
    const bad = entryMismatch(plan.blocks, c.entries);
    if (bad) throw new Differs(`blockTable: ${bad}`);
    for (const [i, e] of c.entries.entries()) {
      const d = await digestOf(entryJson(e));
      if (d !== c.entryDigests[i])
        throw new Differs(`blockTable[${i}].digest: ${c.entryDigests[i]} in the certificate; the entry gives ${d} (the entry was changed)`);
      if (e.counts.sievedByDepth.length !== plan.sieveDepth + 1)
        throw new Differs(
          `blockTable[${i}].counts.sievedByDepth has ${e.counts.sievedByDepth.length} entries, depths 0 to ${plan.sieveDepth} expected`,
        );
    }
    checked.push(
      `the block table: ${c.entries.length} blocks, the plan's ranges, each entry's digest, each entry's counts adding up to its size`,
    );
    const merged = mergeVerify(plan, c.entries, 0);
    const derived = verifyFindings(merged);
    for (const [key, value] of Object.entries(derived)) expectSame(c.document[key], value, key, "the block table");
    checked.push(
      "counts, sieved counts by depth, maxima, glide and path records, cycle members and entrants, unresolved numbers, delays: each re-derived from the block table",
    );
    // the run's tables, rebuilt once: hashed here, and the blocks below run again on them
    const data = plan.engine === "kernel" ? await verifyTables(o.pool, plan) : null;
    if (data) {
      const hashes = await tableHashes(data, o.sha256);
      expectSame(c.tables, hashes, "tables", "the rebuilt tables");
      checked.push(
        plan.method === "classes"
          ? `the step table (${hashes.steps.rows} rows) rebuilt: hash and rows equal (a run by classes has no sieve table)`
          : `the sieve table (${hashes.sieve.rows} rows) and the step table (${hashes.steps.rows} rows) rebuilt: hashes and rows equal`,
      );
      if (plan.method === "classes") {
        classCounts(plan, merged.counts);
        checked.push(
          `the counts by depth: within the exact counter's classes cut at each depth (times their members below 2^${plan.sieveDepth}), the rest iterated one by one; the leaves within its depth-${plan.sieveDepth} survivors`,
        );
      } else {
        const sieved = sievedInRange(plan.map, plan.sieveDepth, plan.from, plan.to, data.exceptions);
        expectSame(
          merged.counts.sievedByDepth,
          sieved,
          "counts.sievedByDepth",
          `the depth-${plan.sieveDepth} sieve restricted to the range`,
        );
        checked.push(
          `the sieved counts by depth: equal to the depth-${plan.sieveDepth} sieve restricted to the range, less its exceptions`,
        );
      }
    }
    const listed = iterateListed(plan, derived);
    checked.push(
      `${listed} listed numbers (records, cycle members and entrants, unresolved, delay records) iterated again in BigInt: they agree`,
    );
    const n = plan.blocks.length;
    const pick = new Set<number>();
    if (o.full) for (let i = 0; i < n; i++) pick.add(i);
    else while (pick.size < Math.min(o.sample, n)) pick.add(o.randomBelow(n));
    const chosen = [...pick].sort((u, v) => u - v);
    if (chosen.length > 0) {
      const rerun = await runBlocks(
        o.pool,
        plan,
        data,
        chosen.map((i) => plan.blocks[i]!),
      );
      for (const e of rerun) expectSame(entryJson(c.entries[e.index]!), entryJson(e), `blockTable[${e.index}]`, "running the block again");
      const named = chosen.length <= 12 ? ` (${chosen.join(", ")})` : "";
      checked.push(`${chosen.length} of ${n} blocks run again${o.full ? "" : " at random"}${named}: equal to their entries`);
    } else checked.push(`no block run again (--sample 0)`);
    return { checked, failure: null };
  } catch (e) {
    if (e instanceof Differs) return { checked, failure: e.message };
    throw e;
  }
}
