// The worker pool: cancel at once, jobs taking turns, a failing or dying worker named, recovery after each.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { exactCounts } from "../src/core/exact.js";
import { runSieve } from "../src/jobs/sieve/sieve.js";
import { CancelledError } from "../src/engine/pool.js";
import { nodePool } from "../src/node/kernel.js";
import { A076227 } from "../src/core/published.js";
import type { JobApi } from "../src/engine/worker.js";
import type { sieveHandlers } from "../src/jobs/sieve/kernel.js";

const pool2 = await nodePool(2);
const pool1 = await nodePool(1);
afterAll(() => {
  pool2.terminate();
  pool1.terminate();
});

describe("the worker pool", () => {
  it("cancel stops a long run at once and the pool runs again afterwards", async () => {
    const ctl = new AbortController();
    const t0 = performance.now();
    const run = runSieve(pool2, { map: parseMap("3x+1"), depth: 38, mode: "survivors" }, { signal: ctl.signal });
    setTimeout(() => ctl.abort(), 150);
    await expect(run).rejects.toBeInstanceOf(CancelledError);
    expect(performance.now() - t0).toBeLessThan(2000);
    const again = await runSieve(pool2, { map: parseMap("3x+1"), depth: 20, mode: "survivors" });
    expect(again.levels[20]!.survivors).toBe(A076227[20]);
  });

  it("the pool owner queues a job asked for during another, and resizes only between jobs", async () => {
    const { PoolOwner } = await import("../src/engine/pool.js");
    const made: number[] = [];
    const owner = new PoolOwner(async (n) => {
      made.push(n);
      return nodePool(n);
    });
    const order: string[] = [];
    const map = parseMap("3x+1");
    const long = owner.use(2, async (pool) => {
      const r = await runSieve(pool, { map, depth: 33, mode: "survivors" });
      order.push("long");
      return r;
    });
    const resized = owner.use(1, async (pool) => {
      order.push(`short on ${pool.size}`);
      return runSieve(pool, { map, depth: 20, mode: "survivors" });
    });
    expect(owner.pending).toBe(2);
    const [a, b] = await Promise.all([long, resized]);
    expect(order).toEqual(["long", "short on 1"]); // the running job was not stopped by the resize
    expect(a.levels.map((l) => l.survivors)).toEqual(exactCounts(map, 33).levels.map((l) => l.survivors));
    expect(b.levels[20]!.survivors).toBe(A076227[20]);
    expect(made).toEqual([2, 1]);
    // a job that fails does not block the next one
    await expect(owner.use(1, async () => Promise.reject(new Error("boom")))).rejects.toThrow("boom");
    expect((await owner.use(1, (pool) => runSieve(pool, { map, depth: 12, mode: "survivors" }))).levels[12]!.survivors).toBe(A076227[12]);
    owner.terminate();
  });

  it("a job waiting behind another is cancelled at once, and never starts", async () => {
    const { PoolOwner } = await import("../src/engine/pool.js");
    const owner = new PoolOwner((n) => nodePool(n));
    const map = parseMap("3x+1");
    let longDone = false;
    const long = owner.use(2, async (pool) => {
      const r = await runSieve(pool, { map, depth: 33, mode: "survivors" });
      longDone = true;
      return r;
    });
    const abort = new AbortController();
    let started = false;
    const queued = owner.use(
      2,
      async () => {
        started = true;
      },
      abort.signal,
    );
    abort.abort();
    await expect(queued).rejects.toBeInstanceOf(CancelledError);
    expect(longDone).toBe(false); // the wait ended before the running job did
    await long;
    await owner.use(2, async () => {}); // the queue has moved past it
    expect(started).toBe(false);
    owner.terminate();
  });

  it("a worker that fails rejects the run with a real Error, and the pool recovers (debug build assertions)", async () => {
    const debugPool = await nodePool(2, "debug");
    try {
      const bad = { q: 3, r: 1, depth: 10, mode: "survivors" as const, prefixBits: 2, prefix: 7n, leaves: false, walkTallies: false };
      await expect(
        debugPool.run(
          [bad],
          (api: JobApi<typeof sieveHandlers>, s) => api.runShard(s),
          () => {},
        ),
      ).rejects.toThrow(/kernel assertion failed/);
      const ok = await runSieve(debugPool, { map: parseMap("3x+1"), depth: 16, mode: "survivors" });
      expect(ok.levels[16]!.survivors).toBe(A076227[16]);
    } finally {
      debugPool.terminate();
    }
  });

  it("a worker that dies (uncaught error) ends the run with a message naming the cause", async () => {
    const { Worker } = await import("node:worker_threads");
    const { KernelPool } = await import("../src/engine/pool.js");
    const nodeEndpoint = (await import("comlink/dist/esm/node-adapter.mjs")).default;
    const dying = new KernelPool(
      () => {
        const w = new Worker("setTimeout(() => { throw new Error('simulated out of memory') }, 20)", { eval: true });
        return {
          endpoint: nodeEndpoint(w),
          terminate: () => void w.terminate(),
          onError: (l) => w.on("error", (e) => l(new Error(`worker failed: ${e.message}`))),
        };
      },
      pool1.module,
      1,
      pool1.build,
    );
    const shard = { q: 3, r: 1, depth: 10, mode: "survivors" as const, prefixBits: 0, prefix: 0n, leaves: false, walkTallies: true };
    await expect(
      dying.run(
        [shard],
        (api: JobApi<typeof sieveHandlers>, s) => api.runShard(s),
        () => {},
      ),
    ).rejects.toThrow(/worker failed: simulated out of memory/);
    dying.terminate();
  });
});
