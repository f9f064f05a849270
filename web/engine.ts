// The browser side of the engine: the kernel module fetched once, a pool of Web Workers through
// comlink, and the runs the views start. Arithmetic stays in src/; this file only wires it up.
import wasmUrl from "../build/release.wasm?url";
import { compileKernel } from "../src/engine/loader.js";
import { sha256Hex } from "../src/outputs/format.js";
import { KernelPool, PoolOwner } from "../src/engine/pool.js";
import type { SpawnWorker, WorkerHandle } from "../src/engine/pool.js";
import { releaseProxy, wrap } from "comlink";
import type { WorkerApi } from "../src/engine/worker.js";
import type { ExportApi, exportHandlers } from "../src/outputs/export.js";

const spawn: SpawnWorker = (): WorkerHandle => {
  const w = new Worker(new URL("./worker.ts", import.meta.url), { type: "module" });
  return {
    endpoint: w,
    terminate: () => w.terminate(),
    onError: (listener) =>
      w.addEventListener("error", (ev) => listener(new Error(`a worker stopped: ${ev.message || "it ran out of memory or crashed"}`))),
  };
};

let bytesPromise: Promise<ArrayBuffer> | null = null;
function kernelBytes(): Promise<ArrayBuffer> {
  bytesPromise ??= fetch(wasmUrl).then((r) => r.arrayBuffer());
  return bytesPromise;
}

export async function kernelModule(): Promise<WebAssembly.Module> {
  return compileKernel("release", await kernelBytes());
}

/** sha256 of bytes, as hex digits (the library's: outputs/format.ts). */
export const sha256 = sha256Hex;

/** Content hash of the kernel build (16 hex digits), as the CLI stamps into manifests. */
export async function kernelBuildId(): Promise<string> {
  return (await sha256(await kernelBytes())).slice(0, 16);
}

/** The page's one pool: jobs take turns on it, and a new worker count applies between jobs. */
const owner = new PoolOwner(async (size) => new KernelPool(spawn, await kernelModule(), size, await kernelBuildId()));

/**
 * Runs `work` on the page's pool of `workers` workers, after any job already running there.
 * @example await withPagePool(2, (pool) => runSieve(pool, req, options));
 */
export function withPagePool<T>(workers: number, work: (pool: KernelPool) => Promise<T>, signal?: AbortSignal): Promise<T> {
  return owner.use(workers, work, signal);
}

/** Jobs running or waiting on the page's pool. */
export function pagePoolPending(): number {
  return owner.pending;
}

/** A one-off worker for exports (so the page never does the BigInt work itself). */
export async function withExportWorker<T>(work: (api: ExportApi) => Promise<T>): Promise<T> {
  const h = spawn();
  const api = wrap<WorkerApi<typeof exportHandlers>>(h.endpoint);
  try {
    return await work(api);
  } finally {
    api[releaseProxy]();
    h.terminate();
  }
}

export function defaultWorkers(): number {
  return Math.max(1, Math.min(16, navigator.hardwareConcurrency || 2));
}
