import { describe, expect, it } from "vitest";
import { dropDepth, kernelDepthLimit, makeMap, parseMap, step } from "../src/core/map.js";
import { UsageError } from "../src/core/errors.js";

describe("map: sanity", () => {
  it("parses the usual maps", () => {
    expect(parseMap("3x+1")).toEqual({ q: 3, r: 1, name: "3x+1" });
    expect(parseMap("3x-1")).toEqual({ q: 3, r: -1, name: "3x-1" });
    expect(parseMap("5x+1")).toEqual({ q: 5, r: 1, name: "5x+1" });
    expect(parseMap("99x-1048575")).toEqual({ q: 99, r: -1048575, name: "99x-1048575" });
  });
  it("takes the usual spellings of one map: 3n+1, 3X+1 and 3x + 1 are 3x+1", () => {
    for (const text of ["3n+1", "3X+1", "3x + 1", " 3N+1 ", "3x+1 "]) expect(parseMap(text)).toEqual({ q: 3, r: 1, name: "3x+1" });
  });
  it("T(7) = 11 and T(10) = 5 for 3x+1 (common practice)", () => {
    expect(step(makeMap(3, 1), 7n)).toBe(11n);
    expect(step(makeMap(3, 1), 10n)).toBe(5n);
  });
  it("refuses malformed maps with a usage error", () => {
    for (const bad of ["", "3x+", "3x+2", "4x+1", "1x+1", "3*x+1", "3x+-1", "3x+0", "0x+1", "3y+1", "3xx+1", "3x+1x"]) {
      expect(() => parseMap(bad)).toThrow(UsageError);
    }
  });
});

describe("map: special", () => {
  it("dropDepth(q, m) is the least j with q^m < 2^j, found here by doubling in BigInt (3^40 has 64 bits, 3^41 65)", () => {
    for (const q of [3, 5, 7, 9, 11, 99])
      for (let m = 0; m <= 100; m++) {
        const p = BigInt(q) ** BigInt(m);
        let j = 0;
        while (p >= 1n << BigInt(j)) j++;
        expect(dropDepth(q, m), `${q}^${m}`).toBe(j);
      }
  });
  it("the 64-bit kernel limit: no deeper than where the all-odd class's image, iterated here in BigInt, fits the word", () => {
    // the class mod 2^K whose K steps are all odd, found bit by bit (of a and a + 2^(K-1), the one whose first K steps
    // are odd), and its image T^K(a), an image the kernel must hold in a u64 at any depth it allows
    const allOddImage = (q: bigint, r: bigint, K: number) => {
      const walk = (a: bigint) => {
        let v = a;
        for (let i = 0; i < K; i++) {
          if (v % 2n === 0n) return null;
          v = (q * v + r) / 2n;
        }
        return v;
      };
      let a = 1n;
      for (let k = 2; k <= K; k++) {
        const allOdd = (x: bigint) => {
          let v = x;
          for (let i = 0; i < k; i++) {
            if (v % 2n === 0n) return false;
            v = (q * v + r) / 2n;
          }
          return true;
        };
        a = allOdd(a) ? a : a + (1n << BigInt(k - 1));
      }
      return walk(a)!;
    };
    for (const text of ["3x+1", "5x+1", "3x+5", "7x+1"]) {
      const map = parseMap(text);
      const L = kernelDepthLimit(map);
      expect(allOddImage(BigInt(map.q), BigInt(map.r), L) < 1n << 64n, `${text}: depth ${L}`).toBe(true);
    }
    // 3x+1: 40, one more and T^41(2^41 - 1) = 3^41 - 1 passes 2^64 (3^40 < 2^64 < 3^41, common practice)
    expect(kernelDepthLimit(parseMap("3x+1"))).toBe(40);
    expect(allOddImage(3n, 1n, 41)).toBe(3n ** 41n - 1n);
    expect(allOddImage(3n, 1n, 41) >= 1n << 64n).toBe(true);
    // r < 0: the images are signed (i64): 3x-1 stops one odd step earlier, at 39 (3^39 < 2^63 < 3^40, common practice)
    expect(kernelDepthLimit(parseMap("3x-1"))).toBe(39);
  });
});
