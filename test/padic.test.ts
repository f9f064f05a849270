// Classes, trajectories and periodic points against plain BigInt and rational arithmetic in the test.
import { describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { classFromResidue, classFromWord, parsePeriodicWord, periodicPoint, trajectory, twoAdicDigits } from "../src/core/padic.js";
import { inspect, parseInspectInput } from "../src/jobs/inspect.js";
import { UsageError } from "../src/core/errors.js";
import { parities, T } from "./helpers.js";

/** T on a rational num/den with den odd: the parity of a 2-adic unit fraction is that of num. */
function Tq(map: CollatzMap, num: bigint, den: bigint): [bigint, bigint] {
  const odd = ((num % 2n) + 2n) % 2n === 1n;
  return odd ? [BigInt(map.q) * num + BigInt(map.r) * den, 2n * den] : [num, 2n * den];
}
function reduce([n, d]: [bigint, bigint]): [bigint, bigint] {
  let a = n < 0n ? -n : n,
    b = d;
  while (b) [a, b] = [b, a % b];
  return [n / a, d / a];
}

const maps = ["3x+1", "3x-1", "3x+5", "5x+1"].map(parseMap);

describe("padic: sanity", () => {
  it("the class of a word has that word as its parity vector and the affine form holds (Terras 1976)", () => {
    let seed = 7;
    for (const map of maps) {
      for (let trial = 0; trial < 40; trial++) {
        const k = 1 + (trial % 14);
        let word = "";
        for (let i = 0; i < k; i++) {
          seed = (seed * 1103515245 + 12345) % 2147483648;
          word += seed & 1024 ? "1" : "0";
        }
        const c = classFromWord(map, word);
        expect(c.residue >= 0n && c.residue < 1n << BigInt(k)).toBe(true);
        expect(parities(map, c.residue, k).join("")).toBe(word);
        for (const x of [0n, 1n, 5n, -3n]) {
          let v = c.residue + (1n << BigInt(k)) * x;
          for (let s = 0; s < k; s++) v = T(BigInt(map.q), BigInt(map.r), v);
          expect(v).toBe(BigInt(map.q) ** BigInt(c.odd) * x + c.image);
        }
        expect(classFromResidue(map, c.residue, k)).toEqual(c);
      }
    }
  });

  it("3 mod 16 stops at depth 4 with 6 standard steps, 4 of them halvings (common practice)", () => {
    const card = inspect(parseMap("3x+1"), parseInspectInput("3 mod 16"));
    expect(card.kind).toBe("class");
    if (card.kind !== "class") return;
    expect(card.card.form).toMatchObject({ residue: 3n, k: 4, word: "1100", odd: 2, stoppingTime: 4, stoppingOdd: 2 });
    expect(parseInspectInput("3 mod 2^4")).toEqual(parseInspectInput("3 mod 16"));
  });

  it("27 under 3x+1: stopping time 96 and total stopping time 111 standard steps, peak 9232 (common practice)", () => {
    const t = trajectory(parseMap("3x+1"), 27n);
    // T-steps: an odd step of T is two standard steps (3n+1, then a halving)
    const oddTo = (steps: number) => [...t.word.slice(0, steps)].filter((c) => c === "1").length;
    expect(t.descent! + oddTo(t.descent!)).toBe(96);
    // reaches 1 one step after entering the cycle {1, 2} at 2
    expect(t.cycle).toMatchObject({ min: 1n, period: 2, odd: 1 });
    const reach1 = t.cycle!.entry + 1;
    expect(reach1 + oddTo(reach1)).toBe(111);
    expect(t.max * 2n).toBe(9232n); // T folds 3n+1 = 9232 and its halving into one step
  });

  it("trajectories find the cycle when it is reached within the limit, and report none when it cannot be", () => {
    const map = parseMap("3x+1");
    // the step where a start first lands on a cycle, by plain iteration here
    const entryInto = (start: bigint, onCycle: bigint) => {
      const cycle = new Set<bigint>();
      for (let v = onCycle; !cycle.has(v); v = T(3n, 1n, v)) cycle.add(v);
      let v = start,
        steps = 0;
      for (; !cycle.has(v); steps++) v = T(3n, 1n, v);
      return { steps, period: cycle.size };
    };
    const e200 = entryInto(2n ** 200n - 1n, 1n);
    expect(trajectory(map, 2n ** 200n - 1n).cycle).toEqual({ entry: e200.steps, min: 1n, period: 2, odd: 1 });
    // 10,000-bit starts that must find their cycle: 2^9990 halves onto {1, 2};
    // -17 * 2^5000 halves onto the cycle of -17 (period 11, common practice)
    const e9990 = entryInto(2n ** 9990n, 1n);
    expect(trajectory(map, 2n ** 9990n, 10_000).cycle).toEqual({ entry: e9990.steps, min: 1n, period: e9990.period, odd: 1 });
    const e17 = entryInto(-17n * 2n ** 5000n, -17n);
    expect(e17.period).toBe(11);
    expect(trajectory(map, -17n * 2n ** 5000n, 10_000).cycle).toMatchObject({ entry: e17.steps, min: -17n, period: 11 });
    // 2^9999 - 1 takes 9999 odd steps up to 3^9999 - 1: no cycle can be reached within 10,000 steps
    const big = trajectory(map, 2n ** 9999n - 1n, 10_000);
    expect(big.steps).toBe(10_000);
    expect(big.cycle).toBeNull();
  });
});

describe("padic: periodic points (Böhm and Sontacchi 1978; Lagarias 1985, from memory)", () => {
  it("the point of w^∞ is fixed by T^|w| and has parity vector w, for every word up to length 8 (rational check)", () => {
    for (const map of maps) {
      for (let k = 1; k <= 8; k++) {
        for (let bits = 0; bits < 1 << k; bits++) {
          const word = Array.from({ length: k }, (_, i) => ((bits >> i) & 1 ? "1" : "0")).join("");
          const p = periodicPoint(map, "", word);
          let z: [bigint, bigint] = [p.num, p.den];
          let seen = "";
          for (let s = 0; s < k; s++) {
            seen += ((z[0] % 2n) + 2n) % 2n === 1n ? "1" : "0";
            z = reduce(Tq(map, z[0], z[1]));
          }
          expect(seen).toBe(word);
          expect(z).toEqual([p.num, p.den]);
        }
      }
    }
  });

  it("integer points: 1 (10), -1 (1), -5 (110), -17 (the period-11 cycle) for 3x+1 (common practice)", () => {
    const m = parseMap("3x+1");
    expect(periodicPoint(m, "", "10").cycle).toEqual([1n, 2n]);
    expect(periodicPoint(m, "", "1").integer).toBe(-1n);
    expect(periodicPoint(m, "", "110").cycle).toEqual([-5n, -7n, -10n]);
    const w = parities(m, -17n, 11).join("");
    expect(periodicPoint(m, "", w).integer).toBe(-17n);
    expect(periodicPoint(m, "", "1101").integer).toBeNull();
  });

  it("u·w^∞: first |u| parities are u, then T^|u| lands on the point of w^∞", () => {
    const m = parseMap("3x+5");
    for (const [u, w] of [
      ["0", "10"],
      ["1", "10"],
      ["110", "01"],
      ["0000", "1"],
    ] as const) {
      const p = periodicPoint(m, u, w);
      const zw = periodicPoint(m, "", w);
      let z: [bigint, bigint] = [p.num, p.den];
      let seen = "";
      for (let s = 0; s < u.length; s++) {
        seen += ((z[0] % 2n) + 2n) % 2n === 1n ? "1" : "0";
        z = reduce(Tq(m, z[0], z[1]));
      }
      expect(seen).toBe(u);
      expect(z).toEqual([zw.num, zw.den]);
    }
    expect(parsePeriodicWord("1(10)")).toEqual({ pre: "1", word: "10" });
  });

  it("2-adic digits (least significant first) of num/den: the z below 2^k with den z = num mod 2^k, searched here", () => {
    // -1 = ...1111 and 1/3 = ...01011 (common practice), and fractions whose digits are no literal of this test
    for (const [num, den] of [
      [-1n, 1n],
      [1n, 3n],
      [-5n, 3n],
      [7n, 9n],
      [-1n, 5n],
      [2n ** 40n + 3n, 27n],
    ] as const) {
      const k = 12;
      const M = 1n << BigInt(k);
      let z = 0n;
      while ((((den * z - num) % M) + M) % M !== 0n) z++;
      const digits = Array.from({ length: k }, (_, i) => ((z >> BigInt(i)) & 1n ? "1" : "0")).join("");
      expect(twoAdicDigits(num, den, k), `${num}/${den}`).toBe(digits);
    }
    expect(twoAdicDigits(-1n, 1n, 8)).toBe("11111111");
    expect(twoAdicDigits(1n, 3n, 8)).toBe("11010101");
  });
});

describe("padic: special and errors", () => {
  it("refuses bad words, residues not below 2^k and bad moduli with usage errors", () => {
    const m = parseMap("3x+1");
    expect(() => classFromWord(m, "")).toThrow(UsageError);
    expect(() => classFromWord(m, "10a1")).toThrow(/only 0 and 1/);
    expect(() => classFromResidue(m, 16n, 4)).toThrow(/not in \[0, 2\^4\)/);
    expect(() => parseInspectInput("3 mod 12")).toThrow(/not a power of two/);
    expect(() => parseInspectInput("banana")).toThrow(UsageError);
    expect(() => parsePeriodicWord("12")).toThrow(UsageError);
    expect(() => classFromWord(m, "1".repeat(10_001))).toThrow(/longer than 10000/);
  });
  it("a 10,000-step word and a 10,000-step residue class are exact", () => {
    const m = parseMap("3x+1");
    const word = "10".repeat(5000);
    const c = classFromWord(m, word);
    expect(parities(m, c.residue, 10_000).join("")).toBe(word);
  });
});
