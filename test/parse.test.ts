// Whole numbers as every command and form reads them (src/core/parse.ts), and the Inspector's input.
import { describe, expect, it } from "vitest";
import { UsageError } from "../src/core/errors.js";
import { parseCount, parseWhole } from "../src/core/parse.js";
import { parseInspectInput } from "../src/jobs/inspect.js";

describe("parse: whole numbers", () => {
  it("digits and sums of powers, of any size (BigInt arithmetic in the test)", () => {
    expect(parseWhole("N", "27")).toBe(27n);
    expect(parseWhole("N", "2^100+1")).toBe(2n ** 100n + 1n);
    expect(parseWhole("N", " 2^50 + 2^32 ")).toBe(2n ** 50n + 2n ** 32n);
    expect(parseWhole("N", "3^40")).toBe(3n ** 40n);
    // differences too: 2^61-1 is the Mersenne prime M61 (common practice); a negative value is refused
    expect(parseWhole("N", "2^61-1")).toBe(2305843009213693951n);
    expect(parseWhole("N", "2^9999 - 1")).toBe(2n ** 9999n - 1n);
    expect(parseWhole("N", "2^40-2^20+3")).toBe(2n ** 40n - 2n ** 20n + 3n);
    for (const bad of ["1-2", "2^3-", "3--1"]) expect(() => parseWhole("N", bad)).toThrow(UsageError);
    for (const bad of ["-5", "1.5", "2^", "x", "", "2^100001"]) expect(() => parseWhole("N", bad)).toThrow(UsageError);
    expect(() => parseWhole("--from", "abc")).toThrow(/^--from must be a whole number/);
  });
  it("small counts within their range, named as the field names them", () => {
    expect(parseCount("depth", " 20 ", 0, 40)).toBe(20);
    expect(parseCount("depth", "0", 0, 40)).toBe(0);
    expect(() => parseCount("depth", "41", 0, 40)).toThrow(/^depth must be a whole number from 0 to 40$/);
    expect(() => parseCount("depth", "0", 1, Number.POSITIVE_INFINITY)).toThrow(/^depth must be a whole number from 1 up$/);
    expect(() => parseCount("workers", "2.5", 1, 16)).toThrow(UsageError);
  });
  it("the Inspector takes powers like every other field", () => {
    expect(parseInspectInput("2^100+1")).toEqual({ kind: "number", n: 2n ** 100n + 1n });
    expect(parseInspectInput("-2^10")).toEqual({ kind: "number", n: -(2n ** 10n) });
    expect(parseInspectInput("27")).toEqual({ kind: "number", n: 27n });
    expect(parseInspectInput("2^9999-1")).toEqual({ kind: "number", n: 2n ** 9999n - 1n });
    expect(parseInspectInput("-2^10-1")).toEqual({ kind: "number", n: -(2n ** 10n - 1n) });
    expect(parseInspectInput("3 mod 2^4")).toEqual({ kind: "residue", a: 3n, k: 4 });
  });
});
