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
import { digestOf, entryJson, globalFindings, paramsJson, tableHashes, verifyFindings } from "./certificate.js";
import type { ReadCertificate } from "./certificate.js";
import { entryMismatch, mergeVerify } from "./merge.js";
import type { VerifyCounts } from "./merge.js";
import { planVerify } from "./plan.js";
import type { VerifyPlan } from "./plan.js";
import { exceptionsIn, verifyTables } from "./tables.js";
import type { VerifyTableData } from "./tables.js";
import type { BlockEntry, CycleEntrant, CycleMember, GlideRecord, PathRecord } from "./block.js";
import { EXCEPTION_LIMIT } from "../sieve/exceptions.js";
import { cycleBudget, cycleEntry, traceBig } from "./trace.js";
import { delayBig } from "../../core/padic.js";
import { runBlocks } from "./verify.js";
import { knownMismatch } from "./known.js";
import { isSurvivor, skippedAt, skippedIn, sliceSkip } from "./skip.js";
import type { VerifyResult } from "./merge.js";

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
  // (a key on one side only: JSON has no text for undefined)
  if (stated === undefined || derived === undefined)
    return stated === derived ? null : { path, stated: show(stated), derived: show(derived) };
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
 * for the partial periods at the ends, either each n's residue walked through its first K parities
 * or (when that is more work) the classes walked once, each cut class counting its members there.
 * `how` forces one of the two (the tests compare both with a brute force).
 */
export function sievedInRange(
  map: CollatzMap,
  K: number,
  from: bigint,
  to: bigint,
  exceptions: { n: bigint; classDepth: number }[],
  how?: "each" | "walk",
): bigint[] {
  const out = new Array<bigint>(K + 1).fill(0n);
  const period = 1n << BigInt(K);
  const hA = (from + period - 1n) / period;
  const hB = to / period;
  const partial: [bigint, bigint][] = [];
  const levels = exactCounts(map, K).levels;
  if (hB > hA) {
    for (let j = 1; j <= K; j++) out[j]! += (hB - hA) * levels[j]!.stopped * (1n << BigInt(K - j));
    if (from < hA * period) partial.push([from, hA * period]);
    if (hB * period < to) partial.push([hB * period, to]);
  } else partial.push([from, to]);
  // each partial piece as residue ranges [s, e) within one period (a piece over a period's end is two)
  const ranges: [number, number][] = [];
  for (const [lo, hi] of partial) {
    const s = Number(lo & (period - 1n));
    const e = s + Number(hi - lo);
    if (e <= Number(period)) ranges.push([s, e]);
    else ranges.push([s, Number(period)], [0, e - Number(period)]);
  }
  const drop = dropDepths(map.q, K);
  const numbers = ranges.reduce((t, [s, e]) => t + (e - s), 0);
  const classes = levels.slice(0, K).reduce((t, l) => t + Number(l.survivors), 0);
  const cut = (how ?? (2 * classes < numbers * (K / 2) ? "walk" : "each")) === "walk" ? cutCountsByWalk : cutCountsEach;
  cut(map, K, drop, ranges).forEach((c, j) => {
    out[j]! += BigInt(c);
  });
  for (const e of exceptions) if (e.n >= from && e.n < to) out[e.classDepth]!--;
  return out;
}

/** As cutCountsByWalk, each residue of the ranges walked through its first K parities (mod 2^(K - s) after s steps). */
function cutCountsEach(map: CollatzMap, K: number, drop: readonly number[], ranges: readonly [number, number][]): number[] {
  const out = new Array<number>(K + 1).fill(0);
  for (const [s0, e0] of ranges) {
    for (let x = s0; x < e0; x++) {
      let v = x;
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
  return out;
}

/**
 * Numbers of residue ranges [s, e) within [0, 2^K) whose class is cut at depth j (j = 1..K): the
 * classes walked depth first (each alive class a mod 2^j keeps T^j(a + 2^j x) = q^m x + b mod 2^K,
 * the low K - j bits of which fix its next parities), and each class cut at depth j adds the count of
 * its members x = a (mod 2^j) in every range. Work in proportion to the classes alive above depth K.
 */
function cutCountsByWalk(map: CollatzMap, K: number, drop: readonly number[], ranges: readonly [number, number][]): number[] {
  const out = new Array<number>(K + 1).fill(0);
  const M = 2 ** K;
  const { q, r } = map;
  const members = (a: number, P: number) => {
    let c = 0;
    for (const [s, e] of ranges) c += (e > a ? Math.floor((e - a - 1) / P) + 1 : 0) - (s > a ? Math.floor((s - a - 1) / P) + 1 : 0);
    return c;
  };
  const walk = (a: number, j: number, m: number, b: number, qm: number): void => {
    const P = 2 ** j;
    for (let bit = 0; bit <= 1; bit++) {
      const child = a + bit * P;
      const c = (qm * bit + b) % M;
      let nb: number;
      let nm = m;
      let nqm = qm;
      if (c % 2 === 0) nb = c / 2;
      else {
        nb = ((((q * c + r) % M) + M) % M) / 2;
        nm++;
        nqm = (qm * q) % M;
      }
      if (j + 1 >= drop[nm]!) out[j + 1]! += members(child, 2 * P);
      else if (j + 1 < K) walk(child, j + 1, nm, nb, nqm);
    }
  };
  walk(0, 0, 0, 0, 1);
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

/** The lists a certificate or one of its block entries states, iterated again by iterateListed. */
interface Listed {
  readonly glideRecords: readonly GlideRecord[];
  readonly pathRecords: readonly PathRecord[];
  readonly cycleMembers: readonly CycleMember[];
  readonly cycleEntrants: readonly CycleEntrant[];
  readonly unresolved: readonly bigint[];
  readonly delay: { readonly records: readonly GlideRecord[]; readonly unreachedList: readonly bigint[] } | null;
}

/**
 * Every number of the lists, iterated again in BigInt (each n once per kind of list: `seen` keeps
 * those done), each also within `inRange`: how many were iterated. Fields are named with `at`
 * before them ("" for the certificate's own lists, "blockTable[i]." for an entry's).
 */
function iterateListed(plan: VerifyPlan, doc: Listed, at: string, inRange: (n: bigint) => boolean, seen: Set<string>): number {
  const { map, maxSteps } = plan;
  const where = `[${plan.from}, ${plan.to})`;
  let count = 0;
  const fail = (what: string) => {
    throw new Differs(`${at}${what}`);
  };
  const fresh = (kind: string, n: bigint) => {
    const k = `${kind} ${n}`;
    if (seen.has(k)) return false;
    seen.add(k);
    count++;
    return true;
  };
  for (const [i, g] of doc.glideRecords.entries()) {
    if (!inRange(g.n)) fail(`glideRecords[${i}].n: ${g.n} is outside the range ${where}`);
    if (!fresh(`glide ${g.steps} ${g.standardSteps}`, g.n)) continue;
    const t = traceBig(map, g.n, maxSteps, 0);
    if (t.outcome !== "descent" || t.steps !== g.steps || t.steps + t.odd !== g.standardSteps)
      fail(
        `glideRecords[${i}] (n = ${g.n}): ${g.standardSteps} standard steps (${g.steps} of T) in the certificate; BigInt iteration gives ${t.outcome === "descent" ? `${t.steps + t.odd} (${t.steps} of T)` : t.outcome}`,
      );
  }
  for (const [i, p] of doc.pathRecords.entries()) {
    if (!inRange(p.n)) fail(`pathRecords[${i}].n: ${p.n} is outside the range ${where}`);
    if (!fresh(`path ${p.peakT}`, p.n)) continue;
    const t = traceBig(map, p.n, maxSteps, 0);
    const peak = t.outcome === "cycle" ? p.n : t.path;
    if (t.outcome === "unresolved" || peak !== p.peakT)
      fail(
        `pathRecords[${i}].peakT (n = ${p.n}): ${p.peakT} in the certificate; BigInt iteration gives ${t.outcome === "unresolved" ? "no descent" : peak}`,
      );
  }
  for (const [i, m] of doc.cycleMembers.entries()) {
    if (!inRange(m.n)) fail(`cycleMembers[${i}].n: ${m.n} is outside the range ${where}`);
    if (!fresh(`member ${m.period}`, m.n)) continue;
    const c = cycleEntry(map, m.n, cycleBudget(maxSteps));
    if (c?.min !== m.n || c.period !== m.period)
      fail(
        `cycleMembers[${i}] (n = ${m.n}, period ${m.period}): BigInt iteration ${c ? `finds the cycle of ${c.min}, period ${c.period}` : "finds no cycle"}`,
      );
  }
  for (const [i, e] of doc.cycleEntrants.entries()) {
    if (!inRange(e.n)) fail(`cycleEntrants[${i}].n: ${e.n} is outside the range ${where}`);
    if (!fresh(`entrant ${e.cycleMin} ${e.period}`, e.n)) continue;
    const c = cycleEntry(map, e.n, cycleBudget(maxSteps));
    if (c?.min !== e.cycleMin || c.period !== e.period || traceBig(map, e.n, maxSteps, 0).outcome !== "unresolved")
      fail(`cycleEntrants[${i}] (n = ${e.n}): BigInt iteration does not show it entering the cycle of ${e.cycleMin}, period ${e.period}`);
  }
  for (const [i, n] of doc.unresolved.entries()) {
    if (!inRange(n)) fail(`unresolved[${i}]: ${n} is outside the range ${where}`);
    if (fresh("unresolved", n) && traceBig(map, n, maxSteps, 0).outcome !== "unresolved")
      fail(`unresolved[${i}]: ${n} resolves within ${maxSteps} steps`);
  }
  for (const [i, g] of (doc.delay?.records ?? []).entries()) {
    if (!inRange(g.n)) fail(`delay.records[${i}].n: ${g.n} is outside the range ${where}`);
    if (!fresh(`delay ${g.steps} ${g.standardSteps}`, g.n)) continue;
    const d = delayBig(map, g.n, maxSteps);
    if (d === null || d.steps !== g.steps || d.steps + d.odd !== g.standardSteps)
      fail(
        `delay.records[${i}] (n = ${g.n}): ${g.standardSteps} standard steps (${g.steps} of T) in the certificate; BigInt iteration gives ${d ? `${d.steps + d.odd} (${d.steps} of T)` : "no arrival at 1"}`,
      );
  }
  for (const [i, n] of (doc.delay?.unreachedList ?? []).entries()) {
    if (!inRange(n)) fail(`delay.unreachedList[${i}]: ${n} is outside the range ${where}`);
    if (fresh("unreached", n) && delayBig(map, n, maxSteps) !== null)
      fail(`delay.unreachedList[${i}]: ${n} reaches 1 within ${maxSteps} steps`);
  }
  return count;
}

/** The most entries a capped list of a block holds for a count (core/smallest.ts keeps the smallest EXCEPTION_LIMIT). */
const capped = (count: bigint) => (count < BigInt(EXCEPTION_LIMIT) ? count : BigInt(EXCEPTION_LIMIT));

/**
 * One block entry against itself and its block: each list ascending in n and as long as its count
 * says (capped lists: the smallest EXCEPTION_LIMIT), each record list a run of records (each value
 * beats the one before), the preimage skip only where the plan has it, and (aligned blocks) the
 * sieved counts by depth from the exact counter's stopped classes less the block's exceptions.
 */
function entryChecks(plan: VerifyPlan, data: VerifyTableData | null, e: BlockEntry, i: number): void {
  const at = `blockTable[${i}]`;
  const ascending = (xs: readonly bigint[], what: string) => {
    for (let k = 1; k < xs.length; k++)
      if (xs[k]! <= xs[k - 1]!) throw new Differs(`${at}.${what}[${k}]: ${xs[k]} does not follow ${xs[k - 1]} in ascending order`);
  };
  const length = (xs: readonly unknown[], want: bigint, what: string) => {
    if (BigInt(xs.length) !== want) throw new Differs(`${at}.${what}: ${xs.length} entries in the certificate; its count gives ${want}`);
  };
  const runOfRecords = <T extends { n: bigint }>(xs: readonly T[], value: (x: T) => number | bigint, what: string) => {
    ascending(
      xs.map((x) => x.n),
      what,
    );
    for (let k = 1; k < xs.length; k++)
      if (value(xs[k]!) <= value(xs[k - 1]!)) throw new Differs(`${at}.${what}[${k}]: its value does not beat the record before it`);
  };
  runOfRecords(e.glideRecords, (g) => g.standardSteps, "glideRecords");
  runOfRecords(e.pathRecords, (p) => p.peakT, "pathRecords");
  ascending(
    e.cycleMembers.map((m) => m.n),
    "cycleMembers",
  );
  ascending(
    e.cycleEntrants.map((m) => m.n),
    "cycleEntrants",
  );
  ascending(e.unresolved, "unresolved");
  length(e.cycleMembers, e.counts.cycleMembers, "cycleMembers");
  length(e.cycleEntrants, capped(e.counts.cycleEntrants), "cycleEntrants");
  length(e.unresolved, capped(e.counts.unresolved), "unresolved");
  if (e.delay) {
    runOfRecords(e.delay.records, (g) => g.standardSteps, "delay.records");
    ascending(e.delay.unreachedList, "delay.unreachedList");
    length(e.delay.unreachedList, capped(e.delay.unreached), "delay.unreachedList");
  }
  if (!plan.preimage && !plan.skipReached && e.counts.preimage !== 0n)
    throw new Differs(`${at}.counts.preimage: ${e.counts.preimage} in the certificate; the plan has no preimage skip, so 0`);
  const b = plan.blocks[i]!;
  if (b.kind === "aligned" && data) {
    const K = plan.sieveDepth;
    const sieved = new Array<bigint>(K + 1).fill(0n);
    for (let j = 1; j <= K; j++) sieved[j] = b.periods * data.stoppedClasses[j]! * (1n << BigInt(K - j));
    for (const x of exceptionsIn(data, b.first, b.last)) sieved[x.classDepth]!--;
    expectSame(e.counts.sievedByDepth, sieved, `${at}.counts.sievedByDepth`, "the exact counter's classes less the block's exceptions");
  }
}

/**
 * The skip of slices (skipReached): each aligned and range block's skipped count against the survivors
 * of its span that a smaller number reaches (skip.ts: by residue mod q^2, one by one below skipFrom),
 * and no record the certificate lists (its own, each block's, the new ones among all n) at a skipped
 * survivor: such n was never iterated. A global record cannot be skipped (README: a number reached
 * from a smaller one is no new record), so one listed there is a false claim too.
 */
function checkSkip(plan: VerifyPlan, c: ReadCertificate, data: VerifyTableData): string {
  const s = sliceSkip(plan.map, plan.sieveDepth, data.tables.residues);
  for (const [i, e] of c.entries.entries()) {
    if (e.kind !== "aligned" && e.kind !== "range") continue;
    expectSame(
      e.counts.preimage,
      skippedIn(s, e.first, e.last),
      `blockTable[${i}].counts.preimage`,
      `the block's survivors a smaller number reaches`,
    );
  }
  const listed: [string, bigint][] = [
    ...c.findings.glideRecords.map((g, k) => [`glideRecords[${k}]`, g.n] as [string, bigint]),
    ...c.findings.pathRecords.map((p, k) => [`pathRecords[${k}]`, p.n] as [string, bigint]),
    ...(c.findings.maxGlide ? [["maxGlide", c.findings.maxGlide.n] as [string, bigint]] : []),
    ...(c.findings.maxPath ? [["maxPath", c.findings.maxPath.n] as [string, bigint]] : []),
    ...(c.globalRecords?.glideRecords ?? []).map((g, k) => [`globalRecords.glideRecords[${k}]`, g.n] as [string, bigint]),
    ...(c.globalRecords?.pathRecords ?? []).map((p, k) => [`globalRecords.pathRecords[${k}]`, p.n] as [string, bigint]),
    ...c.entries.flatMap((e, i) => [
      ...e.glideRecords.map((g, k) => [`blockTable[${i}].glideRecords[${k}]`, g.n] as [string, bigint]),
      ...e.pathRecords.map((p, k) => [`blockTable[${i}].pathRecords[${k}]`, p.n] as [string, bigint]),
    ]),
  ];
  for (const [what, n] of listed)
    if (isSurvivor(s, n) && skippedAt(s, n))
      throw new Differs(`${what}: ${n} is a survivor a smaller number reaches, skipped by the run: it cannot be a record it iterated`);
  return (
    `the skip of numbers a smaller number reaches: each block's skipped count equal to its survivors with a smaller number reaching them within three steps ` +
    `(by residue mod ${s.M}, from ${s.from} on; one by one below), and none of the ${listed.length} listed records at such a survivor`
  );
}

/** Whether n lies in block i of the plan (a block by classes: in the range and in one of its roots' classes mod 2^D). */
function inBlock(plan: VerifyPlan, i: number): (n: bigint) => boolean {
  const b = plan.blocks[i]!;
  if (b.kind !== "classes") return (n) => n >= b.first && n <= b.last;
  const mask = (1n << BigInt(b.rootDepth)) - 1n;
  return (n) => n >= plan.from && n < plan.to && (n & mask) >= b.first && (n & mask) <= b.last;
}

/**
 * What the random sample proved: s of n blocks run again, chosen uniformly without repeats, so one
 * altered block (whose change agrees with every other step) is missed with probability (n - s)/n.
 */
export function sampleLine(chosen: readonly number[], n: number, full: boolean): string {
  const named = chosen.length > 0 && chosen.length <= 12 ? ` (${chosen.join(", ")})` : "";
  if (full || chosen.length === n) return `all ${n} blocks run again${named}: equal to their entries`;
  const s = chosen.length;
  const missed = `${n - s}/${n} = ${((n - s) / n).toFixed(3)}`;
  return s === 0
    ? `no block run again (--sample 0): a single altered block escapes this check with probability 1 if its change agrees with the steps above; --full runs all`
    : `${s} of ${n} blocks run again at random${named}: equal to their entries; a single altered block escapes this check with probability ${missed}; --full runs all`;
}

/** Step 3: the block table against the plan's blocks, each entry's digest and its depth list's length. */
async function checkBlockTable(plan: VerifyPlan, c: ReadCertificate): Promise<string> {
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
  return `the block table: ${c.entries.length} blocks, the plan's ranges, each entry's digest, each entry's counts adding up to its size`;
}

/** Steps 6 and 7: the rebuilt tables' hashes, and the sieved counts by depth against the sieve (or the class counter). */
async function checkTables(plan: VerifyPlan, c: ReadCertificate, data: VerifyTableData | null, counts: VerifyCounts, o: CheckOptions) {
  if (!data) {
    expectSame(c.tables, null, "tables", "the BigInt engine (no tables)");
    return [];
  }
  const lines: string[] = [];
  const hashes = await tableHashes(data, o.sha256);
  expectSame(c.tables, hashes, "tables", "the rebuilt tables");
  lines.push(
    plan.method === "classes"
      ? `the step table (${hashes.steps.rows} rows) rebuilt: hash and rows equal (a run by classes has no sieve table)`
      : `the sieve table (${hashes.sieve.rows} rows) and the step table (${hashes.steps.rows} rows) rebuilt: hashes and rows equal`,
  );
  if (plan.method === "classes") {
    classCounts(plan, counts);
    lines.push(
      `the counts by depth: within the exact counter's classes cut at each depth (times their members below 2^${plan.sieveDepth}), the rest iterated one by one; the leaves within its depth-${plan.sieveDepth} survivors`,
    );
  } else {
    const sieved = sievedInRange(plan.map, plan.sieveDepth, plan.from, plan.to, data.exceptions);
    expectSame(counts.sievedByDepth, sieved, "counts.sievedByDepth", `the depth-${plan.sieveDepth} sieve restricted to the range`);
    lines.push(`the sieved counts by depth: equal to the depth-${plan.sieveDepth} sieve restricted to the range, less its exceptions`);
  }
  return lines;
}

/** Step 9: `--sample N` blocks chosen at random (all with --full) run again and compared with their entries. */
async function rerunSample(plan: VerifyPlan, c: ReadCertificate, data: VerifyTableData | null, o: CheckOptions): Promise<string> {
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
  }
  return sampleLine(chosen, n, o.full === true);
}

/**
 * Step 4 for the global records: the known values hold for the range's FROM, their n (where named)
 * have those values by BigInt iteration, and the new records are the range's records (re-derived
 * from the block table) that beat them. A line of what was checked, or null without known values.
 */
function checkGlobal(plan: VerifyPlan, c: ReadCertificate, merged: VerifyResult): string | null {
  const known = c.known;
  if (known === null) {
    expectSame(c.document.globalRecords, null, "globalRecords", "no known values (known: null)");
    return null;
  }
  expectSame(known.below, plan.from, "known.below", "the range's from");
  const wrong = knownMismatch(plan.map, known, "known");
  if (wrong) throw new Differs(wrong);
  const derived = globalFindings(merged, known).globalRecords!;
  expectSame(c.document.globalRecords, derived, "globalRecords", "the range's records above the known values");
  const g = derived.glideRecords.length;
  const p = derived.pathRecords.length;
  return (
    `the new records among all n (${g} glide, ${p} path): the range's records above the values assumed below ${plan.from} ` +
    `(glide ${known.glide.standardSteps} standard steps, path ${known.path.peakT}; ${known.source})` +
    `${known.glide.n !== null || known.path.n !== null ? ", their named n iterated again in BigInt" : ""}; that nothing below ${plan.from} beats those values is assumed, not checked`
  );
}

/**
 * Checks a certificate read by readCertificate, step by step (README: what `verify --check` proves).
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
    // (the method first: a changed method re-makes another plan, whose other parameters differ too)
    const { method, preimage, ...rest } = paramsJson(plan);
    for (const [key, value] of Object.entries({ method, preimage, ...rest })) expectSame(c.document[key], value, key, "the plan");
    expectSame(c.engine, plan.engine, "engine", "the plan");
    checked.push(
      `the parameters (map, range, depths, step cap, blocks, method, preimage skip${plan.skipReached ? ", the skip of numbers a smaller number reaches" : ""}, engine): those of the plan re-made from them`,
    );
    checked.push(await checkBlockTable(plan, c));
    const merged = mergeVerify(plan, c.entries, 0);
    for (const [key, value] of Object.entries(verifyFindings(merged)))
      expectSame((c.findings as Record<string, unknown>)[key], value, key, "the block table");
    checked.push(
      "counts, sieved counts by depth, maxima, glide and path records, cycle members and entrants, unresolved numbers, delays: each re-derived from the block table",
    );
    const global = checkGlobal(plan, c, merged);
    if (global) checked.push(global);
    // the run's tables, rebuilt once: hashed here, and the blocks below run again on them
    const data = plan.engine === "kernel" ? await verifyTables(o.pool, plan) : null;
    for (const [i, e] of c.entries.entries()) entryChecks(plan, data, e, i);
    checked.push(
      "each block entry: its lists ascending, within its block and as long as its counts say; its records each beating the one before; " +
        (plan.preimage || plan.skipReached ? "" : "no preimage skip (the plan has none); ") +
        "the sieved counts by depth of each aligned block from the exact counter",
    );
    checked.push(...(await checkTables(plan, c, data, merged.counts, o)));
    if (plan.skipReached && data) checked.push(checkSkip(plan, c, data));
    // (the certificate's own lists are those of the block table, re-derived above: each n is placed in its block below)
    const seen = new Set<string>();
    let listed = 0;
    for (const [i, e] of c.entries.entries()) listed += iterateListed(plan, e, `blockTable[${i}].`, inBlock(plan, i), seen);
    listed += iterateListed(plan, c.findings, "", () => true, seen);
    checked.push(
      `${listed} listed numbers (the records, cycle members and entrants, unresolved numbers and delays of the certificate and of each block) iterated again in BigInt: they agree`,
    );
    checked.push(await rerunSample(plan, c, data, o));
    return { checked, failure: null };
  } catch (e) {
    if (e instanceof Differs) return { checked, failure: e.message };
    throw e;
  }
}
