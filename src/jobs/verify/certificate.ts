// Certificates of verification runs, and checkpoints of runs in progress: plain JSON with exact
// integers, written by the CLI and the web app, read back by `verify --check` and `verify --resume`.
import { UsageError } from "../../core/errors.js";
import type { CollatzMap } from "../../core/map.js";
import { parseMap } from "../../core/map.js";
import type { VerifyBlockResult } from "../../engine/messages.js";
import { parseExactJson } from "../../outputs/json.js";
import { verifyCountsJson } from "../../outputs/summary.js";
import type { ToolStamp } from "../../outputs/manifest.js";
import { cycleEntry, traceBig } from "./verify.js";
import type { StoredBlock, VerifyRequest, VerifyResult, VerifyTableData } from "./verify.js";

export const CERTIFICATE_KIND = "glidepath verification certificate";
export const CHECKPOINT_KIND = "glidepath verification checkpoint";

/** The hashes of the tables a run used (sha256 of their raw files, as `sieve --out` and `steps --out` write them). */
export interface TableHashes {
  readonly sieve: { readonly rows: number; readonly sha256: string };
  readonly steps: { readonly rows: number; readonly sha256: string };
}

/**
 * The hashes a certificate carries for a run's tables, with the platform's sha256 (hex).
 * @example await tableHashes(data, (b) => createHash("sha256").update(b).digest("hex"))
 */
export async function tableHashes(data: VerifyTableData, sha256: (bytes: Uint8Array) => string | Promise<string>): Promise<TableHashes> {
  return {
    sieve: { rows: data.tables.residues.length, sha256: await sha256(data.sieveBytes) },
    steps: { rows: 2 ** data.tables.stepDepth, sha256: await sha256(data.stepBytes) },
  };
}

/**
 * The certificate of a finished run: what was checked, how, what was found, and by which build.
 * @example certificate(result, hashes, stamp, { started, finished, workers: 2 })
 */
export function certificate(
  r: VerifyResult,
  tables: TableHashes | null,
  tool: ToolStamp,
  run: { started: string; finished: string; workers: number },
) {
  return {
    kind: CERTIFICATE_KIND,
    map: r.map.name,
    q: r.map.q,
    r: r.map.r,
    from: r.from,
    to: r.to,
    sieveDepth: r.sieveDepth,
    stepDepth: r.stepDepth,
    maxSteps: r.maxSteps,
    engine: r.engine,
    tables,
    counts: verifyCountsJson(r),
    maxima: {
      glide: r.maxGlide && { n: r.maxGlide.n, standardSteps: r.maxGlide.standardSteps, steps: r.maxGlide.steps },
      path: r.maxPath && { n: r.maxPath.n, value: r.maxPath.value },
    },
    records: {
      glide: r.glideRecords.map((g) => ({ n: g.n, standardSteps: g.standardSteps, steps: g.steps })),
      path: r.pathRecords.map((p) => ({ n: p.n, value: p.value })),
    },
    cycleMembers: r.cycleMembers,
    cycleEntrants: r.cycleEntrants,
    unresolved: r.unresolvedList,
    delay: r.delay && {
      records: r.delay.records.map((g) => ({ n: g.n, standardSteps: g.standardSteps, steps: g.steps })),
      max: r.delay.max,
      unreached: r.delay.unreached,
      unreachedList: r.delay.unreachedList,
    },
    handoffs: r.handoffs,
    blocks: r.blocks,
    tool: { name: "glidepath", ...tool },
    started: run.started,
    finished: run.finished,
    workers: run.workers,
  };
}

export type Certificate = ReturnType<typeof certificate>;

/** A checkpoint: the request, its plan key, and every completed block's raw result. */
export function checkpoint(req: VerifyRequest, key: string, blocks: number, done: ReadonlyMap<number, StoredBlock>) {
  const arr = (x: BigUint64Array) => Array.from(x);
  return {
    kind: CHECKPOINT_KIND,
    key,
    request: {
      map: req.map.name,
      from: req.from,
      to: req.to,
      sieveDepth: req.sieveDepth,
      stepDepth: req.stepDepth,
      maxSteps: req.maxSteps,
      delay: req.delay === true,
    },
    blocks,
    done: [...done.values()]
      .sort((u, v) => u.index - v.index)
      .map((b) => ({
        index: b.index,
        visited: b.visited,
        counts: arr(b.counts),
        glideRecords: arr(b.glideRecords),
        pathRecords: arr(b.pathRecords),
        handoffs: arr(b.handoffs),
        cycleMembers: arr(b.cycleMembers),
        unresolved: arr(b.unresolved),
      })),
  };
}

/** Reads a checkpoint back: the request and the completed blocks. One clear line when it is not one. */
export function readCheckpoint(text: string): { request: VerifyRequest; key: string; blocks: number; done: Map<number, StoredBlock> } {
  let j: Record<string, unknown>;
  try {
    j = parseExactJson(text) as Record<string, unknown>;
  } catch {
    throw new UsageError("the checkpoint is not JSON");
  }
  if (j.kind !== CHECKPOINT_KIND) throw new UsageError(`not a glidepath verification checkpoint (kind: ${String(j.kind)})`);
  const req = j.request as {
    map: string;
    from: bigint;
    to: bigint;
    sieveDepth: bigint;
    stepDepth: bigint;
    maxSteps: bigint;
    delay?: boolean;
  };
  const u64 = (xs: unknown) => BigUint64Array.from(xs as bigint[]);
  const done = new Map<number, VerifyBlockResult>();
  for (const b of j.done as Record<string, unknown>[]) {
    const index = Number(b.index);
    done.set(index, {
      index,
      visited: b.visited as bigint,
      counts: u64(b.counts),
      glideRecords: u64(b.glideRecords),
      pathRecords: u64(b.pathRecords),
      handoffs: u64(b.handoffs),
      cycleMembers: u64(b.cycleMembers),
      unresolved: u64(b.unresolved),
    });
  }
  return {
    request: {
      map: parseMap(req.map),
      from: req.from,
      to: req.to,
      sieveDepth: Number(req.sieveDepth),
      stepDepth: Number(req.stepDepth),
      maxSteps: Number(req.maxSteps),
      delay: req.delay === true,
    },
    key: String(j.key),
    blocks: Number(j.blocks),
    done,
  };
}

/** What `verify --check` found: every finding, and whether the certificate holds. */
export interface CheckReport {
  readonly holds: boolean;
  readonly findings: string[];
  readonly sampled: number;
}

/** The parts of a certificate read back for checking (exact integers). */
export interface ReadCertificate {
  readonly map: CollatzMap;
  readonly from: bigint;
  readonly to: bigint;
  readonly sieveDepth: number;
  readonly stepDepth: number;
  readonly maxSteps: number;
  readonly tables: TableHashes | null;
  readonly counts: Record<string, bigint>;
  readonly sievedByDepth: { depth: number; count: bigint }[];
  readonly glideRecords: { n: bigint; standardSteps: number; steps: number }[];
  readonly pathRecords: { n: bigint; value: bigint }[];
  readonly maxGlide: { n: bigint; standardSteps: number } | null;
  readonly maxPath: { n: bigint; value: bigint } | null;
  readonly cycleMembers: { n: bigint; period: number }[];
  readonly cycleEntrants: { n: bigint; cycleMin: bigint; period: number }[];
  readonly unresolved: bigint[];
}

/** Parses a certificate file; one clear line when it is not one. */
export function readCertificate(text: string): ReadCertificate {
  let j: Record<string, unknown>;
  try {
    j = parseExactJson(text) as Record<string, unknown>;
  } catch {
    throw new UsageError("the certificate is not JSON");
  }
  if (j.kind === CHECKPOINT_KIND) throw new UsageError("this is a checkpoint, not a certificate: finish the run with --resume");
  if (j.kind !== CERTIFICATE_KIND) throw new UsageError(`not a glidepath verification certificate (kind: ${String(j.kind)})`);
  const c = j.counts as Record<string, unknown>;
  const rec = j.records as { glide: Record<string, bigint>[]; path: Record<string, bigint>[] };
  const max = j.maxima as { glide: Record<string, bigint> | null; path: Record<string, bigint> | null };
  const t = j.tables as { sieve: { rows: bigint; sha256: string }; steps: { rows: bigint; sha256: string } } | null;
  return {
    map: parseMap(String(j.map)),
    from: j.from as bigint,
    to: j.to as bigint,
    sieveDepth: Number(j.sieveDepth),
    stepDepth: Number(j.stepDepth),
    maxSteps: Number(j.maxSteps),
    tables: t && {
      sieve: { rows: Number(t.sieve.rows), sha256: t.sieve.sha256 },
      steps: { rows: Number(t.steps.rows), sha256: t.steps.sha256 },
    },
    counts: {
      numbers: c.numbers as bigint,
      checked: c.checked as bigint,
      sieved: c.sieved as bigint,
      exceptions: c.exceptions as bigint,
      cycleMembers: c.cycleMembers as bigint,
      cycleEntrants: (c.cycleEntrants as bigint | undefined) ?? 0n,
      unresolved: c.unresolved as bigint,
    },
    sievedByDepth: (c.sievedByDepth as { depth: bigint; count: bigint }[]).map((x) => ({ depth: Number(x.depth), count: x.count })),
    glideRecords: rec.glide.map((g) => ({ n: g.n!, standardSteps: Number(g.standardSteps), steps: Number(g.steps) })),
    pathRecords: rec.path.map((p) => ({ n: p.n!, value: p.value! })),
    maxGlide: max.glide && { n: max.glide.n!, standardSteps: Number(max.glide.standardSteps) },
    maxPath: max.path && { n: max.path.n!, value: max.path.value! },
    cycleMembers: (j.cycleMembers as { n: bigint; period: bigint }[]).map((x) => ({ n: x.n, period: Number(x.period) })),
    cycleEntrants: ((j.cycleEntrants as { n: bigint; cycleMin: bigint; period: bigint }[] | undefined) ?? []).map((x) => ({
      n: x.n,
      cycleMin: x.cycleMin,
      period: Number(x.period),
    })),
    unresolved: j.unresolved as bigint[],
  };
}

/**
 * Re-derives what can be re-derived cheaply: the count arithmetic, the order of the records and
 * maxima, every record, cycle member and unresolved n iterated again in BigInt, and `sample`
 * further n of the range (each must descend, or be listed, within the maxima). The table hashes
 * are compared by the caller (they need the tables rebuilt).
 */
export function checkCertificate(c: ReadCertificate, sample: bigint[]): CheckReport {
  const findings: string[] = [];
  const k = c.counts;
  const sum = k.checked! + k.sieved! + k.exceptions! + k.cycleMembers! + k.cycleEntrants! + k.unresolved!;
  if (k.numbers !== c.to - c.from) findings.push(`numbers ${k.numbers} is not to - from = ${c.to - c.from}`);
  if (sum !== k.numbers)
    findings.push(`checked + sieved + exceptions + cycle members + cycle entrants + unresolved = ${sum}, not ${k.numbers}`);
  if (c.sievedByDepth.reduce((s, x) => s + x.count, 0n) !== k.sieved)
    findings.push("the sieved counts by depth do not add up to the sieved count");
  if (BigInt(c.cycleMembers.length) !== k.cycleMembers) findings.push("the cycle member list does not match its count");
  const inRange = (n: bigint) => n >= c.from && n < c.to;
  const increasing = <T>(xs: T[], n: (x: T) => bigint, v: (x: T) => bigint) =>
    xs.every((x, i) => i === 0 || (n(xs[i - 1]!) < n(x) && v(xs[i - 1]!) < v(x)));
  if (
    !increasing(
      c.glideRecords,
      (g) => g.n,
      (g) => BigInt(g.standardSteps),
    )
  )
    findings.push("the glide records are not increasing");
  if (
    !increasing(
      c.pathRecords,
      (p) => p.n,
      (p) => p.value,
    )
  )
    findings.push("the path records are not increasing");
  const lastG = c.glideRecords.at(-1);
  if ((lastG?.n ?? null) !== (c.maxGlide?.n ?? null)) findings.push("the largest glide is not the last glide record");
  const lastP = c.pathRecords.at(-1);
  if ((lastP?.n ?? null) !== (c.maxPath?.n ?? null)) findings.push("the largest path is not the last path record");
  const cycleSet = new Set(c.cycleMembers.map((x) => x.n));
  const unresolvedSet = new Set(c.unresolved);
  let sampled = 0;
  for (const g of c.glideRecords) {
    sampled++;
    const t = traceBig(c.map, g.n, c.maxSteps, 0);
    if (!inRange(g.n) || t.outcome !== "descent" || t.steps + t.odd !== g.standardSteps || t.steps !== g.steps)
      findings.push(`glide record ${g.n}: BigInt iteration gives ${t.outcome} after ${t.steps} steps (${t.steps + t.odd} standard)`);
  }
  for (const p of c.pathRecords) {
    sampled++;
    const t = traceBig(c.map, p.n, c.maxSteps, 0);
    const value = t.outcome === "cycle" ? p.n : t.path;
    if (!inRange(p.n) || t.outcome === "unresolved" || value !== p.value)
      findings.push(`path record ${p.n}: BigInt iteration gives ${value}, not ${p.value}`);
  }
  for (const m of c.cycleMembers) {
    sampled++;
    const t = traceBig(c.map, m.n, c.maxSteps, 0);
    if (t.outcome !== "cycle" || t.steps !== m.period)
      findings.push(`cycle member ${m.n}: BigInt iteration gives ${t.outcome} after ${t.steps} steps`);
  }
  for (const e of c.cycleEntrants) {
    sampled++;
    const t = traceBig(c.map, e.n, c.maxSteps, 0);
    const entry = cycleEntry(c.map, e.n, 2 * c.maxSteps);
    if (t.outcome !== "unresolved" || entry?.min !== e.cycleMin || entry.period !== e.period)
      findings.push(`cycle entrant ${e.n}: BigInt iteration does not show it entering the cycle of ${e.cycleMin}`);
  }
  const entrantSet = new Set(c.cycleEntrants.map((e) => e.n));
  for (const n of c.unresolved) {
    sampled++;
    if (traceBig(c.map, n, c.maxSteps, 0).outcome !== "unresolved")
      findings.push(`unresolved ${n}: it resolves within ${c.maxSteps} steps`);
  }
  for (const n of sample) {
    sampled++;
    const t = traceBig(c.map, n, c.maxSteps, 0);
    if (t.outcome === "cycle" && !cycleSet.has(n)) findings.push(`${n} is on a cycle but not listed`);
    else if (t.outcome === "unresolved" && !unresolvedSet.has(n) && !entrantSet.has(n)) findings.push(`${n} is unresolved but not listed`);
    else if (t.outcome === "descent") {
      if (c.maxGlide && t.steps + t.odd > c.maxGlide.standardSteps)
        findings.push(`${n} has a glide of ${t.steps + t.odd} standard steps, above the largest`);
      if (c.maxPath && t.path > c.maxPath.value) findings.push(`${n} has a path of ${t.path}, above the largest`);
    }
  }
  return { holds: findings.length === 0, findings, sampled };
}
