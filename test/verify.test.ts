// Verification runs against published record lists and a plain BigInt brute force written here.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import { traceBig } from "../src/jobs/verify/trace.js";
import { earlyDescentBound } from "../src/jobs/verify/tables.js";
import { planVerify } from "../src/jobs/verify/plan.js";
import type { BlockEntry } from "../src/jobs/verify/block.js";
import type { VerifyResult } from "../src/jobs/verify/merge.js";
import { LimitError, UsageError } from "../src/core/errors.js";
import { toExactJson } from "../src/core/json.js";
import { verifyJson } from "../src/jobs/verify/certificate.js";
import { nodePool } from "../src/node/kernel.js";
import { bruteVerify as brute, expectAgrees } from "./brute.js";

const pool = await nodePool(2);
const pool1 = await nodePool(1);
afterAll(() => {
  pool.terminate();
  pool1.terminate();
});

const stable = (r: VerifyResult) => toExactJson({ ...verifyJson(r), seconds: 0, blockCount: 0, blockTarget: null });

describe("verify: published records", () => {
  it("3x+1 from 1 below 2^28: glide records are OEIS A060412 (both odd and halving steps counted)", async () => {
    const r = await runVerify(pool, { map: parseMap("3x+1"), from: 1n, to: 1n << 28n, sieveDepth: 20 });
    // OEIS A060412, the first 20 terms (the list; terms below 2^28)
    const a060412 = [
      2, 3, 7, 27, 703, 10087, 35655, 270271, 362343, 381727, 626331, 1027431, 1126015, 8088063, 13421671, 20638335, 26716671, 56924955,
      63728127, 217740015,
    ].map(BigInt);
    expect(r.glideRecords.map((g) => g.n)).toEqual(a060412);
    expect(r.cycleMembers).toEqual([{ n: 1n, period: 2 }]);
    expect(r.counts.unresolved).toBe(0n);
    // the published path records (OEIS A006884, from memory) up to 704511, in the same run
    const a006884 = [
      1, 2, 3, 7, 15, 27, 255, 447, 639, 703, 1819, 4255, 4591, 9663, 20895, 26623, 31911, 60975, 77671, 113383, 138367, 159487, 270271,
      665215, 704511,
    ].map(BigInt);
    expect(r.pathRecords.slice(0, a006884.length).map((p) => p.n)).toEqual(a006884);
    // their maxima, by direct iteration here (T's values: the standard 3n+1 value is twice the largest)
    for (const p of r.pathRecords.slice(1, a006884.length)) {
      let v = p.n,
        max = p.n;
      do {
        v = v % 2n === 0n ? v / 2n : (3n * v + 1n) / 2n;
        if (v > max) max = v;
      } while (v >= p.n);
      expect(max).toBe(p.peakT);
    }
    expect(r.pathRecords.find((p) => p.n === 27n)!.peakT).toBe(9232n / 2n); // 27 rises to 9232 (common practice)
  });

  it("agrees with a plain BigInt brute force on every n of [1, 2^16), for sieve depths 6, 12 and 16", async () => {
    const map = parseMap("3x+1");
    for (const sieveDepth of [6, 12, 16])
      expectAgrees(
        await runVerify(pool, { map, from: 1n, to: 1n << 16n, sieveDepth, stepDepth: 8 }),
        brute(map, 1n, 1n << 16n, 100_000, sieveDepth),
      );
  });
});

describe("verify: delays", () => {
  it("3x+1 delay records from 1 are OEIS A006877 (steps to reach 1, standard steps), also through BigInt handoffs", async () => {
    // OEIS A006877: the first 30 terms (the list)
    const a006877 = [
      1, 2, 3, 6, 7, 9, 18, 25, 27, 54, 73, 97, 129, 171, 231, 313, 327, 649, 703, 871, 1161, 2223, 2463, 2919, 3711, 6171, 10971, 13255,
      17647, 23529,
    ].map(BigInt);
    const map = parseMap("3x+1");
    const r = await runVerify(pool, { map, from: 1n, to: 1n << 15n, sieveDepth: 10, delay: true });
    expect(r.delay!.records.map((d) => d.n).slice(0, a006877.length)).toEqual(a006877);
    expect(r.delay!.unreached).toBe(0n);
    // every delay of the range by plain iteration here: the same records and maximum
    let best = -1;
    const brute: bigint[] = [];
    for (let n = 1n; n < 1n << 15n; n++) {
      let v = n,
        std = 0;
      while (v !== 1n) {
        if (v % 2n === 0n) {
          v /= 2n;
          std++;
        } else {
          v = (3n * v + 1n) / 2n;
          std += 2;
        }
      }
      if (std > best) {
        best = std;
        brute.push(n);
      }
    }
    expect(r.delay!.records.map((d) => d.n)).toEqual(brute);
    expect(r.delay!.max!.standardSteps).toBe(best);
    const low = await runVerify(pool, { map, from: 1n, to: 1n << 15n, sieveDepth: 10, delay: true, limitBits: 20 });
    expect(low.handoffs).toBeGreaterThan(0n);
    expect(low.delay).toEqual(r.delay);
  });
});

describe("verify: far ranges and other maps, against the brute force", () => {
  const cases: [string, bigint, bigint, number][] = [
    ["3x+1", 1n << 40n, (1n << 40n) + (1n << 20n), 20],
    ["3x+1", 1n << 60n, (1n << 60n) + (1n << 16n), 12],
    ["3x+1", (1n << 64n) - (1n << 16n), 1n << 64n, 16],
    // the kernel takes n as a 128-bit pair: across 2^64, at the published frontier 2^71, past 2^100,
    // and just below 2^127, where values pass 128 bits and go to BigInt (handoffs)
    ["3x+1", (1n << 64n) - (1n << 12n) + 3n, (1n << 64n) + (1n << 13n) + 5n, 10],
    ["3x+1", 1n << 71n, (1n << 71n) + (1n << 16n), 12],
    ["5x+3", (1n << 100n) + 7n, (1n << 100n) + (1n << 12n), 8],
    ["3x+1", (1n << 127n) - (1n << 13n), 1n << 127n, 10],
  ];
  for (const [text, from, to, sieveDepth] of cases) {
    it(`${text} over [${from}, ${to}): every n's glide and path summarised identically`, async () => {
      const map = parseMap(text);
      const cap = text.startsWith("5x") ? 3000 : 100_000;
      const r = await runVerify(pool, { map, from, to, sieveDepth, stepDepth: 16, maxSteps: cap });
      expect(r.engine).toBe("kernel");
      if (from >> 126n !== 0n) expect(r.handoffs).toBeGreaterThan(0n);
      expectAgrees(r, brute(map, from, to, cap, sieveDepth));
    });
  }
  it("3x+5: its cycle members are reported as such (minima 1, 5, 19, 23, 187, 347; Lagarias 1990, from memory)", async () => {
    const map = parseMap("3x+5");
    const r = await runVerify(pool, { map, from: 1n, to: 40_000n, sieveDepth: 12, stepDepth: 8 });
    expectAgrees(r, brute(map, 1n, 40_000n, 100_000, 12));
    expect(r.cycleMembers.map((c) => c.n)).toEqual([1n, 5n, 19n, 23n, 187n, 347n]);
    // n such as 3 enter the cycle of 19 without going below themselves (3 -> 7 -> 13 -> 22 -> 11 -> 19)
    expect(r.cycleEntrants.find((e) => e.n === 3n)).toEqual({ n: 3n, cycleMin: 19n, period: 5 });
  });
  it("5x+1: the trajectories that pass the step cap are listed exactly as unresolved", async () => {
    const map = parseMap("5x+1");
    const r = await runVerify(pool, { map, from: 1n, to: 4000n, sieveDepth: 8, stepDepth: 8, maxSteps: 5000 });
    const b = brute(map, 1n, 4000n, 5000, 8);
    expect(b.unresolved.length).toBeGreaterThan(100);
    expectAgrees(r, b);
    // 5x+1 cycles: 1 (period 5), 13 and 17 (7) (common practice)
    expect(r.cycleMembers.map((c) => [c.n, c.period])).toEqual([
      [1n, 5],
      [13n, 7],
      [17n, 7],
    ]);
  });
  it("3x-1 (r < 0) runs in the kernel and agrees too (cycles of 1, 5, 17: common practice)", async () => {
    const map = parseMap("3x-1");
    for (const K of [10, 16]) {
      const r = await runVerify(pool, { map, from: 1n, to: 1n << 17n, sieveDepth: K });
      expect(r.engine).toBe("kernel");
      expectAgrees(r, brute(map, 1n, 1n << 17n, 100_000, K));
      expect(r.cycleMembers.map((c) => c.n)).toEqual([1n, 5n, 17n]);
    }
  });
  it("other maps with r < 0 in the kernel (an odd step that subtracts more than q: 3x-7, 5x-3, 7x-9)", async () => {
    for (const [text, to, K, cap] of [
      ["3x-7", 20_000n, 12, 100_000],
      ["5x-3", 4000n, 8, 3000],
      ["7x-9", 3000n, 6, 3000],
      // survivors that go below themselves before step K with every value positive (3x-4097: 1369;
      // 3x-65: 33): iterated from step 0, below the early-descent bound
      ["3x-4097", 20_000n, 12, 100_000],
      ["3x-65", 20_000n, 8, 100_000],
    ] as const) {
      const map = parseMap(text);
      const r = await runVerify(pool, { map, from: 1n, to, sieveDepth: K, stepDepth: 6, maxSteps: cap });
      expect(r.engine).toBe("kernel");
      expectAgrees(r, brute(map, 1n, to, cap, K));
    }
  });
  it("a period that ends at 2^64 (the carry into n's high word): its last sieved n iterated for the records", async () => {
    // 7x-9 at depth 3: the survivors mod 8 are 1, 3 and 5 (found here below), so the period [2^64 - 8, 2^64) ends with
    // the sieved 2^64 - 2 and 2^64 - 1, records of the period by the brute force (2^64 - 1 its longest glide)
    const map = parseMap("7x-9");
    const survivors = [0n, 1n, 2n, 3n, 4n, 5n, 6n, 7n].filter((a) => {
      let v = a,
        m = 0;
      for (let j = 1; j <= 3; j++) {
        if (v % 2n !== 0n) m++;
        v = v % 2n === 0n ? v / 2n : (7n * v - 9n) >> 1n;
        if (7 ** m < 2 ** j) return false;
      }
      return true;
    });
    expect(survivors).toEqual([1n, 3n, 5n]);
    const from = (1n << 64n) - 8n * 16n,
      to = (1n << 64n) + 8n * 16n;
    const r = await runVerify(pool, { map, from, to, sieveDepth: 3, stepDepth: 4, maxSteps: 3000, blocks: 32 });
    expect(r.engine).toBe("kernel");
    expect(r.entries.length).toBe(32);
    for (const e of r.entries) {
      const b = brute(map, e.first, e.last + 1n, 3000, 3);
      expect(e.kind).toBe("aligned");
      expect(
        e.glideRecords.map((g) => g.n),
        `block from ${e.first}`,
      ).toEqual(b.glideRecords);
      expect(
        e.pathRecords.map((p) => p.n),
        `block from ${e.first}`,
      ).toEqual(b.pathRecords);
    }
    const last = brute(map, (1n << 64n) - 8n, 1n << 64n, 3000, 3);
    expect(last.glideRecords.at(-1)).toBe((1n << 64n) - 1n);
    expectAgrees(r, brute(map, from, to, 3000, 3));
  });
  it("r < 0: each block's own records, one period a block, equal the brute force's (survivors that descend before step K)", async () => {
    // 3x-65 at depth 6: survivors 69, 81, 89, 101 and 133 go below themselves before step 6 with every value positive
    const map = parseMap("3x-65");
    const from = 64n;
    const r = await runVerify(pool, { map, from, to: from + 64n * 64n, sieveDepth: 6, stepDepth: 4, blocks: 64 });
    expect(r.entries.length).toBe(64);
    for (const e of r.entries) {
      const b = brute(map, e.first, e.last + 1n, 100_000, 6);
      expect(
        e.glideRecords.map((g) => g.n),
        `block from ${e.first}`,
      ).toEqual(b.glideRecords);
      expect(e.glideRecords.at(-1)?.standardSteps, `block from ${e.first}`).toBe(b.bestGlide);
    }
  });
  it("the early-descent bound of r < 0 holds: no n at or above it goes below itself before its class is cut", () => {
    // checked here by plain iteration well past the bound, for maps and depths of the tests above
    for (const [text, K] of [
      ["3x-1", 16],
      ["3x-7", 12],
      ["5x-3", 8],
    ] as const) {
      const map = parseMap(text);
      const B = earlyDescentBound(map, K);
      for (let n = B; n < B + 20_000n; n++) {
        const t = traceBig(map, n, 3000, K);
        if (t.outcome === "descent" && t.cutDepth !== null) expect(t.steps, `${text}: n = ${n}`).toBe(t.cutDepth);
        if (t.outcome === "descent" && t.cutDepth === null) expect(t.steps, `${text}: n = ${n}`).toBeGreaterThanOrEqual(K);
      }
    }
  });
});

describe("verify: ends that are not aligned, shallow sieves, and numbers past 2^64 and 2^100", () => {
  const cases: [string, bigint, bigint, number][] = [
    ["3x+1", (1n << 40n) + 12345n, (1n << 40n) + (1n << 20n) + 777n, 12],
    ["3x+1", 3n, 70_001n, 9],
    ["5x+1", 999n, 3001n, 7],
    // 13 and 17 of 5x+1 (cycles of period 7) are survivors of the depth-5 sieve: the kernel's fast path finds them
    ["5x+1", 1n, 2000n, 5],
    ["7x+3", 1n, 5000n, 6],
    ["3x+1", (1n << 64n) + 5n, (1n << 64n) + 3000n, 14],
    ["3x+1", (1n << 100n) + 1n, (1n << 100n) + 1500n, 16],
    ["3x+5", (1n << 65n) + (1n << 10n), (1n << 65n) + 3000n, 10],
    ["3x-1", (1n << 70n) + 7n, (1n << 70n) + 2000n, 12],
    // a large r: the path bounds' slack r (q/2)^L is as large as the values, so a bound without it would miss records
    ["3x+65535", 1n, 6000n, 8],
    ["5x+4095", 1n, 3000n, 6],
    ["3x-4097", 1n, 3000n, 8],
    // q^m v past 128 bits inside a survivor's first steps near 2^126: the path bound must say unbounded
    ["3x+1", (1n << 126n) + (1n << 20n), (1n << 126n) + (1n << 20n) + (1n << 13n), 5],
  ];
  for (const [text, from, to, K] of cases) {
    it(`${text} over [${from}, ${to}), sieve depth ${K}: counts by outcome and depth, records, maxima and lists`, async () => {
      const map = parseMap(text);
      const cap = text.startsWith("5x") || text === "7x+3" ? 3000 : 100_000;
      expectAgrees(await runVerify(pool, { map, from, to, sieveDepth: K, stepDepth: 6, maxSteps: cap }), brute(map, from, to, cap, K));
    });
  }
  it("3x-1: cycle members that survive the sieve (5 -> 7 -> 10 -> 5, 17 -> ... -> 17: common practice) have their first return as period", async () => {
    // a range's first period runs its survivors from step K, where a member is back at n after whole laps
    const map = parseMap("3x-1");
    const r = await runVerify(pool, { map, from: 5n, to: 3000n, sieveDepth: 9, stepDepth: 6 });
    expectAgrees(r, brute(map, 5n, 3000n, 100_000, 9));
    expect(r.cycleMembers.length).toBeGreaterThan(1);
    for (const { n, period } of r.cycleMembers) {
      let v = n;
      let t = 0;
      do {
        v = v & 1n ? (3n * v - 1n) >> 1n : v >> 1n;
        t++;
      } while (v !== n);
      expect(period, `period of ${n}`).toBe(t);
    }
  });
  it("handed off at a lowered limit (2^8), n of every outcome finished in BigInt agree with the brute force", async () => {
    // 3x+65535 has many sieve exceptions below r; 5x+1 cycles and unresolved n
    for (const [text, to, K, cap] of [
      ["3x+65535", 1500n, 8, 100_000],
      ["5x+1", 2000n, 5, 3000],
    ] as const) {
      const map = parseMap(text);
      const r = await runVerify(pool, { map, from: 1n, to, sieveDepth: K, stepDepth: 6, maxSteps: cap, limitBits: 8 });
      expect(r.handoffs).toBeGreaterThan(100n);
      expectAgrees(r, brute(map, 1n, to, cap, K));
    }
  });
  it("every survivor's glide and path in the kernel's fast path (depth-1 sieve, one period a block) equal BigInt iteration", async () => {
    // with K = 1 a block is {2h, 2h + 1}: 2h descends in one step, so the survivor 2h + 1 is always the block's own
    // glide and path record: the block table shows every odd n's glide and path as the kernel found them
    for (const [text, from, stepDepth] of [
      ["3x+1", (1n << 40n) + 2n, 8],
      ["3x+1", 1n << 20n, 12],
      ["5x+3", 1n << 30n, 6],
    ] as const) {
      const map = parseMap(text);
      const r = await runVerify(pool, { map, from, to: from + 4096n, sieveDepth: 1, stepDepth, blocks: 2048, maxSteps: 3000 });
      let seen = 0;
      for (const e of r.entries) {
        const n = e.first + 1n;
        const t = traceBig(map, n, 3000, 0);
        if (t.outcome !== "descent") continue;
        expect(e.glideRecords.at(-1), `${text}: glide of ${n}`).toEqual({ n, steps: t.steps, standardSteps: t.steps + t.odd });
        expect(e.pathRecords.at(-1), `${text}: path of ${n}`).toEqual({ n, peakT: t.path });
        seen++;
      }
      expect(seen).toBeGreaterThan(1000);
    }
  });
  it("sieve depths 1 to 6 (the kernel's own cycle path runs) agree with the brute force", async () => {
    const map = parseMap("3x+1");
    for (let K = 1; K <= 6; K++) {
      for (const [from, to] of [
        [1n, 3000n],
        [(1n << 50n) + 11n, (1n << 50n) + 5000n],
      ] as const)
        expectAgrees(await runVerify(pool, { map, from, to, sieveDepth: K, stepDepth: 4 }), brute(map, from, to, 100_000, K));
    }
  });
  it("delay records past 2^100 by plain iteration here", async () => {
    const map = parseMap("3x+1");
    const from = (1n << 100n) + 1n;
    const r = await runVerify(pool, { map, from, to: from + 600n, sieveDepth: 10, delay: true });
    let best = -1;
    const records: bigint[] = [];
    for (let n = from; n < from + 600n; n++) {
      let v = n,
        std = 0;
      while (v !== 1n) {
        std += v % 2n === 0n ? 1 : 2;
        v = v % 2n === 0n ? v / 2n : (3n * v + 1n) / 2n;
      }
      if (std > best) {
        best = std;
        records.push(n);
      }
    }
    expect(r.delay!.records.map((d) => d.n)).toEqual(records);
    expect(r.delay!.max!.standardSteps).toBe(best);
  });
  it("delays of maps with r < 0 (an odd step may more than halve a small value) by plain iteration here", async () => {
    for (const text of ["3x-1", "3x-7", "3x-65", "5x-33"]) {
      const map = parseMap(text);
      const [q, r] = [BigInt(map.q), BigInt(map.r)];
      const cap = 2000;
      const res = await runVerify(pool, { map, from: 1n, to: 6000n, sieveDepth: 8, stepDepth: 8, delay: true, maxSteps: cap });
      let best = -1;
      let unreached = 0n;
      const records: bigint[] = [];
      for (let n = 1n; n < 6000n; n++) {
        let v = n;
        let t = 0;
        let std = 0;
        for (; v !== 1n && t < cap; t++) {
          std += (v & 1n) === 0n ? 1 : 2;
          v = (v & 1n) === 0n ? v >> 1n : (q * v + r) >> 1n;
        }
        if (v !== 1n) unreached++;
        else if (std > best) {
          best = std;
          records.push(n);
        }
      }
      expect(
        res.delay!.records.map((d) => d.n),
        text,
      ).toEqual(records);
      expect(res.delay!.unreached, text).toBe(unreached);
    }
  });
  it("a cycle member is one whatever the step cap (1 with a cap of 1; 19 of 3x+5 with a cap of 3)", async () => {
    // a cap below the sieve depth is refused: the sieve's classes descend at their cut depth
    expect(() => planVerify({ map: parseMap("3x+1"), from: 1n, to: 3n, maxSteps: 1, sieveDepth: 4 })).toThrow(/below the sieve depth/);
    const one = await runVerify(pool, { map: parseMap("3x+1"), from: 1n, to: 3n, maxSteps: 1, sieveDepth: 1 });
    expect(one.cycleMembers).toEqual([{ n: 1n, period: 2 }]);
    expect(one.cycleEntrants).toEqual([]);
    const five = await runVerify(pool, { map: parseMap("3x+5"), from: 1n, to: 40n, maxSteps: 3, sieveDepth: 3 });
    expect(five.cycleMembers.map((m) => m.n)).toContain(19n);
    expect(five.unresolvedList).not.toContain(19n);
  });
});

describe("verify: splits, resumes and the BigInt handoff give the same result", () => {
  const map = parseMap("3x+1");
  const from = (1n << 36n) + 12345n,
    to = from + (1n << 24n);
  it("1, 7 and 64 blocks, one worker or two: identical", async () => {
    const ref = await runVerify(pool, { map, from, to, sieveDepth: 14, blocks: 1 });
    for (const [p, blocks] of [
      [pool, 7],
      [pool1, 64],
      [pool, 64],
    ] as const) {
      expect(stable(await runVerify(p, { map, from, to, sieveDepth: 14, blocks }))).toBe(stable(ref));
    }
  });
  it("a run resumed from some of its blocks equals the whole run", async () => {
    const req = { map, from, to, sieveDepth: 14, blocks: 16 };
    const whole = await runVerify(pool, req);
    const done = new Map<number, BlockEntry>();
    await runVerify(pool, req, { onBlock: (res) => void (res.index % 3 === 0 && done.set(res.index, res)) });
    let ran = 0;
    const resumed = await runVerify(pool, req, { done, onBlock: () => void ran++ });
    expect(ran).toBe(planVerify(req).blocks.length - done.size);
    expect(stable(resumed)).toBe(stable(whole));
  });
  it("values past a lowered limit (2^44) are finished in BigInt with the same result", async () => {
    const f = 1n << 40n,
      t = f + (1n << 18n);
    const ref = await runVerify(pool, { map, from: f, to: t, sieveDepth: 12 });
    const low = await runVerify(pool, { map, from: f, to: t, sieveDepth: 12, limitBits: 44 });
    expect(low.handoffs).toBeGreaterThan(100n);
    expect(ref.handoffs).toBe(0n);
    expect({ ...verifyJson(low), handoffs: 0n, seconds: 0 }).toEqual({ ...verifyJson(ref), seconds: 0 });
  });
  it("consecutive ranges merge in order into the union's records (sweep against the running maximum)", async () => {
    const mid = from + (1n << 23n) + 99n;
    const a = await runVerify(pool, { map, from, to: mid, sieveDepth: 14 });
    const b = await runVerify(pool1, { map, from: mid, to, sieveDepth: 14 });
    const u = await runVerify(pool, { map, from, to, sieveDepth: 14 });
    const sweep = <T>(xs: T[], v: (x: T) => bigint) => {
      let best = -1n;
      return xs.filter((x) => {
        if (v(x) <= best) return false;
        best = v(x);
        return true;
      });
    };
    expect(sweep([...a.glideRecords, ...b.glideRecords], (g) => BigInt(g.standardSteps))).toEqual(u.glideRecords);
    expect(sweep([...a.pathRecords, ...b.pathRecords], (p) => p.peakT)).toEqual(u.pathRecords);
  });
});

describe("verify: bad requests", () => {
  const map = parseMap("3x+1");
  it("refuses empty or reversed ranges, 0, depths out of range and huge BigInt runs", () => {
    expect(() => planVerify({ map, from: 10n, to: 10n })).toThrow(UsageError);
    expect(() => planVerify({ map, from: 0n, to: 10n })).toThrow(/at least 1/);
    expect(() => planVerify({ map, from: 1n, to: 10n, sieveDepth: 31 })).toThrow(LimitError);
    expect(() => planVerify({ map, from: 1n, to: 10n, stepDepth: 21 })).toThrow(LimitError);
    expect(planVerify({ map: parseMap("3x-1"), from: 1n, to: 1n << 30n }).engine).toBe("kernel");
    expect(planVerify({ map, from: 1n << 71n, to: (1n << 71n) + (1n << 30n) }).engine).toBe("kernel");
    expect(() => planVerify({ map, from: 1n << 127n, to: (1n << 127n) + (1n << 30n) })).toThrow(/at or above 2\^127/);
  });
});
