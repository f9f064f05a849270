// A run directory on disk, for `batch`, `shard`, `batch-status` and `merge`: RUN/plan.json (the plan
// layer's plan, hashed), RUN/job.sbatch (a Slurm job array, one task per shard), RUN/parts/I.json
// (a shard's part with the sha256 of every file it wrote, placed last: its presence means done),
// RUN/parts/I.failed (the error line of a failed shard) and RUN/logs (Slurm's output).
import { createHash } from "node:crypto";
import { createReadStream, existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { mkdir, open, readFile, unlink } from "node:fs/promises";
import { hostname } from "node:os";
import { dirname, join, resolve } from "node:path";
import { LimitError, UsageError } from "../core/errors.js";
import { PLAN_KIND, planHash } from "../engine/plan.js";
import type { ByteSink, JobKind, PartBase, Plan, ShardEstimate } from "../engine/plan.js";
import type { KernelPool } from "../engine/pool.js";
import { packData, parseExactJson, toExactJson, unpackData } from "../core/json.js";
import type { DataFile } from "../outputs/manifest.js";
import { finishBucket } from "../jobs/sieve/sort.js";
import { AtomicFile, writeFileAtomic } from "./files.js";
import { toolVersion } from "./version.js";

export const PART_KIND = "glidepath part";
const PLAN_FILE = "plan.json";
export const SCRIPT_FILE = "job.sbatch";
export const PARTS = "parts";
export const LOGS = "logs";

/** The Slurm directives a run's script carries. */
export interface ScriptOptions {
  readonly cpusPerTask: number;
  readonly partition?: string;
  readonly estimate: ShardEstimate;
}

/** A plan as stored: the plan layer's fields, with the tool that wrote it. */
interface StoredPlan {
  readonly plan: Plan<unknown>;
  readonly tool: string;
  readonly created: string;
  readonly cpusPerTask: number;
  readonly estimate: ShardEstimate;
}

export interface RunDir<P = unknown> {
  readonly dir: string;
  readonly plan: Plan<P>;
  readonly cpusPerTask: number;
  readonly estimate: ShardEstimate;
}

function planJson(plan: Plan<unknown>, job: JobKind<unknown, PartBase, unknown>): unknown {
  // prefixes and weights as packed u64 arrays (compact); the parameters as the job encodes them
  const u64 = (xs: readonly bigint[] | null | undefined) => (xs ? BigUint64Array.from(xs) : null);
  return packData({ ...plan, params: job.codec.encode(plan.params), prefixes: u64(plan.prefixes), weights: u64(plan.weights) });
}

/** The time a task asks for: four times the estimate and a minute to start, at least ten minutes. */
export function timeLimit(estimate: ShardEstimate): number {
  return Math.max(600, 4 * Math.ceil(estimate.seconds) + 60);
}

/** Slurm's time format D-HH:MM:SS. */
export function slurmTime(seconds: number): string {
  const s = Math.max(60, Math.ceil(seconds));
  const d = Math.floor(s / 86400);
  const hms = [Math.floor((s % 86400) / 3600), Math.floor((s % 3600) / 60), s % 60].map((x) => String(x).padStart(2, "0")).join(":");
  return d > 0 ? `${d}-${hms}` : hms;
}

/** The batch script: one array task per shard, each running `glidepath shard RUN $SLURM_ARRAY_TASK_ID`. */
export function sbatchScript(dir: string, plan: Plan<unknown>, describe: string, o: ScriptOptions): string {
  const run = resolve(dir);
  const cli = resolve(new URL("../../bin/glidepath.js", import.meta.url).pathname);
  return [
    "#!/bin/bash",
    `# glidepath ${describe}: ${plan.shards.length} shards of plan ${plan.hash.slice(0, 16)}.`,
    "# Submit with: sbatch job.sbatch (from any folder). Rerun only some shards: sbatch --array=3,7 job.sbatch",
    "# Moved RUN or glidepath? sbatch --export=ALL,GLIDEPATH_RUN=/new/RUN,GLIDEPATH=/new/bin/glidepath.js --output=/new/RUN/logs/shard-%a.out ...",
    `#SBATCH --job-name=glidepath-${plan.job}`,
    `#SBATCH --array=0-${plan.shards.length - 1}`,
    "#SBATCH --ntasks=1",
    `#SBATCH --cpus-per-task=${o.cpusPerTask}`,
    `#SBATCH --mem=${o.estimate.memoryMiB}M`,
    `#SBATCH --time=${slurmTime(timeLimit(o.estimate))}`,
    `#SBATCH --output=${run}/${LOGS}/shard-%a.out`,
    ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
    "set -euo pipefail",
    `RUN="\${GLIDEPATH_RUN:-${run}}"`,
    `GLIDEPATH="\${GLIDEPATH:-${cli}}"`,
    `exec "${process.execPath}" "$GLIDEPATH" shard "$RUN" "$SLURM_ARRAY_TASK_ID" --workers "\${SLURM_CPUS_PER_TASK:-1}"`,
    "",
  ].join("\n");
}

/**
 * Writes RUN/plan.json and RUN/job.sbatch (and the parts and logs folders). A folder that holds
 * another plan is refused; the same plan again is harmless.
 */
export async function createRun(
  dir: string,
  job: JobKind<unknown, PartBase, unknown>,
  plan: Plan<unknown>,
  o: ScriptOptions,
): Promise<void> {
  const planPath = join(dir, PLAN_FILE);
  if (existsSync(planPath)) {
    const old = await readRun(dir, () => job).catch(() => null);
    if (!old || old.plan.hash !== plan.hash)
      throw new UsageError(`${dir} already holds another plan: choose a new --dir, or remove ${planPath}`);
  }
  // one level at a time, in a folder that exists (a recursive mkdir can spin forever on /proc)
  for (const d of [dir, join(dir, PARTS), join(dir, LOGS)]) {
    try {
      await mkdir(d);
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      if (code === "EEXIST" && statSync(d).isDirectory()) continue;
      const parent = statSync(dirname(d), { throwIfNoEntry: false });
      const why =
        code === "EEXIST"
          ? "a file of that name is in the way"
          : !parent?.isDirectory()
            ? `${dirname(d)} is not a folder`
            : (code ?? String(e));
      throw new UsageError(`cannot create ${d}: ${why}`);
    }
  }
  const stored = {
    kind: PLAN_KIND,
    plan: planJson(plan, job),
    tool: toolVersion(),
    created: new Date().toISOString(),
    cpusPerTask: o.cpusPerTask,
    estimate: o.estimate,
  };
  await writeFileAtomic(join(dir, SCRIPT_FILE), sbatchScript(dir, plan, job.describe(plan.params), o));
  await writeFileAtomic(planPath, `${JSON.stringify(stored, null, 1)}\n`);
}

/** Reads RUN/plan.json back, checking its hash: an edited plan is refused. */
export async function readRun(dir: string, jobOf: (name: string) => JobKind<unknown, PartBase, unknown>): Promise<RunDir> {
  const path = join(dir, PLAN_FILE);
  let raw: Record<string, unknown>;
  try {
    raw = JSON.parse(await readFile(path, "utf8")) as Record<string, unknown>;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(code ? `${dir} is not a glidepath run: cannot read ${path} (${code})` : `${path} is not JSON`);
  }
  if (raw.kind !== PLAN_KIND) throw new UsageError(`${path} is not a glidepath plan`);
  let plan: Plan<unknown>;
  let job: JobKind<unknown, PartBase, unknown>;
  try {
    ({ plan, job } = decodePlan(raw, jobOf));
  } catch (e) {
    throw new UsageError(`${path} is damaged: ${e instanceof Error ? e.message : String(e)}`);
  }
  const { hash: _stored, ...body } = plan;
  if ((await planHash(job, body)) !== plan.hash) throw new UsageError(`${path} was changed after it was written: its hash does not match`);
  const stored = raw as unknown as StoredPlan;
  return { dir, plan, cpusPerTask: Number(stored.cpusPerTask), estimate: stored.estimate };
}

/** The plan of a stored plan.json (throws on a malformed one). */
function decodePlan(
  raw: Record<string, unknown>,
  jobOf: (name: string) => JobKind<unknown, PartBase, unknown>,
): { plan: Plan<unknown>; job: JobKind<unknown, PartBase, unknown> } {
  const p = unpackData(raw.plan) as Record<string, unknown>;
  if (p === null || typeof p !== "object" || typeof p.job !== "string" || !Array.isArray(p.shards) || typeof p.params !== "object")
    throw new Error("it does not hold a plan (job, params, shards)");
  const job = jobOf(String(p.job));
  const list = (xs: unknown) => (xs instanceof BigUint64Array ? Array.from(xs) : null);
  const plan: Plan<unknown> = {
    kind: PLAN_KIND,
    job: job.name,
    params: job.codec.decode(p.params as Record<string, unknown>),
    prefixBits: Number(p.prefixBits),
    prefixes: list(p.prefixes),
    tasks: Number(p.tasks),
    weights: list(p.weights),
    shards: p.shards as Plan<unknown>["shards"],
    kernelBuild: String(p.kernelBuild),
    hash: String(p.hash),
  };
  return { plan, job };
}

const partPath = (dir: string, shard: number, suffix: string) => join(dir, PARTS, `${shard}.${suffix}`);

/** The shard numbers a command line names, checked against the plan. */
export function checkShard(run: RunDir, text: string): number {
  if (!/^\d+$/.test(text)) throw new UsageError(`the shard must be a whole number from 0 to ${run.plan.shards.length - 1}, got "${text}"`);
  const i = Number(text);
  if (i >= run.plan.shards.length) throw new UsageError(`shard ${i} is not in the plan of ${run.dir} (0 to ${run.plan.shards.length - 1})`);
  return i;
}

/** The environment variable that makes named shards fail (for tests of the rerun path). */
export const FAIL_VARIABLE = "GLIDEPATH_FAIL_SHARDS";

/**
 * Runs shard I of a run and writes its part: its bulk output (RUN/parts/I.table) and spilled
 * arrays first, then RUN/parts/I.json with their sha256, each atomically. A failure leaves
 * RUN/parts/I.failed with its error line and no part.
 */
export async function runShardToDisk<P, Part extends PartBase>(
  run: RunDir<P>,
  job: JobKind<P, Part, unknown>,
  shard: number,
  pool: KernelPool,
  options: { onProgress?: (done: number, total: number) => void; table?: boolean } = {},
): Promise<{ seconds: number; files: DataFile[] }> {
  const failed = partPath(run.dir, shard, "failed");
  const started = new Date().toISOString();
  try {
    if ((process.env[FAIL_VARIABLE] ?? "").split(",").includes(String(shard)))
      throw new Error(`shard ${shard} failed on purpose (${FAIL_VARIABLE})`);
    if (pool.build !== run.plan.kernelBuild)
      throw new UsageError(
        `this glidepath's kernel build ${pool.build} is not the plan's (${run.plan.kernelBuild}): run the tool that made the plan`,
      );
    const files: DataFile[] = [];
    let table: AtomicFile | null = null;
    if (options.table) table = await AtomicFile.create(partPath(run.dir, shard, "table"));
    let part: Part;
    try {
      part = await job.runShard(pool, run.plan, shard, { onProgress: options.onProgress, ...(table ? { out: table as ByteSink } : {}) });
      if (table) {
        files.push(await table.finish());
        await table.place();
      }
    } catch (e) {
      await table?.abort();
      throw e;
    }
    let spilled = 0;
    const spills: { name: string; bytes: Uint8Array }[] = [];
    const data = packData(part, (bytes) => {
      const name = `${shard}.${spilled++}.bin`;
      spills.push({ name, bytes });
      return name;
    });
    for (const s of spills) {
      const f = await AtomicFile.create(join(run.dir, PARTS, s.name));
      await f.write(s.bytes);
      files.push(await f.finish());
      await f.place();
    }
    const body = {
      kind: PART_KIND,
      shard,
      plan: run.plan.hash,
      kernelBuild: pool.build,
      tool: toolVersion(),
      host: hostname(),
      started,
      finished: new Date().toISOString(),
      seconds: part.seconds,
      files: files.map((f) => ({ file: f.file, bytes: f.bytes, sha256: f.sha256 })),
      data,
    };
    const manifest = { ...body, digest: partDigest(body) };
    await writeFileAtomic(partPath(run.dir, shard, "json"), `${toExactJson(manifest)}\n`);
    await unlink(failed).catch(() => {});
    return { seconds: part.seconds, files };
  } catch (e) {
    const line = (e instanceof Error ? e.message : String(e)).split("\n")[0]!;
    await writeFileAtomic(failed, `${JSON.stringify({ shard, error: line, host: hostname(), time: new Date().toISOString() })}\n`).catch(
      () => {},
    );
    throw e;
  }
}

/** The digest a part carries over everything else in it (its results, plan hash, shard, files, times). */
function partDigest(body: Record<string, unknown>): string {
  return createHash("sha256").update(toExactJson(body)).digest("hex");
}

/** The error line a failed shard left (RUN/parts/I.failed), or null when it left none. */
function failedMarker(run: RunDir<unknown>, shard: number): string | null {
  const path = partPath(run.dir, shard, "failed");
  if (!existsSync(path)) return null;
  try {
    return String((JSON.parse(readFileSync(path, "utf8")) as { error: unknown }).error);
  } catch {
    return "no error line"; // an unreadable marker still marks the shard failed
  }
}

/** Shard numbers as Slurm's --array list: 0-3,7,9-10. */
export function arrayList(shards: readonly number[]): string {
  const out: string[] = [];
  for (let i = 0; i < shards.length; ) {
    let j = i;
    while (j + 1 < shards.length && shards[j + 1] === shards[j]! + 1) j++;
    out.push(j > i ? `${shards[i]}-${shards[j]}` : String(shards[i]));
    i = j + 1;
  }
  return out.join(",");
}

async function fileSha256(path: string): Promise<{ bytes: bigint; sha256: string }> {
  const h = createHash("sha256");
  let bytes = 0n;
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 22 })) {
    h.update(chunk as Buffer);
    bytes += BigInt((chunk as Buffer).byteLength);
  }
  return { bytes, sha256: h.digest("hex") };
}

/** A part read back and checked: its data and its bulk file, if any. */
export interface CheckedPart<Part> {
  readonly shard: number;
  readonly part: Part;
  readonly table: string | null;
  /** When the shard ran (ISO times from its manifest). */
  readonly started: string;
  readonly finished: string;
}

/** Every part of a run inspected: the good ones read back, and one line for each missing or bad one. */
export interface PartInspection<Part> {
  readonly parts: CheckedPart<Part>[];
  /** Shards with no part: failed (with the error line they left), or not run (or killed before they could say). */
  readonly failed: { readonly shard: number; readonly error: string }[];
  readonly missing: number[];
  /** Shards whose part is damaged, altered or foreign. */
  readonly bad: number[];
  /** Files RUN/parts/*.json that are no shard's part (I.json with I past the plan's shards, or another name). */
  readonly extra: string[];
  /** One line for each damaged, altered, foreign or extra part. */
  readonly damaged: string[];
  /** One line for every missing or bad part, in shard order (what merge refuses with). */
  readonly problems: string[];
}

/**
 * Checks every part against the plan: kind, shard number, plan hash, kernel build, the part's own
 * digest (its results cannot be altered unseen), the size and sha256 of every file it lists;
 * every shard once, nothing else. `merge` and `batch-status` both use it.
 */
export async function inspectParts<P, Part extends PartBase>(run: RunDir<P>, build: string): Promise<PartInspection<Part>> {
  const n = run.plan.shards.length;
  if (build !== run.plan.kernelBuild)
    throw new UsageError(`${run.dir} was planned by kernel build ${run.plan.kernelBuild}; this glidepath is build ${build}`);
  const problems: string[] = [];
  const damaged: string[] = [];
  const parts: CheckedPart<Part>[] = [];
  const failed: PartInspection<Part>["failed"][number][] = [];
  const missing: number[] = [];
  const bad: number[] = [];
  const extra: string[] = [];
  const partName = /^(0|[1-9]\d*)\.json$/;
  for (const name of readdirSync(join(run.dir, PARTS)).sort()) {
    if (!name.endsWith(".json")) continue;
    const m = partName.exec(name);
    if (m && Number(m[1]) < n) continue;
    extra.push(name);
    damaged.push(
      m
        ? `part ${m[1]}: not in the plan (shards 0 to ${n - 1})`
        : `${PARTS}/${name}: not a part of the plan (parts are 0.json to ${n - 1}.json)`,
    );
  }
  problems.push(...damaged);
  for (let i = 0; i < n; i++) {
    const why = await inspectPart<Part>(run, i, parts);
    if (why === null) continue;
    if (why === "missing") {
      const error = failedMarker(run, i);
      if (error === null) missing.push(i);
      else failed.push({ shard: i, error });
      problems.push(`part ${i}: missing${error === null ? "" : ` (the shard failed: ${error})`}`);
    } else {
      bad.push(i);
      damaged.push(`part ${i}: ${why}`);
      problems.push(`part ${i}: ${why}`);
    }
  }
  return { parts, failed, missing, bad, extra, damaged, problems };
}

/** One part checked and, when good, read into `parts`: null, "missing", or what is wrong with it. */
async function inspectPart<Part>(run: RunDir<unknown>, i: number, parts: CheckedPart<Part>[]): Promise<string | null> {
  const path = partPath(run.dir, i, "json");
  if (!existsSync(path)) return "missing";
  let m: Record<string, unknown>;
  let exact: Record<string, unknown>;
  try {
    const text = await readFile(path, "utf8");
    m = JSON.parse(text) as Record<string, unknown>;
    exact = parseExactJson(text) as Record<string, unknown>;
  } catch {
    return `${PARTS}/${i}.json is not JSON (truncated or damaged)`;
  }
  if (m.kind !== PART_KIND) return `${PARTS}/${i}.json is not a glidepath part`;
  if (m.shard !== i) return `its manifest says shard ${String(m.shard)}`;
  if (m.plan !== run.plan.hash) return `written for plan ${String(m.plan).slice(0, 16)}, this run's plan is ${run.plan.hash.slice(0, 16)}`;
  if (m.kernelBuild !== run.plan.kernelBuild) return `written by kernel build ${String(m.kernelBuild)}`;
  if (typeof m.digest !== "string" || partDigest(withoutDigest(exact)) !== m.digest)
    return `${PARTS}/${i}.json was changed after it was written (its digest does not match its content)`;
  const files = m.files as { file: string; bytes: number; sha256: string }[];
  for (const f of files) {
    const fp = join(run.dir, PARTS, f.file);
    if (!existsSync(fp)) return `${PARTS}/${f.file} is missing`;
    const got = await fileSha256(fp);
    if (got.bytes !== BigInt(f.bytes) || got.sha256 !== f.sha256)
      return `${PARTS}/${f.file} differs from its manifest (sha256 ${got.sha256.slice(0, 16)}, expected ${f.sha256.slice(0, 16)})`;
  }
  let part: Part;
  try {
    part = unpackData(m.data, (file) => readFileSync(join(run.dir, PARTS, file))) as Part;
  } catch (e) {
    return `its data cannot be read (${e instanceof Error ? e.message : String(e)})`;
  }
  const table = files.find((f) => f.file === `${i}.table`);
  parts.push({
    shard: i,
    part,
    table: table ? join(run.dir, PARTS, table.file) : null,
    started: String(m.started),
    finished: String(m.finished),
  });
  return null;
}

/** The parts of a complete, undamaged run, or a refusal with one line naming each missing or bad part. */
export async function checkParts<P, Part extends PartBase>(run: RunDir<P>, build: string): Promise<CheckedPart<Part>[]> {
  const r = await inspectParts<P, Part>(run, build);
  if (r.problems.length > 0)
    throw new UsageError(
      `merge refused: ${r.problems.length} of ${run.plan.shards.length} parts are missing or bad (nothing was written): ${r.problems.join("; ")}`,
    );
  return r.parts;
}

function withoutDigest(m: Record<string, unknown>): Record<string, unknown> {
  const { digest: _digest, ...rest } = m;
  return rest;
}

/** Bytes each reader buffers; the window of residues merged at once is 2^WINDOW_BITS wide. */
const READ_BYTES = 1 << 18;
const WINDOW_BITS = 22;

/**
 * Merges sorted raw class tables (little-endian u32, or u64 for depth > 32, residues < 2^53) into
 * one sorted stream, window by window: each part's run of residues in [w, w + 2^22) is appended,
 * the window's keys are radix-sorted and written. A window holds at most 2^22 residues, so memory
 * is bounded whatever the table's size; a part out of order, or a residue in two parts, is an error.
 */
export async function mergeSortedTables(paths: readonly string[], depth: number, sink: ByteSink): Promise<bigint> {
  if (depth > 53) throw new LimitError("tables deeper than 2^53 are not merged here");
  const width = depth > 32 ? 8 : 4;
  const bits = Math.min(depth, WINDOW_BITS);
  const windows = 2 ** (depth - bits);
  const handles = await Promise.all(paths.map((p) => open(p, "r")));
  try {
    const readers = handles.map((h, i) => ({
      h,
      path: paths[i]!,
      buf: new Uint32Array(READ_BYTES / 4),
      fill: 0, // u32 words in buf
      pos: 0,
      offset: 0,
      last: -1,
    }));
    const refill = async (r: (typeof readers)[number]): Promise<boolean> => {
      const bytes = new Uint8Array(r.buf.buffer);
      const { bytesRead } = await r.h.read(bytes, 0, READ_BYTES, r.offset);
      if (bytesRead % width !== 0) throw new Error(`${r.path}: its length is not a whole number of ${width}-byte residues`);
      r.offset += bytesRead;
      r.fill = bytesRead / 4;
      r.pos = 0;
      return bytesRead > 0;
    };
    const keys = new Uint32Array(2 ** bits);
    let count = 0n;
    for (let w = 0; w < windows; w++) {
      const start = w * 2 ** bits;
      const end = start + 2 ** bits;
      let n = 0;
      for (const r of readers) {
        for (;;) {
          if (r.pos >= r.fill && !(await refill(r))) break;
          const v = width === 4 ? r.buf[r.pos]! : r.buf[r.pos + 1]! * 2 ** 32 + r.buf[r.pos]!;
          if (v >= end) break;
          if (v <= r.last) throw new Error(`${r.path}: residue ${v} is out of order or repeated`);
          r.last = v;
          keys[n++] = v - start;
          r.pos += width / 4;
        }
      }
      if (n === 0) continue;
      const sorted = finishBucket(keys.subarray(0, n), bits, start, width === 8);
      const step = width / 4;
      for (let i = step; i < sorted.length; i += step)
        if (sorted[i] === sorted[i - step] && (step === 1 || sorted[i + 1] === sorted[i - step + 1]))
          throw new Error(`residue ${step === 1 ? sorted[i] : sorted[i + 1]! * 2 ** 32 + sorted[i]!} is in two parts`);
      await sink.write(new Uint8Array(sorted.buffer, sorted.byteOffset, sorted.byteLength));
      count += BigInt(n);
    }
    for (const r of readers) if (r.pos < r.fill || (await refill(r))) throw new Error(`${r.path}: residues at or above 2^${depth}`);
    return count;
  } finally {
    await Promise.all(handles.map((h) => h.close()));
  }
}
