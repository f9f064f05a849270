// The exact counter against published tables and against a brute force over parity vectors.
import { describe, expect, it } from "vitest";
import { exactCounts, exactRows } from "../src/core/exact.js";
import { makeMap, parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { A076227, A100982, A100982_DEPTHS } from "../src/core/published.js";

/**
 * Brute force written here: every parity vector of length K, walked step by step; a vector stops at
 * the first j with q^m < 2^j (compared as BigInts). Returns live[j][m] and stopped[j][m].
 */
function bruteTable(map: CollatzMap, K: number): { live: bigint[][]; stopped: bigint[][] } {
  const live = Array.from({ length: K + 1 }, (_, j) => new Array<bigint>(j + 1).fill(0n));
  const stopped = Array.from({ length: K + 1 }, (_, j) => new Array<bigint>(j + 1).fill(0n));
  const q = BigInt(map.q);
  for (let w = 0; w < 1 << K; w++) {
    let m = 0;
    for (let j = 1; j <= K; j++) {
      const prefixIsFirst = w >> j === 0; // count each prefix of length j once: by its zero extension
      if ((w >> (j - 1)) & 1) m++;
      if (q ** BigInt(m) < 1n << BigInt(j)) {
        if (prefixIsFirst) stopped[j]![m]! += 1n;
        break;
      }
      if (prefixIsFirst) live[j]![m]! += 1n;
    }
  }
  live[0]![0] = 1n;
  return { live, stopped };
}

function binomial(n: number, k: number): bigint {
  let c = 1n;
  for (let i = 0; i < k; i++) c = (c * BigInt(n - i)) / BigInt(i + 1);
  return c;
}

describe("exact counter: sanity", () => {
  const levels = exactCounts(parseMap("3x+1"), 32).levels;
  it("matches OEIS A076227 to depth 32 (https://oeis.org/A076227; terms checked against the published entry)", () => {
    expect(levels.map((l) => l.survivors)).toEqual(A076227);
  });
  it("stops only at 1 + floor(m log2 3), with the counts of OEIS A100982 (https://oeis.org/A100982; terms checked against the published entry)", () => {
    const nonzero = levels.filter((l) => l.stopped > 0n);
    expect(nonzero.map((l) => l.depth)).toEqual(A100982_DEPTHS);
    expect(nonzero.map((l) => l.stopped)).toEqual(A100982);
  });
  it("the survivor count (kept by survivors(j) = 2 survivors(j-1) - stopped(j), common practice) equals the sum of the (j, m) window, computed separately", () => {
    for (const text of ["3x+1", "5x+1", "3x-1"]) {
      for (const row of exactRows(parseMap(text), 200))
        expect(
          row.live.reduce((s, x) => s + x, 0n),
          `${text} depth ${row.depth}`,
        ).toBe(row.survivors);
    }
  });
  for (const text of ["3x+1", "5x+1", "3x-1", "7x+3"]) {
    it(`${text}: the (j, m) table equals a brute force over all 2^16 parity vectors`, () => {
      const map = parseMap(text);
      const K = 16;
      const brute = bruteTable(map, K);
      const c = exactCounts(map, K, { byOdd: true });
      c.byOdd!.forEach((row, j) => {
        for (let m = 0; m <= j; m++) {
          const i = m - row.mLow;
          expect(i >= 0 ? (row.live[i] ?? 0n) : 0n, `live(${j}, ${m})`).toBe(brute.live[j]![m]);
          expect(i >= 0 ? (row.stopped[i] ?? 0n) : 0n, `stopped(${j}, ${m})`).toBe(brute.stopped[j]![m]);
        }
      });
    });
  }
  it("entries no lattice path can have stopped on the way to are binomial, C(j, m) (common practice)", () => {
    for (const text of ["3x+1", "5x+1", "99x+1"]) {
      const map = parseMap(text);
      const q = BigInt(map.q);
      const c = exactCounts(map, 40, { byOdd: true });
      let checked = 0;
      c.byOdd!.forEach((row, j) => {
        for (let m = 0; m <= j; m++) {
          // the fewest odd steps a path to (j, m) can have taken by depth i is max(0, m - (j - i))
          let open = true;
          for (let i = 1; i <= j && open; i++) if (q ** BigInt(Math.max(0, m - (j - i))) < 1n << BigInt(i)) open = false;
          if (!open) continue;
          checked++;
          expect(m >= row.mLow ? row.live[m - row.mLow] : 0n, `live(${j}, ${m})`).toBe(binomial(j, m));
        }
      });
      expect(checked).toBeGreaterThan(40);
    }
  });
  it("5x+1: the all-odd path survives, live(j, j) = 1 (common practice)", () => {
    const c = exactCounts(makeMap(5, 1), 20, { byOdd: true });
    expect(c.byOdd![20]!.live.at(-1)).toBe(1n);
  });
});

describe("exact counter: special", () => {
  it("depth 0 is the single class, nothing stopped", () => {
    expect(exactCounts(parseMap("3x+1"), 0).levels).toEqual([{ depth: 0, survivors: 1n, stopped: 0n }]);
  });
  it("to depth 1,200, survivors and stopped counts equal a plain lattice-path count written here (3x+1 and 5x+1)", () => {
    // a class mod 2^j is alive while q^m >= 2^i at every step i <= j (m: odd steps among the first i);
    // count the parity words by their number of odd steps, step by step, with the bound tested in BigInt
    for (const [text, K] of [
      ["3x+1", 1200],
      ["5x+1", 700],
    ] as const) {
      const q = BigInt(parseMap(text).q);
      let alive = [1n]; // alive[m]: live words of the current length with m odd steps
      const rows = [...exactRows(parseMap(text), K)];
      for (let j = 1; j <= K; j++) {
        const next = new Array<bigint>(alive.length + 1).fill(0n);
        let stopped = 0n;
        const bound = 1n << BigInt(j);
        alive.forEach((count, m) => {
          if (count === 0n) return;
          for (const odd of [0, 1]) {
            if (q ** BigInt(m + odd) >= bound) next[m + odd]! += count;
            else stopped += count;
          }
        });
        alive = next;
        expect(rows[j]!.stopped, `${text} stopped at depth ${j}`).toBe(stopped);
        expect(rows[j]!.survivors, `${text} survivors at depth ${j}`).toBe(alive.reduce((s, x) => s + x, 0n));
      }
    }
  }, 60_000);
  it("3x-1 and 7x+3, collected to depth 60, equal the plain lattice-path count written here (r < 0, q = 7)", () => {
    // a class mod 2^j is alive while q^m >= 2^i at every step i <= j: counted word by word as in the test above
    for (const text of ["3x-1", "7x+3"]) {
      const q = BigInt(parseMap(text).q);
      const levels = [{ depth: 0, survivors: 1n, stopped: 0n }];
      let alive = [1n];
      for (let j = 1; j <= 60; j++) {
        const next = new Array<bigint>(alive.length + 1).fill(0n);
        let stopped = 0n;
        alive.forEach((count, m) => {
          for (const odd of [0, 1]) {
            if (q ** BigInt(m + odd) >= 1n << BigInt(j)) next[m + odd]! += count;
            else stopped += count;
          }
        });
        alive = next;
        levels.push({ depth: j, survivors: alive.reduce((s, x) => s + x, 0n), stopped });
      }
      expect(exactCounts(parseMap(text), 60).levels, text).toEqual(levels);
    }
  });
  it("refuses depths out of range", () => {
    expect(() => exactCounts(parseMap("3x+1"), 10_001)).toThrow(/depth must be/);
    expect(() => exactCounts(parseMap("3x+1"), -1)).toThrow(/depth must be/);
  });
});
