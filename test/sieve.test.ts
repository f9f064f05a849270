// The sieve through the worker pool: published counts, shard merging, cancel, width boundaries.
import { afterAll, describe, expect, it } from "vitest";
import { kernelDepthLimit, parseMap } from "../src/core/map.js";
import { exactCounts } from "../src/core/exact.js";
import { runSieve } from "../src/jobs/sieve/sieve.js";
import { CancelledError } from "../src/engine/pool.js";
import { LimitError } from "../src/core/errors.js";
import { nodePool } from "../src/node/kernel.js";
import { A076227 } from "./published.js";
import { coefficientStop, kernelOf, rowSums, T } from "./helpers.js";

const pool2 = await nodePool(2);
const pool1 = await nodePool(1);
afterAll(() => {
  pool2.terminate();
  pool1.terminate();
});

describe("sieve on the pool: sanity", () => {
  it("3x+1 survivors to depth 32 match A076227 (OEIS, from memory) and the exact counter", async () => {
    const res = await runSieve(pool2, { map: parseMap("3x+1"), depth: 32, mode: "survivors" });
    expect(res.levels.map((l) => l.survivors)).toEqual(A076227);
    expect(res.levels).toEqual(exactCounts(parseMap("3x+1"), 32).levels);
    // nodes visited = the root and every live class: sum of survivors(j) (common practice)
    expect(res.nodes).toBe(A076227.reduce((s, x) => s + x, 0n));
    // the only positive exception for 3x+1 is n = 1 (Terras 1976, coefficient stopping time conjecture; common practice)
    expect(res.exceptions).toEqual([{ n: 1n, residue: 1n, classDepth: 2 }]);
  });

  it("the (j, m) tallies equal the exact counter's by-odd table, in both modes (5x+1, 3x-1)", async () => {
    for (const text of ["5x+1", "3x-1"]) {
      const map = parseMap(text);
      const exact = exactCounts(map, 22, { byOdd: true }).byOdd!;
      for (const mode of ["survivors", "full"] as const) {
        const res = await runSieve(pool2, { map, depth: 22, mode });
        res.live.forEach((row, j) => {
          const e = exact[j]!;
          row.forEach((c, m) => expect(c).toBe(m >= e.mLow ? (e.live[m - e.mLow] ?? 0n) : 0n));
        });
        expect(res.levels.map((l) => l.stopped)).toEqual(exactCounts(map, 22).levels.map((l) => l.stopped));
        if (mode === "full") expect(res.nodes).toBe((1n << 23n) - 1n);
      }
    }
  });

  it("1 worker and 2 workers give the same result; shards of the kernel sum to the one-shot run", async () => {
    const map = parseMap("3x+5");
    const a = await runSieve(pool1, { map, depth: 26, mode: "survivors" });
    const b = await runSieve(pool2, { map, depth: 26, mode: "survivors" });
    expect(b.levels).toEqual(a.levels);
    expect(b.live).toEqual(a.live);
    expect(b.nodes).toBe(a.nodes);
    expect(b.exceptions).toEqual(a.exceptions);
    // the kernel's own sharding: 2^d prefix shards with ancestor ownership sum to the whole run
    const kernel = await kernelOf("release");
    const req = { q: 3, r: 5, depth: 20, mode: "survivors" as const, leaves: false, walkTallies: true };
    const whole = kernel.enumerate({ ...req, prefixBits: 0, prefix: 0n });
    const d = 6;
    const live = new Array<bigint>(21).fill(0n);
    const stopped = new Array<bigint>(21).fill(0n);
    let nodes = 0n;
    let exc = 0;
    for (let s = 0n; s < 1n << BigInt(d); s++) {
      const part = kernel.enumerate({ ...req, prefixBits: d, prefix: s });
      rowSums(part.live, 20).forEach((x, j) => (live[j]! += x));
      rowSums(part.stopped, 20).forEach((x, j) => (stopped[j]! += x));
      nodes += part.nodes;
      exc += part.exceptionClasses.length;
    }
    expect(live).toEqual(rowSums(whole.live, 20));
    expect(stopped).toEqual(rowSums(whole.stopped, 20));
    expect(nodes).toBe(whole.nodes);
    expect(exc).toBe(whole.exceptionClasses.length);
  });

  it("3x+5: every member of its cycles whose class stops is listed as an exception (cycles found by direct iteration)", async () => {
    const map = parseMap("3x+5");
    const K = 30;
    const res = await runSieve(pool2, { map, depth: K, mode: "survivors" });
    const listed = new Set(res.exceptions.map((e) => e.n));
    // cycle minima 1, 5, 19, 23, 187, 347 (Lagarias 1990, "The set of rational cycles for the 3x+1 problem", from memory)
    for (const start of [1n, 5n, 19n, 23n, 187n, 347n]) {
      const cycle: bigint[] = [];
      let v = start;
      do {
        cycle.push(v);
        v = T(3n, 5n, v);
      } while (v !== start && cycle.length < 1000);
      expect(v).toBe(start); // it is a cycle
      expect(cycle.reduce((a, b) => (a < b ? a : b))).toBe(start); // and start is its minimum
      expect(listed.has(start) || coefficientStop(map, start, K) === null).toBe(true);
      for (const n of cycle) {
        const s = coefficientStop(map, n, K);
        if (s !== null && s.image >= n) expect(listed.has(n)).toBe(true);
      }
      expect(listed.has(start)).toBe(true);
    }
  });
});

describe("sieve on the pool: special", () => {
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

  it("a worker that fails rejects the run with a real Error, and the pool recovers (debug build assertions)", async () => {
    const debugPool = await nodePool(2, "debug");
    try {
      const bad = { q: 3, r: 1, depth: 10, mode: "survivors" as const, prefixBits: 2, prefix: 7n, leaves: false, walkTallies: false };
      await expect(debugPool.run([bad], (api, s) => api.runShard(s), () => {})).rejects.toThrow(/kernel assertion failed/);
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
        return { endpoint: nodeEndpoint(w), terminate: () => void w.terminate(), onError: (l) => w.on("error", (e) => l(new Error(`worker failed: ${e.message}`))) };
      },
      pool1.module,
      1,
    );
    const shard = { q: 3, r: 1, depth: 10, mode: "survivors" as const, prefixBits: 0, prefix: 0n, leaves: false, walkTallies: true };
    await expect(dying.run([shard], (api, s) => api.runShard(s), () => {})).rejects.toThrow(/worker failed: simulated out of memory/);
    dying.terminate();
  });

  // Width boundaries: 3^40 < 2^64 < 3^41 and 5^27 < 2^64 < 5^28 (common practice).
  for (const [text, limit] of [["3x+1", 40], ["5x+1", 27], ["3x-1", null], ["3x+5", null]] as const) {
    it(`${text}: the deepest exact depth runs the extreme all-odd classes exactly; one deeper is refused`, async () => {
      const map = parseMap(text);
      const K = kernelDepthLimit(map);
      if (limit !== null) expect(K).toBe(limit);
      // the largest images: the shard of the all-ones prefix at depth K - 3 holds the all-odd path
      const kernel = await kernelOf("debug");
      const d = K - 3;
      const leaves: { a: bigint; m: number; b: bigint }[] = [];
      kernel.enumerate({ q: map.q, r: map.r, depth: K, mode: "full", prefixBits: d, prefix: (1n << BigInt(d)) - 1n, leaves: true, walkTallies: false }, (c) => {
        for (let i = 0; i < c.a.length; i++) leaves.push({ a: c.a[i]!, m: c.m[i]!, b: BigInt(c.b[i]!) });
      });
      expect(leaves.length).toBe(8);
      const q = BigInt(map.q), r = BigInt(map.r);
      for (const leaf of leaves) {
        let v = leaf.a;
        let m = 0;
        for (let s = 0; s < K; s++) {
          if (((v % 2n) + 2n) % 2n === 1n) m++;
          v = T(q, r, v);
        }
        expect(leaf.m).toBe(m);
        expect(leaf.b).toBe(v);
      }
      await expect(runSieve(pool2, { map, depth: K + 1, mode: "survivors" })).rejects.toBeInstanceOf(LimitError);
      await expect(runSieve(pool2, { map, depth: K + 1, mode: "survivors" })).rejects.toThrow(/beyond the exact 64-bit range/);
    });
  }
});
