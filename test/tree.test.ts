// The inverse tree against published counts (OEIS A005186, A060322) and a forward brute force in
// BigInt written here: every n below a bound iterated until it first reaches N.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { UsageError } from "../src/core/errors.js";
import { nodePool } from "../src/node/kernel.js";
import { makePlan } from "../src/engine/plan.js";
import { runTree, treeByBigInt, treeEdges, treeJob, walkWithEdges } from "../src/jobs/tree/tree.js";
import type { StepConvention, TreeParams } from "../src/jobs/tree/tree.js";
import { T } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());

const params = (map: string, n: bigint, depth: number, steps: StepConvention, below: bigint | null = null): TreeParams => ({
  map: parseMap(map),
  n,
  depth,
  steps,
  below,
});

/** One step: T, or the standard map n/2 | q n + r. */
function step(map: CollatzMap, steps: StepConvention, n: bigint): bigint {
  if (steps === "T") return T(BigInt(map.q), BigInt(map.r), n);
  return n % 2n === 0n ? n / 2n : BigInt(map.q) * n + BigInt(map.r);
}

/** By brute force: per j = 0..K, the n in [1, B) whose trajectory first reaches N after exactly j steps. */
function bruteLevels(map: CollatzMap, steps: StepConvention, N: bigint, K: number, B: bigint): bigint[] {
  const out = new Array<bigint>(K + 1).fill(0n);
  for (let n = 1n; n < B; n++) {
    let v = n;
    for (let j = 0; j <= K; j++) {
      if (v === N) {
        out[j]!++;
        break;
      }
      v = step(map, steps, v);
    }
  }
  return out;
}

describe("inverse tree: sanity", () => {
  it("3x+1, N = 1: first arrivals after j = 0..29 steps are OEIS A060322 (steps of T) and A005186 (standard steps)", async () => {
    // OEIS A060322 (published entry, terms 0..29)
    const a060322 = [
      1, 1, 1, 1, 2, 3, 4, 5, 6, 8, 12, 18, 24, 31, 39, 50, 68, 91, 120, 159, 211, 282, 381, 505, 665, 885, 1187, 1590, 2122, 2829,
    ];
    // OEIS A005186 (published entry, terms 0..29)
    const a005186 = [1, 1, 1, 1, 1, 2, 2, 4, 4, 6, 6, 8, 10, 14, 18, 24, 29, 36, 44, 58, 72, 91, 113, 143, 179, 227, 287, 366, 460, 578];
    const t = await runTree(pool, params("3x+1", 1n, 29, "T"));
    const s = await runTree(pool, params("3x+1", 1n, 29, "standard"));
    expect(t.levels.map((l) => l.nodes)).toEqual(a060322.map(BigInt));
    expect(s.levels.map((l) => l.nodes)).toEqual(a005186.map(BigInt));
    expect(t.engine).toBe("kernel");
  });

  it("every level is the level above plus its odd predecessors, less N where the cycle returns to it (common practice)", async () => {
    for (const [map, n] of [
      ["3x+1", 1n],
      ["3x+1", 7n],
      ["3x-1", 5n],
      ["3x+5", 19n],
      ["5x+1", 13n],
    ] as const) {
      for (const steps of ["T", "standard"] as const) {
        const r = await runTree(pool, params(map, n, 24, steps));
        r.levels.slice(1).forEach((l, i) => {
          const above = r.levels[i]!;
          const back = above.min !== null && n % 2n === 0n && n / 2n >= above.min && n / 2n <= above.max! ? 1n : 0n;
          expect(l.nodes, `${map} ${n} ${steps} depth ${l.depth}`).toBeLessThanOrEqual(above.nodes + above.withOdd);
          expect(l.nodes + back).toBeGreaterThanOrEqual(above.nodes + above.withOdd);
        });
        // the largest node at depth j is N 2^j when |r| <= N (as here): an odd predecessor (2y - r)/q is then at most
        // (2y + N)/3 <= N 2^j, so doubling gives the largest (an induction on j)
        for (const l of r.levels) expect(l.max).toBe(n << BigInt(l.depth));
      }
    }
  });
});

describe("inverse tree: against a forward brute force", () => {
  for (const [map, n, K, B] of [
    ["3x+1", 1n, 40, 1n << 14n],
    ["3x+1", 7n, 40, 1n << 14n],
    ["3x-1", 5n, 30, 1n << 13n],
    ["3x-1", 17n, 30, 1n << 13n],
    ["3x+5", 19n, 30, 1n << 13n],
    ["5x+1", 13n, 24, 1n << 12n],
  ] as const) {
    for (const steps of ["T", "standard"] as const) {
      it(`${map}, N = ${n}, ${steps} steps to depth ${K}: the nodes below ${B} at each depth`, async () => {
        const r = await runTree(pool, params(map, n, K, steps, B));
        expect(r.levels.map((l) => l.belowX)).toEqual(bruteLevels(parseMap(map), steps, n, K, B));
        expect(r.totalBelowX).toBe(r.levels.slice(1).reduce((s, l) => s + l.belowX!, 0n));
      });
    }
  }

  it("the kernel and the BigInt walk agree, and so do 1, 3 and 7 shards", async () => {
    for (const p of [params("3x+1", 1n, 30, "T", 1000n), params("3x-1", 7n, 26, "standard", 500n), params("5x+1", 1n, 22, "T")]) {
      const kernel = await runTree(pool, p);
      const big = treeByBigInt(p);
      expect(kernel.levels).toEqual(big.levels);
      expect(kernel.total).toBe(big.total);
      for (const shards of [3, 7]) {
        const plan = await makePlan(pool, treeJob, p, shards);
        const parts = [];
        for (let i = 0; i < shards; i++) parts.push(await treeJob.runShard(pool, plan, i));
        expect((await treeJob.merge(pool, plan, parts)).levels).toEqual(kernel.levels);
      }
      // tree --out: the one walk that writes the edges tallies the same levels, and hands each edge once
      const edges: bigint[] = [];
      const walked = await walkWithEdges(p, (e) => void edges.push(e.node));
      expect(walked.levels).toEqual(kernel.levels);
      expect(BigInt(edges.length)).toBe(kernel.total + 1n);
    }
  });

  it("N past 2^62 runs in BigInt: each edge is one step of the map, and the levels are the edges by depth", async () => {
    const N = (1n << 70n) + 1n; // 2^70 + 1 = 2 mod 3
    const r = await runTree(pool, params("3x+1", N, 30, "T"));
    expect(r.engine).toBe("bigint");
    const edges = [...treeEdges(parseMap("3x+1"), "T", N, 30)];
    for (const e of edges) if (e.parent !== null) expect(T(3n, 1n, e.node)).toBe(e.parent);
    const byDepth = new Array<bigint>(31).fill(0n);
    for (const e of edges) byDepth[e.depth]!++;
    expect(r.levels.map((l) => l.nodes)).toEqual(byDepth);
    // complete, by forward steps alone: every x with T(x) = y for a node y above depth 30 is a node one
    // depth down (T(x) = y needs x = 2y, or q x + r = 2y: x within a window around 2y/3, tried forward)
    const at = new Map(edges.map((e) => [e.node, e.depth]));
    for (const e of edges) {
      if (e.depth === 30) continue;
      const y = e.node;
      for (let x = (2n * y - 1n) / 3n - 2n; x <= (2n * y - 1n) / 3n + 2n; x++)
        if (x > 0n && T(3n, 1n, x) === y) expect(at.get(x), `odd predecessor ${x} of ${y}`).toBe(e.depth + 1);
      for (const x of [2n * y - 1n, 2n * y, 2n * y + 1n])
        if (T(3n, 1n, x) === y) expect(at.get(x), `predecessor ${x} of ${y}`).toBe(e.depth + 1);
    }
  });
});

describe("inverse tree: special", () => {
  it("refuses N <= 0, N a multiple of q (its tree is one chain) and depths out of range, with one line each", async () => {
    for (const [p, msg] of [
      [params("3x+1", 0n, 5, "T"), /N must be a positive integer/],
      [params("3x+1", 27n, 5, "T"), /multiple of q = 3: .*single chain N, 2N, 4N/],
      [params("5x+1", 10n, 5, "T"), /multiple of q = 5/],
      [params("3x+1", 1n, 101, "T"), /depth must be a whole number from 0 to 100/],
      [params("3x+1", 1n, 5, "T", 0n), /--below must be a positive integer/],
    ] as const) {
      await expect(runTree(pool, p)).rejects.toThrow(UsageError);
      await expect(runTree(pool, p)).rejects.toThrow(msg);
    }
  });

  it("depth 0 is N alone; N on a cycle is counted once (3x+1, N = 2: its predecessor 1 leads back to 2)", async () => {
    const zero = await runTree(pool, params("3x+1", 5n, 0, "T"));
    expect(zero.levels.map((l) => l.nodes)).toEqual([1n]);
    expect(zero.total).toBe(0n);
    // 2 <- 1 <- (2 again, not counted), 2 <- 4 <- 8 ...: forward brute force below 2^12
    const two = await runTree(pool, params("3x+1", 2n, 20, "T", 1n << 12n));
    expect(two.levels.map((l) => l.belowX)).toEqual(bruteLevels(parseMap("3x+1"), "T", 2n, 20, 1n << 12n));
  });
});
