// The worker side of the pool, isomorphic and generic: Node's entry (src/node/worker.ts) and the
// browser's (web/worker.ts) expose the object that createWorkerApi makes from the jobs' registry
// (src/jobs/registry.ts) through comlink. The engine knows no job: a job's handlers name themselves.
import { transfer } from "comlink";
import type { Remote } from "comlink";
import { Kernel } from "./loader.js";

/** What a handler gets besides its request: the worker's kernel and the state jobs keep in it. */
export interface WorkerContext {
  /** The instantiated kernel (an error before init). */
  kernel(): Kernel;
  /** State a job keeps in this worker between calls (the verification run's tables). */
  readonly state: Map<string, unknown>;
}

/** One call a job offers its workers: a request in, a result out (plain data and typed arrays). */
// `never`: each handler names its own request type, and a function of any request is a Handler
export type Handler = (ctx: WorkerContext, request: never) => unknown;
export type HandlerMap = Record<string, Handler>;

/** The object a worker exposes: init, and one method per handler, typed from the handlers. */
export type WorkerApi<H extends HandlerMap> = {
  init(module: WebAssembly.Module): Promise<void>;
} & {
  [K in keyof H]: (request: Parameters<H[K]>[1]) => Promise<Awaited<ReturnType<H[K]>>>;
};

/**
 * A worker as a job's run sees it (the `api` of KernelPool.run): the calls of the handlers it names,
 * its own job's (`JobApi<typeof censusHandlers>`); the worker entries serve every job's (src/registry.ts).
 */
export type JobApi<H extends HandlerMap> = Remote<WorkerApi<H>>;

/**
 * The buffers of the typed arrays in a result (top level, one level of fields, lists of them), to
 * be transferred rather than copied; never the kernel's own memory.
 */
function transferables(value: unknown, memory: ArrayBufferLike | null): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>();
  const visit = (v: unknown, depth: number) => {
    if (ArrayBuffer.isView(v)) {
      if (v.buffer !== memory && v.buffer instanceof ArrayBuffer) out.add(v.buffer);
    } else if (depth < 2 && Array.isArray(v)) for (const x of v) visit(x, depth + 1);
    else if (depth < 2 && v !== null && typeof v === "object") for (const x of Object.values(v)) visit(x, depth + 1);
  };
  visit(value, 0);
  return [...out];
}

/** @example expose(createWorkerApi(jobHandlers), endpoint) */
export function createWorkerApi<H extends HandlerMap>(handlers: H): WorkerApi<H> {
  let kernel: Kernel | null = null;
  const ctx: WorkerContext = {
    kernel: () => {
      if (!kernel) throw new Error("worker used before init");
      return kernel;
    },
    state: new Map(),
  };
  const api: Record<string, unknown> = {
    async init(module: WebAssembly.Module) {
      kernel = await Kernel.instantiate(module);
    },
  };
  for (const [name, handler] of Object.entries(handlers)) {
    api[name] = async (request: unknown) => {
      // comlink brings what the caller's JobApi<H> typed as this handler's request
      const result = await handler(ctx, request as never);
      if (result === null || typeof result !== "object") return result; // nothing to transfer (comlink keys transfers by object)
      return transfer(result, transferables(result, kernel ? kernel.memory : null));
    };
  }
  return api as WorkerApi<H>;
}
