import { describe, expect, it } from "vitest";
import { exactCounts } from "../src/core/exact.js";
import { makeMap, parseMap } from "../src/core/map.js";
import { A076227, A100982, A100982_DEPTHS } from "./published.js";

describe("exact counter: sanity", () => {
  const levels = exactCounts(parseMap("3x+1"), 32).levels;
  it("matches A076227 to depth 32", () => {
    expect(levels.map((l) => l.survivors)).toEqual(A076227);
  });
  it("stops only at 1 + floor(m log2 3), with the A100982 counts", () => {
    const nonzero = levels.filter((l) => l.stopped > 0n);
    expect(nonzero.map((l) => l.depth)).toEqual(A100982_DEPTHS);
    expect(nonzero.map((l) => l.stopped)).toEqual(A100982);
  });
  it("satisfies survivors(j) = 2 survivors(j-1) - stopped(j) (common practice)", () => {
    for (let j = 1; j <= 32; j++) expect(levels[j]!.survivors).toBe(2n * levels[j - 1]!.survivors - levels[j]!.stopped);
  });
  it("by-odd table sums to the level counts and is binomial before any stop (common practice)", () => {
    const c = exactCounts(makeMap(5, 1), 20, { byOdd: true });
    c.byOdd!.forEach((row, j) => {
      expect(row.live.reduce((s, x) => s + x, 0n)).toBe(c.levels[j]!.survivors);
      expect(row.stopped.reduce((s, x) => s + x, 0n)).toBe(c.levels[j]!.stopped);
    });
    // 5x+1: the all-odd path survives; live(j, j) = 1 (common practice)
    expect(c.byOdd![20]!.live.at(-1)).toBe(1n);
  });
});

describe("exact counter: special", () => {
  it("depth 0 is the single class, nothing stopped", () => {
    expect(exactCounts(parseMap("3x+1"), 0).levels).toEqual([{ depth: 0, survivors: 1n, stopped: 0n }]);
  });
  it("reaches depth 10,000 with every class mod 2^K accounted for (conservation)", () => {
    const levels = exactCounts(parseMap("3x+1"), 10_000).levels;
    // every class mod 2^K either survives or stopped at some j <= K: sum stopped(j) 2^(K-j) + survivors(K) = 2^K
    const K = 10_000n;
    let total = levels[10_000]!.survivors;
    for (const l of levels) total += l.stopped << (K - BigInt(l.depth));
    expect(total).toBe(1n << K);
  }, 60_000);
  it("refuses depths out of range", () => {
    expect(() => exactCounts(parseMap("3x+1"), 10_001)).toThrow(/depth must be/);
    expect(() => exactCounts(parseMap("3x+1"), -1)).toThrow(/depth must be/);
  });
});
