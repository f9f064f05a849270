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
  it("dropDepth(q, m) = bitlen(q^m) (exact), e.g. 3^40 has 64 bits, 3^41 has 65 (common practice)", () => {
    expect(dropDepth(3, 0)).toBe(1);
    expect(dropDepth(3, 1)).toBe(2);
    expect(dropDepth(3, 40)).toBe(64);
    expect(dropDepth(3, 41)).toBe(65);
    expect(3n ** 40n < 2n ** 64n && 2n ** 64n < 3n ** 41n).toBe(true);
  });
  it("the 64-bit kernel limit: 3x+1 at 40, 5x+1 at 27 (3^40 < 2^64 < 3^41, 5^27 < 2^64 < 5^28)", () => {
    expect(kernelDepthLimit(parseMap("3x+1"))).toBe(40);
    expect(kernelDepthLimit(parseMap("5x+1"))).toBe(27);
    expect(5n ** 27n < 2n ** 64n && 2n ** 64n < 5n ** 28n).toBe(true);
    // r < 0 uses signed images: 3^39 < 2^63 < 3^40
    expect(kernelDepthLimit(parseMap("3x-1"))).toBe(39);
  });
});
