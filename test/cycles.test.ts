// The cycle search against published cycles and a brute force over |n| below a bound.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { searchCycles, CycleCollector } from "../src/jobs/cycles/cycles.js";
import { LimitError, UsageError } from "../src/core/errors.js";
import { nodePool } from "../src/node/kernel.js";
import { kernelOf } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const maps = ["3x+1", "3x-1", "3x+5", "5x+1"].map(parseMap);
import { bruteCycles, iterateBig } from "./brute.js";

describe("cycles: published values", () => {
  it("3x+1 to period 30: {1, 2} the only positive cycle; negative cycles of -1, -5, -17 with periods 1, 3, 11 (common practice)", async () => {
    const r = await searchCycles(pool, parseMap("3x+1"), 30);
    expect(r.cycles.map((c) => [c.representative, c.period])).toEqual([
      [1n, 2],
      [-1n, 1],
      [-5n, 3],
      [-17n, 11],
    ]);
    expect(r.nodes).toBe((1n << 31n) - 1n);
  });
  it("3x+5 to period 27: minima 1 (3), 5 (2), 19 (5), 23 (5), 187 (27), 347 (27) (Lagarias 1990, from memory)", async () => {
    const r = await searchCycles(pool, parseMap("3x+5"), 27);
    const pos = r.cycles.filter((c) => c.representative > 0n).map((c) => [c.min, c.period]);
    expect(pos).toEqual([
      [1n, 3],
      [5n, 2],
      [19n, 5],
      [23n, 5],
      [187n, 27],
      [347n, 27],
    ]);
  });
  it("5x+1 to period 28 (past the 64-bit range: the 128-bit path): 1 (5), 13 (7), 17 (7) (common practice)", async () => {
    const r = await searchCycles(pool, parseMap("5x+1"), 28);
    expect(r.width).toBe(128);
    expect(r.cycles.filter((c) => c.representative > 0n).map((c) => [c.min, c.period])).toEqual([
      [1n, 5],
      [13n, 7],
      [17n, 7],
    ]);
  });
});

describe("cycles: brute force and widths", () => {
  for (const map of maps) {
    it(`${map.name}: every cycle found from |n| <= 1000 by iteration is in the complete search, and conversely`, async () => {
      const K = 20;
      const r = await searchCycles(pool, map, K);
      const brute = bruteCycles(map, 1000, K);
      const listed = new Map(
        r.cycles
          .filter((c) => (c.representative < 0n ? -c.representative : c.representative) <= 1000n)
          .map((c) => [c.representative, c.period]),
      );
      expect(listed).toEqual(brute);
      for (const c of r.cycles) expect(iterateBig(map, c.representative, c.period)).toBe(c.representative);
    });
  }
  it("the 128-bit kernel path finds exactly what the 64-bit path finds (3x+1, 3x-1 to depth 18)", async () => {
    const kernel = await kernelOf("debug");
    for (const map of [parseMap("3x+1"), parseMap("3x-1")]) {
      const narrow = new CycleCollector(map),
        wide = new CycleCollector(map);
      const base = { q: map.q, r: map.r, depth: 18, prefixBits: 0, prefix: 0n, walkTallies: true };
      narrow.add(kernel.cycles({ ...base, wide: false }).candidates);
      wide.add(kernel.cycles({ ...base, wide: true }).candidates);
      expect(wide.sorted()).toEqual(narrow.sorted());
      expect(wide.candidates).toBe(narrow.candidates);
    }
  });
  it("refuses periods beyond the 128-bit range", async () => {
    await expect(searchCycles(pool, parseMap("99x+1"), 30)).rejects.toBeInstanceOf(LimitError);
    await expect(searchCycles(pool, parseMap("3x+1"), 0)).rejects.toBeInstanceOf(UsageError);
  });
});
