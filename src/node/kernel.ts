// Node adapter: reads the wasm from build/, spawns worker_threads speaking comlink.
import { createHash } from "node:crypto";
import { readFile } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";
import nodeEndpoint from "comlink/dist/esm/node-adapter.mjs";
import { compileKernel } from "../engine/loader.js";
import { KernelPool } from "../engine/pool.js";
import type { SpawnWorker } from "../engine/pool.js";
import type { ToolStamp } from "../outputs/manifest.js";
import { progressBar } from "./progress.js";
import { toolVersion } from "./version.js";

export type Flavour = "release" | "debug";

async function kernelBytes(flavour: Flavour): Promise<Uint8Array<ArrayBuffer>> {
  const url = new URL(`../../build/${flavour}.wasm`, import.meta.url);
  try {
    return new Uint8Array(await readFile(url));
  } catch {
    throw new Error(`kernel ${url.pathname} is missing: run npm install (or npm run build) first`);
  }
}

/** The compiled kernel module (build/release.wasm or build/debug.wasm), compiled once. */
export async function loadKernelModule(flavour: Flavour = "release"): Promise<WebAssembly.Module> {
  return compileKernel(flavour, await kernelBytes(flavour));
}

/** Content hash of the kernel build (16 hex digits), stamped into manifests. */
export async function kernelBuildId(flavour: Flavour = "release"): Promise<string> {
  return createHash("sha256")
    .update(await kernelBytes(flavour))
    .digest("hex")
    .slice(0, 16);
}

/** The tool version and kernel build that manifests carry. */
export async function toolStamp(): Promise<ToolStamp> {
  return { version: toolVersion(), kernelBuild: await kernelBuildId() };
}

/** Worker entry compiled to lib/ (tsc), so it runs under plain node from src/ and lib/ alike. */
const workerUrl = new URL("../../lib/node/worker.js", import.meta.url);

const spawnNodeWorker: SpawnWorker = () => {
  const w = new Worker(workerUrl, { execArgv: [] }); // plain JS: no loaders or -e flags of the parent
  w.unref();
  return {
    endpoint: nodeEndpoint(w),
    terminate: () => void w.terminate(),
    onError: (listener) => w.on("error", (e) => listener(new Error(`worker failed: ${e instanceof Error ? e.message : String(e)}`))),
  };
};

/** A pool of `workers` threads (default: the available cores). */
export async function nodePool(workers = availableParallelism(), flavour: Flavour = "release"): Promise<KernelPool> {
  return new KernelPool(spawnNodeWorker, await loadKernelModule(flavour), workers, await kernelBuildId(flavour));
}

/**
 * Runs `work` on a pool of `workers` threads with a progress bar on stderr; the bar is cleared
 * before the result is returned and the threads are released however `work` ends.
 * @example const r = await withPool(2, "census", (pool, onProgress) => runCensus(pool, map, 20, { onProgress }));
 */
export async function withPool<T>(
  workers: number,
  label: string,
  work: (pool: KernelPool, onProgress: (done: number, total: number) => void) => Promise<T>,
  unit = "shards",
): Promise<T> {
  const pool = await nodePool(workers);
  const bar = progressBar(label, unit);
  try {
    return await work(pool, bar.update);
  } finally {
    bar.stop();
    pool.terminate();
  }
}
