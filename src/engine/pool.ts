// The worker pool: shards by residue prefix, runs them on N workers through comlink, hands each
// result to the caller as it arrives, reports progress and cancels by terminating the workers.
// Isomorphic: the caller passes a spawner (worker_threads in Node, Web Workers in the browser).
import { releaseProxy, wrap } from "comlink";
import type { Endpoint, Remote } from "comlink";
import type { HandlerMap, JobApi } from "./worker.js";

/** What every worker offers whatever it serves: init. */
type WorkerInit = { init(module: WebAssembly.Module): Promise<void> };

export interface WorkerHandle {
  readonly endpoint: Endpoint;
  terminate(): void;
  /** Reports a worker that died (an uncaught error, out of memory): the run fails with it. */
  onError?(listener: (error: Error) => void): void;
}
export type SpawnWorker = () => WorkerHandle;

export class CancelledError extends Error {
  override name = "CancelledError";
  constructor() {
    super("run cancelled");
  }
}

interface Slot {
  readonly handle: WorkerHandle;
  readonly api: Remote<WorkerInit>;
  ready: Promise<void>;
}

export interface RunOptions {
  readonly signal?: AbortSignal;
  /** Called after each shard with (done, in all): shards, or what the job says it counts (verify: numbers). */
  readonly onProgress?: (done: number, total: number) => void;
}

/**
 * A fixed-size pool of kernel workers. It knows no job: a run names the handlers its calls use by
 * the type of `api` (JobApi<typeof its job's handlers>, worker.ts).
 * @example const pool = new KernelPool(spawn, module, 2, buildId);
 *   await pool.run(shards, (api: JobApi<typeof sieveHandlers>, s) => api.runShard(s), (s, out) => merge(out));
 */
export class KernelPool {
  private slots: Slot[] = [];
  private busy = false;
  private crash: ((error: Error) => void) | null = null;

  constructor(
    private readonly spawn: SpawnWorker,
    readonly module: WebAssembly.Module,
    readonly size: number,
    /** The kernel build's content hash, which plans and their parts carry. */
    readonly build: string,
  ) {
    if (!Number.isInteger(size) || size < 1) throw new RangeError("pool size must be a positive integer");
  }

  private ensureSlots(): Slot[] {
    while (this.slots.length < this.size) {
      const handle = this.spawn();
      handle.onError?.((e) => this.crash?.(e));
      const api = wrap<WorkerInit>(handle.endpoint);
      this.slots.push({ handle, api, ready: api.init(this.module) });
    }
    return this.slots;
  }

  /** Runs every task through `call` on some worker; `onResult` sees each output once, in completion order. */
  async run<H extends HandlerMap, T, O>(
    tasks: readonly T[],
    call: (api: JobApi<H>, task: T) => Promise<O>,
    onResult: (task: T, out: O) => void,
    options: RunOptions = {},
  ): Promise<void> {
    if (this.busy) throw new Error("pool is already running");
    this.busy = true;
    const { signal, onProgress } = options;
    let next = 0;
    let done = 0;
    let failure: unknown = null;
    let cancel: () => void = () => {};
    const cancelled = new Promise<never>((_, reject) => {
      cancel = () => reject(new CancelledError());
      this.crash = (e) => {
        failure ??= e;
        this.terminate();
        reject(e);
      };
    });
    cancelled.catch(() => {});
    const onAbort = () => {
      this.terminate();
      cancel();
    };
    try {
      if (signal?.aborted) throw new CancelledError();
      signal?.addEventListener("abort", onAbort);
      const slots = this.ensureSlots();
      const loop = async (slot: Slot) => {
        await slot.ready;
        while (failure === null && next < tasks.length) {
          const task = tasks[next++]!;
          // a downcast the types cannot prove: every worker serves the registry (src/registry.ts), so any job's H
          const out = await call(slot.api as JobApi<H>, task);
          onResult(task, out);
          done++;
          onProgress?.(done, tasks.length);
        }
      };
      const loops = slots.map((s) =>
        loop(s).catch((e: unknown) => {
          failure ??= e;
        }),
      );
      await Promise.race([Promise.all(loops), cancelled]);
      if (failure !== null) {
        // A worker that failed may be in any state: replace them all before the next run.
        this.terminate();
        throw failure;
      }
    } finally {
      signal?.removeEventListener("abort", onAbort);
      this.crash = null;
      this.busy = false;
    }
  }

  /** Whether a run is in progress. */
  get running(): boolean {
    return this.busy;
  }

  /** Stops every worker at once; the next run spawns fresh ones. */
  terminate(): void {
    for (const s of this.slots) {
      s.api[releaseProxy]();
      s.handle.terminate();
    }
    this.slots = [];
  }
}

/**
 * Owns the one pool of a page (or a process) and runs work on it one job at a time: a job asked for
 * while another runs waits its turn, and a new worker count takes effect between jobs, never by
 * stopping one that is running.
 * @example const owner = new PoolOwner((n) => makePool(n)); await owner.use(2, (pool) => runSieve(pool, req));
 */
export class PoolOwner {
  private pool: KernelPool | null = null;
  private tail: Promise<unknown> = Promise.resolve();
  private queued = 0;

  constructor(private readonly make: (size: number) => Promise<KernelPool>) {}

  /** Jobs running or waiting. */
  get pending(): number {
    return this.queued;
  }

  /**
   * Runs `work` on a pool of `size` workers once every earlier job has ended (however it ended). An
   * abort of `signal` ends the wait at once (CancelledError), and a job whose turn comes after its
   * abort does not start.
   */
  use<T>(size: number, work: (pool: KernelPool) => Promise<T>, signal?: AbortSignal): Promise<T> {
    this.queued++;
    const job = this.tail.then(async () => {
      try {
        if (signal?.aborted) throw new CancelledError();
        if (!this.pool || this.pool.size !== size) {
          this.pool?.terminate();
          this.pool = null;
          this.pool = await this.make(size);
        }
        return await work(this.pool);
      } finally {
        this.queued--;
      }
    });
    this.tail = job.catch(() => {});
    if (!signal) return job;
    return new Promise<T>((resolve, reject) => {
      const onAbort = () => reject(new CancelledError());
      signal.addEventListener("abort", onAbort, { once: true });
      job.then(resolve, reject).finally(() => signal.removeEventListener("abort", onAbort));
    });
  }

  /** Stops the workers (between jobs: a running job fails with the pool). */
  terminate(): void {
    this.pool?.terminate();
    this.pool = null;
  }
}
