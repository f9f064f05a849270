// Running one shard of a run folder to disk: its bulk output and spilled arrays, then its part
// (RUN/parts/I.json) with their sha256 and a digest over the whole; a failure leaves RUN/parts/I.failed.
import { createHash } from "node:crypto";
import { unlink } from "node:fs/promises";
import { hostname } from "node:os";
import { join } from "node:path";
import { UsageError } from "../../core/errors.js";
import { packData, toExactJson } from "../../core/json.js";
import type { ByteSink, JobKind, PartBase } from "../../engine/plan.js";
import type { KernelPool } from "../../engine/pool.js";
import type { DataFile } from "../../outputs/manifest.js";
import { AtomicFile, writeFileAtomic } from "../files.js";
import { toolVersion } from "../version.js";
import { PARTS, partPath } from "./rundir.js";
import type { RunDir } from "./rundir.js";

export const PART_KIND = "glidepath part";

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
export function partDigest(body: Record<string, unknown>): string {
  return createHash("sha256").update(toExactJson(body)).digest("hex");
}
