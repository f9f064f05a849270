// The census against a BigInt brute force over every residue, exact decisions and edges.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { runCensus, quarterLog2 } from "../src/jobs/census/census.js";
import { runSieve } from "../src/jobs/sieve/sieve.js";
import { exactCounts, peakCounts } from "../src/core/exact.js";
import { UsageError } from "../src/core/errors.js";
import { nodePool } from "../src/node/kernel.js";
import { coefficientStop, kernelOf, parities, T } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const maps = ["3x+1", "3x-1", "3x+5", "5x+1"].map(parseMap);
import { quarterBin } from "./brute.js";

describe("census: brute force", () => {
  for (const map of maps) {
    const K = map.q === 5 ? 12 : 14;
    it(`${map.name} at depth ${K}: every tally equals a direct computation over all 2^${K} vectors`, async () => {
      const c = await runCensus(pool, map, K);
      expect(c.agreesWithExactCounter).toBe(true);
      expect(c.levels).toEqual(exactCounts(map, K).levels);
      const q = BigInt(map.q);
      const peak = new Map<string, bigint>();
      const bins = new Map<number, bigint>();
      let nonpositive = 0n,
        differ = 0n;
      const differList: bigint[] = []; // ascending, since a runs upwards
      let best = { n: 1n, value: 1n };
      for (let a = 0n; a < 1n << BigInt(K); a++) {
        // the vector of class a is a's own parity vector (Terras); its peak of q^m/2^j, exactly
        const word = parities(map, a, K);
        let m = 0,
          pj = 0,
          pm = 0;
        word.forEach((p, i) => {
          m += p;
          if (q ** BigInt(m) * 2n ** BigInt(pj) > q ** BigInt(pm) * 2n ** BigInt(i + 1)) [pj, pm] = [i + 1, m];
        });
        peak.set(`${pj},${pm}`, (peak.get(`${pj},${pm}`) ?? 0n) + 1n);
        if (a === 0n) continue;
        let v = a,
          descent: number | null = null;
        for (let j = 1; j <= K; j++) {
          v = T(q, BigInt(map.r), v);
          if (descent === null && v < a) descent = j;
          if (v > 0n && v * best.n > best.value * a) best = { n: a, value: v };
        }
        if (v <= 0n) nonpositive++;
        else bins.set(quarterBin(a, v), (bins.get(quarterBin(a, v)) ?? 0n) + 1n);
        const stop = coefficientStop(map, a, K);
        if ((stop?.j ?? null) !== descent) {
          differ++;
          if (differList.length < 1000) differList.push(a);
        }
      }
      const kernelPeak = new Map<string, bigint>();
      c.peak.forEach((row, j) => {
        row.forEach((n, m) => {
          if (n > 0n) kernelPeak.set(`${j},${m}`, n);
        });
      });
      expect(kernelPeak).toEqual(peak);
      expect(new Map(c.ratioBins.map((b) => [b.bin, b.count]))).toEqual(bins);
      expect(c.nonpositive).toBe(nonpositive);
      expect(c.differ.count).toBe(differ);
      expect(c.maxRatio.value * best.n).toBe(best.value * c.maxRatio.n);
      expect(c.maxRatio.n).toBe(best.n); // ties: the smallest member (best only moves on a strictly larger ratio)
      expect(c.differ.listed.map((d) => d.n)).toEqual(differList.slice(0, c.differ.limit));
    });
  }
  it("capped lists are the smallest entries and deterministic: 3x-1001 at depth 14 (over 1,000 members differ)", async () => {
    const map = parseMap("3x-1001");
    const K = 14;
    const brute: bigint[] = [];
    for (let a = 1n; a < 1n << BigInt(K); a++) {
      let v = a,
        descent: number | null = null;
      for (let j = 1; j <= K && descent === null; j++) {
        v = T(3n, -1001n, v);
        if (v < a) descent = j;
      }
      if ((coefficientStop(map, a, K)?.j ?? null) !== descent) brute.push(a);
    }
    expect(brute.length).toBeGreaterThan(1000);
    const first = await runCensus(pool, map, K);
    const second = await runCensus(pool, map, K);
    expect(first.differ.count).toBe(BigInt(brute.length));
    expect(first.differ.listed.map((d) => d.n)).toEqual(brute.slice(0, 1000));
    expect(second.differ.listed).toEqual(first.differ.listed);
  });
  it("the largest ratio's ties go to the smallest n: 3x-7 at depth 2 is T^0(1)/1 = 1 (every member descends)", async () => {
    const c = await runCensus(pool, parseMap("3x-7"), 2);
    expect(c.maxRatio).toEqual({ n: 1n, step: 0, value: 1n });
  });
  it("quarter-unit log2 is exact at the edges: log2(2^(5/4)) boundary cases (common practice)", () => {
    expect(quarterLog2(1n, 1n)).toBe(0);
    expect(quarterLog2(1n, 2n)).toBe(4);
    expect(quarterLog2(2n, 1n)).toBe(-4);
    expect(quarterLog2(1000n, 1189n)).toBe(0); // 1.189 < 2^(1/4) = 1.18920...
    expect(quarterLog2(1000n, 1190n)).toBe(1);
  });
  it("peak coefficients by (j, m), a lattice-path count, equal a walk over every vector of length 18 (exact comparisons)", () => {
    for (const map of maps) {
      const K = 18,
        q = BigInt(map.q);
      const qpow = Array.from({ length: K + 1 }, (_, m) => q ** BigInt(m));
      const brute = Array.from({ length: K + 1 }, (_, j) => new Array<bigint>(j + 1).fill(0n));
      for (let v = 0; v < 1 << K; v++) {
        let m = 0,
          pj = 0,
          pm = 0;
        for (let j = 1; j <= K; j++) {
          if (((v >> (j - 1)) & 1) === 0) continue;
          m++;
          // the point (j, m) is above the peak so far when q^(m - pm) / 2^(j - pj) > 1
          if (qpow[m - pm]! > 1n << BigInt(j - pj)) [pj, pm] = [j, m];
        }
        brute[pj]![pm]!++;
      }
      expect(peakCounts(map.q, K), map.name).toEqual(brute);
    }
  });
  it("the census walk skips only subtrees with nothing to find: the same bins, descents and largest ratio as the walk of every node", async () => {
    const kernel = await kernelOf("debug");
    for (const [map, K] of [
      [parseMap("3x+1"), 22],
      [parseMap("3x-1"), 20],
      [parseMap("3x+5"), 20],
      [parseMap("5x+1"), 16],
    ] as const) {
      const req = { q: map.q, r: map.r, depth: K, prefixBits: 0, prefix: 0n };
      const pruned = kernel.census({ ...req, vectors: false });
      const full = kernel.census({ ...req, vectors: true }); // vectors mode visits all 2^(K+1) - 1 nodes
      expect(full.nodes).toBe((2n << BigInt(K)) - 1n);
      expect(pruned.nodes, map.name).toBeLessThan(full.nodes);
      for (const key of ["live", "stopped", "bins", "nonpositive", "differCount", "early", "slow"] as const)
        expect(pruned[key], `${map.name} ${key}`).toEqual(full[key]);
      const entries = (x: BigUint64Array) => Array.from({ length: x.length / 4 }, (_, i) => `${x[4 * i]},${x[4 * i + 1]}`).sort();
      expect(entries(pruned.differ)).toEqual(entries(full.differ));
      expect(entries(pruned.ambiguous)).toEqual(entries(full.ambiguous));
      // the largest ratio among the candidates, compared exactly (u, v as unsigned: both are positive)
      const bestOf = (x: BigUint64Array) => {
        let best = { u: 1n, v: 1n };
        for (let i = 0; i < x.length; i += 4) if (x[i + 1]! * best.u > best.v * x[i]!) best = { u: x[i]!, v: x[i + 1]! };
        return best;
      };
      expect(bestOf(pruned.ratio)).toEqual(bestOf(full.ratio));
    }
  });
  it("the census carries the sieve's exceptions (members of any size that do not descend at their class's stopping depth)", async () => {
    for (const [map, K] of [
      [parseMap("3x+1"), 24],
      [parseMap("3x+5"), 22],
      [parseMap("3x-1"), 20],
      [parseMap("5x+1"), 16],
    ] as const) {
      const [c, s] = [await runCensus(pool, map, K), await runSieve(pool, { map, depth: K, mode: "survivors" })];
      expect([c.exceptionCount, c.exceptions], map.name).toEqual([s.exceptionCount, s.exceptions]);
    }
    // 3x+5 has exceptions besides n = 1, among them its cycle members 5, 19 and 23 (the cycles test above)
    const c = await runCensus(pool, parseMap("3x+5"), 22);
    expect(c.exceptions.map((e) => e.n)).toEqual(expect.arrayContaining([1n, 5n, 19n, 23n]));
  });
  it("census depth 32 is the limit; beyond it a usage error", async () => {
    await expect(runCensus(pool, parseMap("3x+1"), 33)).rejects.toBeInstanceOf(UsageError);
  });
});
