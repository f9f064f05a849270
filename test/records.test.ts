// The published record lists the page marks on its record charts (OEIS A060412 and A006884, from
// memory in src/core/published.ts), and an orbit in both step conventions (src/core/orbit.ts), each
// against a plain BigInt brute force written here.
import { describe, expect, it } from "vitest";
import { A006884, A060412, RECORDS_LISTED_BELOW } from "../src/core/published.js";
import { bothConventions, standardPeak } from "../src/core/orbit.js";

/** One standard step of 3x+1: n/2, 3n + 1. */
const std = (n: bigint) => (n % 2n === 0n ? n / 2n : 3n * n + 1n);
/** One step of T: n/2, (3n + 1)/2. */
const T = (n: bigint) => (n % 2n === 0n ? n / 2n : (3n * n + 1n) / 2n);

/** Glide in standard steps: the steps until the trajectory first falls below n (n >= 2). */
function glide(n: bigint): number {
  let v = n,
    j = 0;
  while (v >= n) {
    v = std(v);
    j++;
  }
  return j;
}

/** The highest value of n's standard trajectory up to 1. */
function highest(n: bigint): bigint {
  let v = n,
    max = n;
  while (v !== 1n) {
    v = std(v);
    if (v > max) max = v;
  }
  return max;
}

const LIMIT = 1_000_000n;

describe("published records (OEIS, from memory) against a BigInt brute force", () => {
  it("A060412 below 10^6 is every glide record there, and each listed term's glide beats the term before it", () => {
    const records: bigint[] = [];
    let best = -1;
    for (let n = 2n; n < LIMIT; n++) {
      const g = glide(n);
      if (g > best) {
        best = g;
        records.push(n);
      }
    }
    expect(A060412.filter((n) => n < LIMIT)).toEqual(records);
    const glides = A060412.map(glide);
    for (let i = 1; i < glides.length; i++) expect(glides[i]!, `A060412 term ${A060412[i]}`).toBeGreaterThan(glides[i - 1]!);
    expect(glides.at(-1)).toBe(729); // the largest glide below 2^32 (README's verify run, 2788008987)
    expect(A060412.every((n) => n < RECORDS_LISTED_BELOW)).toBe(true);
  });

  it("A006884 below 10^6 is every path record there, and each listed term's highest value beats the term before it", () => {
    // the highest value of each n below 10^6: its path until it first falls below n, then that smaller number's (known)
    const top: bigint[] = [0n, 1n];
    const records: bigint[] = [1n];
    let best = 1n;
    for (let n = 2n; n < LIMIT; n++) {
      let v = n,
        max = n;
      while (v >= n) {
        v = std(v);
        if (v > max) max = v;
      }
      const h = max > top[Number(v)]! ? max : top[Number(v)]!;
      top.push(h);
      if (h > best) {
        best = h;
        records.push(n);
      }
    }
    expect(A006884.filter((n) => n < LIMIT)).toEqual(records);
    const highs = A006884.map(highest);
    for (let i = 1; i < highs.length; i++) expect(highs[i]! > highs[i - 1]!, `A006884 term ${A006884[i]}`).toBe(true);
    expect(A006884.every((n) => n < RECORDS_LISTED_BELOW)).toBe(true);
  });

  it("a path record's standard highest value is twice its highest under T (before its descent), n itself where it never rises", () => {
    for (const n of A006884) {
      // T's highest value before the descent; n = 1 is on its cycle, whose path a verification records as n itself
      let peakT = n;
      if (n > 1n)
        for (let v = T(n); ; v = T(v)) {
          if (v > peakT) peakT = v;
          if (v < n) break;
        }
      expect(standardPeak(n, peakT), `n = ${n}`).toBe(highest(n));
    }
  });
});

describe("an orbit in both conventions (core/orbit.ts) against a brute force", () => {
  it("27: the standard orbit, glide, arrival at 1 and maximum, from T's values", () => {
    const values = [27n];
    while (values.at(-1) !== 1n) values.push(T(values.at(-1)!));
    const standard = [27n];
    while (standard.at(-1) !== 1n) standard.push(std(standard.at(-1)!));
    const o = bothConventions(values);
    expect(o.standard.values).toEqual(standard);
    expect([o.T.glide, o.T.one, o.T.max, o.T.maxAt]).toEqual([59, 70, 4616n, values.indexOf(4616n)]);
    // 27: glide 96 and 111 standard steps to 1, highest value 9232 (common practice)
    expect([o.standard.glide, o.standard.one, o.standard.max, o.standard.maxAt]).toEqual([96, 111, 9232n, standard.indexOf(9232n)]);
    expect(o.standard.glide).toBe(glide(27n));
  });

  it("every n below 2000: the standard view's glide, step to 1 and maximum equal a direct standard iteration's", () => {
    for (let n = 2n; n < 2000n; n++) {
      const values = [n];
      while (values.at(-1) !== 1n) values.push(T(values.at(-1)!));
      const o = bothConventions(values);
      let steps = 0;
      for (let v = n; v !== 1n; v = std(v)) steps++;
      expect([o.standard.glide, o.standard.one, o.standard.max]).toEqual([glide(n), steps, highest(n)]);
    }
  });

  it("special: 1 is at 1 from the start and never falls below itself", () => {
    const o = bothConventions([1n, 2n, 1n]);
    expect([o.T.glide, o.T.one, o.T.max, o.standard.values]).toEqual([null, 0, 2n, [1n, 4n, 2n, 1n]]);
  });
});
