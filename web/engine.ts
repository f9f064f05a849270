// The browser side of the engine: the kernel module fetched once, a pool of Web Workers through
// comlink, and the runs the views start. Arithmetic stays in src/; this file only wires it up.
import wasmUrl from "../build/release.wasm?url";
import { compileKernel } from "../src/engine/loader.js";
import { KernelPool } from "../src/engine/pool.js";
import type { RunOptions, SpawnWorker, WorkerHandle } from "../src/engine/pool.js";
import { wrap } from "comlink";
import type { KernelWorkerApi } from "../src/engine/messages.js";

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

/** Content hash of the kernel build (16 hex digits), as the CLI stamps into manifests. */
export async function kernelBuildId(): Promise<string> {
  const d = await crypto.subtle.digest("SHA-256", await kernelBytes());
  return Array.from(new Uint8Array(d).slice(0, 8), (x) => x.toString(16).padStart(2, "0")).join("");
}

let pool: KernelPool | null = null;
let poolSize = 0;
/** The shared pool, rebuilt when the worker count changes. */
export async function getPool(workers: number): Promise<KernelPool> {
  if (!pool || poolSize !== workers) {
    pool?.terminate();
    pool = new KernelPool(spawn, await kernelModule(), workers);
    poolSize = workers;
  }
  return pool;
}

/** A one-off worker for exports (so the page never does the BigInt work itself). */
export async function withExportWorker<T>(work: (api: ReturnType<typeof wrap<KernelWorkerApi>>) => Promise<T>): Promise<T> {
  const h = spawn();
  const api = wrap<KernelWorkerApi>(h.endpoint);
  try {
    return await work(api);
  } finally {
    h.terminate();
  }
}

export function defaultWorkers(): number {
  return Math.max(1, Math.min(16, navigator.hardwareConcurrency || 2));
}

export type { RunOptions };
