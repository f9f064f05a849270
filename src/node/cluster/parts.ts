// The parts of a run folder checked against its plan, for `merge` and `batch-status`: every shard's
// part once (kind, shard, plan hash, kernel build, digest, the files it lists), and nothing else.
import { createHash } from "node:crypto";
import { createReadStream, existsSync, readdirSync, readFileSync } from "node:fs";
import { open, readFile } from "node:fs/promises";
import { join } from "node:path";
import { UsageError } from "../../core/errors.js";
import { parseExactJson, unpackData } from "../../core/json.js";
import type { PartBase } from "../../engine/plan.js";
import type { TableSource } from "../../jobs/sieve/merge.js";
import { PARTS, partPath } from "./rundir.js";
import type { RunDir } from "./rundir.js";
import { PART_KIND, partDigest } from "./shard.js";

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

/**
 * The parts' sorted tables opened as sources of the sieve's table merge (jobs/sieve/merge.ts), closed when `use` ends.
 * @example await withPartTables(paths, (sources) => mergeSortedTables(sources, depth, file));
 */
export async function withPartTables<T>(paths: readonly string[], use: (sources: TableSource[]) => Promise<T>): Promise<T> {
  const handles = await Promise.all(paths.map((p) => open(p, "r")));
  try {
    return await use(
      handles.map((h, i) => ({
        name: paths[i]!,
        read: async (bytes: Uint8Array, position: number) => (await h.read(bytes, 0, bytes.length, position)).bytesRead,
      })),
    );
  } finally {
    await Promise.all(handles.map((h) => h.close()));
  }
}
