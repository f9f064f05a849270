// A range [1, 2^N) settled class by class (the kernel's verifyClasses): against the BigInt brute force,
// the published record lists, the run by periods, and a search in BigInt for the preimage skip.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import { blockSize, planVerify } from "../src/jobs/verify/plan.js";
import { pathBounds } from "../src/jobs/verify/tables.js";
import { traceBig } from "../src/jobs/verify/trace.js";
import { Kernel } from "../src/engine/loader.js";
import { loadKernelModule, nodePool } from "../src/node/kernel.js";
import { toExactJson } from "../src/core/json.js";
import { verifyJson } from "../src/jobs/verify/certificate.js";
import { bruteVerify, expectAgrees } from "./brute.js";
import { T } from "./helpers.js";
import type { VerifyResult } from "../src/jobs/verify/merge.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());

/** What a run found, without its method, time and blocks. */
const found = (r: VerifyResult) =>
  toExactJson({
    glideRecords: r.glideRecords,
    pathRecords: r.pathRecords,
    cycleMembers: r.cycleMembers,
    cycleEntrants: r.cycleEntrants,
    unresolved: r.unresolvedList,
    maxGlide: r.maxGlide,
    maxPath: r.maxPath,
  });

/** Whether some u < n reaches n under 3x+1 within three steps with every value on the way above u (a search backwards). */
function reachedFromBelow(n: bigint): boolean {
  const search = (x: bigint, depth: number, floor: bigint): boolean => {
    // the predecessors of x: 2x, and (2x - 1)/3 when odd; each below every value after it to be a u
    if (depth === 3) return false;
    for (const u of [2n * x, (2n * x - 1n) % 3n === 0n && ((2n * x - 1n) / 3n) % 2n === 1n ? (2n * x - 1n) / 3n : 0n]) {
      if (u <= 0n) continue;
      if (u < floor && u < n) return true;
      if (search(u, depth + 1, u < floor ? u : floor)) return true;
    }
    return false;
  };
  return search(n, 0, n);
}

/** The run's counts with the skipped leaves among the checked, as the brute force counts them. */
const withSkipped = (r: VerifyResult): VerifyResult => ({ ...r, counts: { ...r.counts, checked: r.counts.checked + r.counts.preimage } });

describe("verify by classes: the plan", () => {
  it("takes [1, 2^N) and [2^f, 2^N) by classes, to depth N, unless a sieve depth is given, r < 0, or the range is another", () => {
    const map = parseMap("3x+1");
    const p = planVerify({ map, from: 1n, to: 1n << 30n });
    expect([p.method, p.sieveDepth, p.preimage]).toEqual(["classes", 30, true]);
    expect(p.blocks.every((b) => b.kind === "classes")).toBe(true);
    expect(planVerify({ map, from: 1n, to: 1n << 30n, sieveDepth: 20 }).method).toBe("periods");
    expect(planVerify({ map, from: 1n, to: 1n << 30n, classes: false }).method).toBe("periods");
    expect(planVerify({ map, from: 1n, to: 1n << 30n, preimage: false }).preimage).toBe(false);
    expect(planVerify({ map, from: 3n, to: 1n << 30n }).method).toBe("periods");
    // [2^f, 2^N): by classes too (the numbers below 2^f left out)
    const p20 = planVerify({ map, from: 1n << 20n, to: 1n << 30n });
    expect(p20.method).toBe("classes");
    expect(p20.blocks.reduce((t, b) => t + blockSize(b), 0n)).toBe((1n << 30n) - (1n << 20n));
    expect(planVerify({ map, from: 1n, to: (1n << 30n) + 1n }).method).toBe("periods");
    expect(planVerify({ map: parseMap("3x-1"), from: 1n, to: 1n << 20n }).method).toBe("periods");
    // past the map's 64-bit depth (40 for 3x+1): by periods
    expect(planVerify({ map, from: 1n, to: 1n << 41n }).method).toBe("periods");
    // a class settled at depth j counts its members as descending at step j: within the step cap only
    expect(planVerify({ map, from: 1n, to: 1n << 30n, maxSteps: 29 }).method).toBe("periods");
  });

  it("the path bounds: the largest path of [from, from + 2^(i-1)), from probes iterated here (every number near from)", () => {
    const map = parseMap("3x+1");
    for (const from of [1n, 1n << 20n]) {
      const b = pathBounds(map, 30, 100_000, from);
      // the largest path of the numbers of [from, from + 2^(i-1)), by plain iteration here (the value before
      // the first one below n; n itself for 1, on its cycle)
      const pathOf = (n: bigint) => {
        let v = n,
          max = n;
        do {
          v = T(3n, 1n, v);
          if (v > max) max = v;
        } while (v > n);
        return n === 1n ? 1n : max;
      };
      let best = 0n;
      let n = from;
      for (let i = 1; i <= 13; i++) {
        for (; n < from + (1n << BigInt(i - 1)); n++) if (pathOf(n) > best) best = pathOf(n);
        expect((b[2 * i + 1]! << 64n) | b[2 * i]!).toBe(best);
      }
      expect(b[0]).toBe(0n); // band 0: n = from, no smaller number of the range
    }
    // 27 (below 1 + 2^5) rises to 9232 under 3n + 1 (common practice): 4616 under T
    expect(pathBounds(map, 14, 100_000, 1n)[2 * 6]).toBe(4616n);
  });
});

describe("verify by classes: against the brute force", () => {
  it("3x+1 over [1, 2^20): records, maxima, lists and the counts by depth (the skipped leaves among the checked)", async () => {
    const map = parseMap("3x+1");
    const r = await runVerify(pool, { map, from: 1n, to: 1n << 20n });
    expect([r.method, r.preimage]).toEqual(["classes", true]);
    // the brute force counts each leaf that descends as checked; the run skips the preimage leaves
    expectAgrees(withSkipped(r), bruteVerify(map, 1n, 1n << 20n, 100_000, 20));
    // survivors of the depth-20 sieve: OEIS A076227 (27328 at depth 20, from memory)
    expect(r.counts.checked + r.counts.preimage).toBe(27328n);
    // the skipped ones, counted here: each n below 2^20 whose class is alive at depth 20 (plain
    // arithmetic: values stay below 2^53) and that a smaller u reaches within three steps, above u
    let skippable = 0n;
    for (let n = 1; n < 2 ** 20; n++) {
      let v = n,
        m = 0,
        alive = true;
      for (let j = 1; j <= 20 && alive; j++) {
        if (v % 2 === 1) {
          v = (3 * v + 1) / 2;
          m++;
        } else v /= 2;
        alive = 3 ** m > 2 ** j;
      }
      if (alive && reachedFromBelow(BigInt(n))) skippable++;
    }
    expect(r.counts.preimage).toBe(skippable);
  });

  it("3x+1 over [1, 2^N) for N = 9 to 12: small trees, where a leaf's path bound decides a record (255, OEIS A006884)", async () => {
    // 255 is a path record of 3x+1 (OEIS A006884, from memory): the one leaf of depth 9 to 12 whose path beats its band
    const map = parseMap("3x+1");
    for (let N = 9; N <= 12; N++) {
      const r = await runVerify(pool, { map, from: 1n, to: 1n << BigInt(N) });
      expect(r.method).toBe("classes");
      expectAgrees(withSkipped(r), bruteVerify(map, 1n, 1n << BigInt(N), 100_000, N));
      expect(r.pathRecords.map((p) => p.n)).toContain(255n);
    }
  });

  for (const [text, N, cap] of [
    ["3x+5", 16, 100_000],
    ["3x+7", 16, 100_000],
    ["3x+13", 16, 100_000],
    ["3x+65", 16, 100_000],
    ["5x+3", 14, 400],
    ["7x+1", 14, 400],
    ["9x+1", 12, 400],
  ] as const)
    it(`${text} over [1, 2^${N}), step cap ${cap}: the same records and lists (cycles and unresolved: the run drops the skip)`, async () => {
      const map = parseMap(text);
      const r = await runVerify(pool, { map, from: 1n, to: 1n << BigInt(N), maxSteps: cap });
      expect(r.method).toBe("classes");
      const b = bruteVerify(map, 1n, 1n << BigInt(N), cap, N);
      expectAgrees(withSkipped(r), b);
      // with anything but descents and members of cycles on the way, the run is redone without the skip
      if (b.unresolved.length > 0 || b.entrants.length > 0) expect([r.preimage, r.counts.preimage]).toEqual([false, 0n]);
    });

  for (const [text, f, N, cap] of [
    ["3x+1", 10, 16, 100_000],
    ["3x+7", 12, 16, 100_000],
    ["3x+65", 9, 15, 100_000],
    ["5x+3", 10, 14, 400],
  ] as const)
    it(`${text} over [2^${f}, 2^${N}): records relative to 2^${f}, lists and counts as the brute force's`, async () => {
      const map = parseMap(text);
      const from = 1n << BigInt(f),
        to = 1n << BigInt(N);
      const r = await runVerify(pool, { map, from, to, maxSteps: cap });
      expect(r.method).toBe("classes");
      expectAgrees(withSkipped(r), bruteVerify(map, from, to, cap, N));
    });

  it("values past a lowered limit (2^19) finished in BigInt: the same records, lists and counts", async () => {
    const map = parseMap("3x+1");
    const r = await runVerify(pool, { map, from: 1n, to: 1n << 18n, limitBits: 19 });
    expect(r.method).toBe("classes");
    expect(r.handoffs).toBeGreaterThan(0n);
    expectAgrees(withSkipped(r), bruteVerify(map, 1n, 1n << 18n, 100_000, 18));
  });

  it("1, 7 and 300 blocks, one worker or two, and without the skip: the same records and lists", async () => {
    const map = parseMap("3x+1");
    const one = await runVerify(pool, { map, from: 1n, to: 1n << 24n, blocks: 1 });
    for (const req of [{ blocks: 7 }, { blocks: 300 }, { preimage: false }])
      expect(found(await runVerify(pool, { map, from: 1n, to: 1n << 24n, ...req }))).toBe(found(one));
    expect(toExactJson({ ...verifyJson(one), seconds: 0 })).toContain('"method":"classes"');
  });
});

describe("verify by classes: published records", () => {
  it("3x+1 over [1, 2^32): the glide records (OEIS A060412) and path records (OEIS A006884), as the run by periods finds them", async () => {
    const map = parseMap("3x+1");
    const r = await runVerify(pool, { map, from: 1n, to: 1n << 32n });
    expect(r.method).toBe("classes");
    // OEIS A060412 below 2^32 (the first 20 terms as in verify.test.ts; 1200991791 on from memory)
    const a060412 = [
      2, 3, 7, 27, 703, 10087, 35655, 270271, 362343, 381727, 626331, 1027431, 1126015, 8088063, 13421671, 20638335, 26716671, 56924955,
      63728127, 217740015, 1200991791, 1827397567, 2788008987,
    ].map(BigInt);
    expect(r.glideRecords.map((g) => g.n)).toEqual(a060412);
    // OEIS A006884 below 2^32 (from memory)
    const a006884 = [
      1, 2, 3, 7, 15, 27, 255, 447, 639, 703, 1819, 4255, 4591, 9663, 20895, 26623, 31911, 60975, 77671, 113383, 138367, 159487, 270271,
      665215, 704511, 1042431, 1212415, 1441407, 1875711, 1988859, 2643183, 2684647, 3041127, 3873535, 4637979, 5656191, 6416623, 6631675,
      19638399, 38595583, 80049391, 120080895, 210964383, 319804831, 1410123943,
    ].map(BigInt);
    expect(r.pathRecords.map((p) => p.n)).toEqual(a006884);
    // each record's values by plain iteration here
    for (const g of r.glideRecords.slice(-3)) {
      const t = traceBig(map, g.n, 100_000, 0);
      expect(t.steps + t.odd).toBe(g.standardSteps);
    }
    const periods = await runVerify(pool, { map, from: 1n, to: 1n << 32n, classes: false });
    expect(found(r)).toBe(found(periods));
    expect(r.counts.checked + r.counts.preimage).toBe(41347483n); // A076227 at depth 32 (from memory)
  });
});

describe("verify by classes: the preimage skip", () => {
  it("skips exactly the n with a smaller u that reaches n within three steps, staying above u (a search in BigInt)", async () => {
    const kernel = await Kernel.instantiate(await loadKernelModule("debug"));
    for (const text of ["3x+1", "3x+5", "3x+65", "5x+3", "7x+1", "9x+1", "11x+3"]) {
      const map = parseMap(text);
      const q = BigInt(map.q),
        r = BigInt(map.r);
      // below 2^12, and a stretch far up (where the kernel reads a residue table mod q^2)
      const bound = 1n << 12n;
      // every u below the bound, three steps: each n reached above u, the values before it above u too
      const reached = new Set<bigint>();
      for (let u = 1n; u < bound; u++) {
        let v = u;
        for (let s = 0; s < 3; s++) {
          v = T(q, r, v);
          if (v <= u) break;
          reached.add(v);
        }
      }
      for (let n = 1n; n < bound; n++) {
        const u = BigInt(kernel.call("verifyPreimage", [map.q, map.r, n]));
        expect(u !== 0n, `${text}: n = ${n}`).toBe(reached.has(n));
        if (u !== 0n) {
          // u < n reaches n, every value on the way above u
          let v = u,
            s = 0;
          for (; s < 3 && v !== n; s++) {
            v = T(q, r, v);
            expect(v > u).toBe(true);
          }
          expect(v).toBe(n);
        }
      }
    }
    // 3x+1: n = 2 (mod 3) or n = 4 (mod 9) (common practice), every n from 5 on, also near 2^40
    for (const n of [
      ...Array.from({ length: 995 }, (_, i) => BigInt(i + 5)),
      ...Array.from({ length: 200 }, (_, i) => (1n << 40n) + BigInt(i)),
    ])
      expect(BigInt(kernel.call("verifyPreimage", [3, 1, n])) !== 0n).toBe(n % 3n === 2n || n % 9n === 4n);
  });
});
