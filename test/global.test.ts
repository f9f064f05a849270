// Global records of a slice (src/jobs/verify/known.ts): the shipped published lists (OEIS A060412,
// A006884, from memory) against brute forces written here; the floor below FROM those lists give;
// the new records of ranges [A, A + W) given a floor computed here by brute force below A; and the
// host's preimage test against a BigInt search for smaller numbers reaching n.
import { afterAll, describe, expect, it } from "vitest";
import { LimitError, UsageError } from "../src/core/errors.js";
import { toExactJson } from "../src/core/json.js";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { givenKnown, globalRecords, preimageBelow, publishedKnown, readKnownFile } from "../src/jobs/verify/known.js";
import { A006884, A060412, PUBLISHED_COVER } from "../src/jobs/verify/published.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import { nodePool } from "../src/node/kernel.js";
import { T } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const map3 = parseMap("3x+1");

/** n's glide in standard steps (null: n returns to itself first, a cycle member) and its path (highest value under T before the descent; a cycle member: n), in BigInt. */
function walk(map: CollatzMap, n: bigint, cap = 100_000): { glide: number | null; path: bigint } {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let v = n,
    std = 0,
    path = n;
  for (let i = 0; i < cap; i++) {
    const odd = v % 2n !== 0n;
    v = T(q, r, v);
    std += odd ? 2 : 1;
    if (v > path) path = v;
    if (v < n) return { glide: std, path };
    if (v === n) return { glide: null, path: n };
  }
  throw new Error(`${n} does not descend within ${cap} steps`);
}

/** Records of 3x+1 over [1, bound) by glide (standard steps) and path (under T), in doubles checked to stay below 2^53. */
function recordsBelow(bound: number): { glides: [number, number][]; paths: [number, number][] } {
  const glides: [number, number][] = [];
  const paths: [number, number][] = [[1, 1]]; // 1 is a cycle member: its own path, no glide
  let bestGlide = 0,
    bestPath = 1;
  for (let n = 2; n < bound; n++) {
    let v = n,
      std = 0,
      path = n;
    while (v >= n) {
      if (v % 2 === 1) {
        v = (3 * v + 1) / 2;
        std += 2;
        if (v > path) path = v;
        if (v > 2 ** 52) throw new Error(`${n}: a value past 2^52, beyond exact doubles`);
      } else {
        v /= 2;
        std += 1;
      }
    }
    if (std > bestGlide) {
      bestGlide = std;
      glides.push([n, std]);
    }
    if (path > bestPath) {
      bestPath = path;
      paths.push([n, path]);
    }
  }
  return { glides, paths };
}

const BRUTE = 1 << 24;
const brute = recordsBelow(BRUTE);

describe("the shipped published lists (OEIS A060412 and A006884, from memory)", () => {
  it("below 2^24 they are every glide record and every path record of a brute force written here", () => {
    expect(A060412.filter((n) => n < BigInt(BRUTE))).toEqual(brute.glides.map(([n]) => BigInt(n)));
    expect(A006884.filter((n) => n < BigInt(BRUTE))).toEqual(brute.paths.map(([n]) => BigInt(n)));
  });

  it("A006884's order (the largest value of the whole standard trajectory) gives the same records below 2^16 as peakT, twice it above 2", () => {
    const records: bigint[] = [];
    let best = 0n;
    for (let n = 1n; n < 1n << 16n; n++) {
      let v = n,
        max = n;
      while (v !== 1n) {
        v = v % 2n === 0n ? v / 2n : 3n * v + 1n; // standard steps
        if (v > max) max = v;
      }
      if (max > best) {
        best = max;
        records.push(n);
        if (n > 2n) expect(max, `n = ${n}`).toBe(2n * walk(map3, n).path);
      }
    }
    expect(records).toEqual(A006884.filter((n) => n < 1n << 16n));
  });

  it("each entry's glide (path) beats every earlier entry's, to the last shipped entry (BigInt iteration)", () => {
    const glides = A060412.map((n) => walk(map3, n).glide!);
    for (let i = 1; i < glides.length; i++) expect(glides[i]!, `A060412 ${A060412[i]}`).toBeGreaterThan(glides[i - 1]!);
    const paths = A006884.map((n) => walk(map3, n).path);
    for (let i = 1; i < paths.length; i++) expect(paths[i]! > paths[i - 1]!, `A006884 ${A006884[i]}`).toBe(true);
    expect(glides[A060412.indexOf(2788008987n)]).toBe(729); // README's run of [1, 2^32): its largest glide
  });

  it("below 2^32 they are the glide and path records of a verification run of [1, 2^32)", async () => {
    const r = await runVerify(pool, { map: map3, from: 1n, to: 1n << 32n });
    expect(r.glideRecords.map((g) => g.n)).toEqual(A060412.filter((n) => n < 1n << 32n));
    expect(r.pathRecords.map((p) => p.n)).toEqual(A006884.filter((n) => n < 1n << 32n));
  });
});

describe("the floor below FROM from the shipped lists", () => {
  /** The largest glide and path below `from`, from the brute force's records. */
  const floor = (from: number) => {
    const g = brute.glides.filter(([n]) => n < from).at(-1);
    const p = brute.paths.filter(([n]) => n < from).at(-1)!;
    return {
      glide: g ? { n: BigInt(g[0]), standardSteps: g[1] } : { n: null, standardSteps: 0 },
      path: { n: BigInt(p[0]), peakT: BigInt(p[1]) },
    };
  };

  it("equals the brute force's largest glide and path below FROM, at records, next to them and between them", () => {
    const froms = [2, 3, 4, 27, 28, 703, 704, 1000, 10087, 10088, 100_000, 1_000_000, 8088063, 8088064, 16_000_000];
    for (const from of froms) {
      const k = publishedKnown(map3, BigInt(from));
      expect({ glide: k.glide, path: k.path }, `FROM = ${from}`).toEqual(floor(from));
      expect(k.below).toBe(BigInt(from));
    }
    // from 1: nothing below
    expect(publishedKnown(map3, 1n).glide).toEqual({ n: null, standardSteps: 0 });
  });

  it("is refused for another map and for a FROM beyond what the lists cover", () => {
    expect(() => publishedKnown(parseMap("3x+5"), 1000n)).toThrow(UsageError);
    expect(() => publishedKnown(parseMap("3x+5"), 1000n)).toThrow(/published record lists are of 3x\+1, not 3x\+5/);
    expect(() => publishedKnown(map3, PUBLISHED_COVER)).not.toThrow();
    expect(() => publishedKnown(map3, PUBLISHED_COVER + 1n)).toThrow(LimitError);
    expect(() => publishedKnown(map3, 1n << 60n)).toThrow(/cover n up to \d+; FROM = 1152921504606846976 lies beyond/);
  });
});

/** The new records of [A, A + W) among all n, by brute force: each n whose value beats every n below it, from 1. */
function bruteNew(map: CollatzMap, A: bigint, W: bigint) {
  let bestGlide = 0,
    bestPath = 0n;
  for (let n = 1n; n < A; n++) {
    const w = walk(map, n);
    if (w.glide !== null && w.glide > bestGlide) bestGlide = w.glide;
    if (w.path > bestPath) bestPath = w.path;
  }
  const floor = { glide: bestGlide, path: bestPath };
  const glides: bigint[] = [];
  const paths: bigint[] = [];
  for (let n = A; n < A + W; n++) {
    const w = walk(map, n);
    if (w.glide !== null && w.glide > bestGlide) {
      bestGlide = w.glide;
      glides.push(n);
    }
    if (w.path > bestPath) {
      bestPath = w.path;
      paths.push(n);
    }
  }
  return { floor, glides, paths };
}

describe("new records of a slice against a brute force given the floor below it", () => {
  for (const [text, A, W] of [
    ["3x+1", 100_000n, 60_000n],
    ["3x+1", 600_000n, 1n << 18n],
    ["3x+1", 1_000_000n, 50_000n],
    ["3x-1", 100_000n, 40_000n],
    ["3x+1", (1n << 20n) + 12_345n, 40_000n],
  ] as const) {
    it(`${text} over [${A}, ${A + W}): the records beating the floor are the brute force's new ones`, async () => {
      const map = parseMap(text);
      const b = bruteNew(map, A, W);
      const r = await runVerify(pool, { map, from: A, to: A + W, sieveDepth: 10, stepDepth: 6 });
      const known = givenKnown(A, String(b.floor.glide), String(b.floor.path));
      const g = globalRecords(r, known);
      expect(g.glideRecords.map((x) => x.n)).toEqual(b.glides);
      expect(g.pathRecords.map((x) => x.n)).toEqual(b.paths);
      if (text === "3x+1") {
        // the shipped lists give the same floor
        const p = publishedKnown(map, A);
        expect([p.glide.standardSteps, p.path.peakT]).toEqual([b.floor.glide, b.floor.path]);
      }
    });
  }

  it("a floor equal to a record's value leaves that record out (a tie goes to the smaller n), one below it keeps it", async () => {
    const A = 600_000n,
      W = 1n << 18n;
    const r = await runVerify(pool, { map: map3, from: A, to: A + W, sieveDepth: 10, stepDepth: 6 });
    const b = bruteNew(map3, A, W);
    for (const rec of r.glideRecords) {
      const tie = globalRecords(r, givenKnown(A, String(rec.standardSteps), "0")).glideRecords;
      expect(tie.some((x) => x.n === rec.n)).toBe(false);
      const below = globalRecords(r, givenKnown(A, String(rec.standardSteps - 1), "0")).glideRecords;
      expect(below[0]!.n).toBe(rec.n);
    }
    for (const rec of r.pathRecords) {
      expect(globalRecords(r, givenKnown(A, "0", String(rec.peakT))).pathRecords.some((x) => x.n === rec.n)).toBe(false);
      expect(globalRecords(r, givenKnown(A, "0", String(rec.peakT - 1n))).pathRecords[0]!.n).toBe(rec.n);
    }
    expect(b.glides.length + b.paths.length).toBeGreaterThan(0); // (the range holds new records)
  });
  it("--known-path is written as --from is (2^100, 2^61-1); --known-glide is a count of steps", () => {
    expect(givenKnown(1000n, "3", "2^100").path.peakT).toBe(1n << 100n);
    expect(givenKnown(1000n, "3", "2^61-1").path.peakT).toBe((1n << 61n) - 1n);
    expect(() => givenKnown(1000n, "2^3", "5")).toThrow(/--known-glide must be a whole number/);
    expect(() => givenKnown(1000n, "3", "-5")).toThrow(/--known-path must be a whole number/);
  });
});

describe("a known-records file", () => {
  const file = (records: unknown[]) => toExactJson({ kind: "glidepath known records", version: 1n, records });
  const entry = { map: "3x+1", below: 1000n, glide: { n: 703n, standardSteps: 0n }, path: { n: 703n, peakT: 125252n }, source: "test" };
  const good = () => ({ ...entry, glide: { n: 703n, standardSteps: BigInt(walk(map3, 703n).glide!) } });

  it("gives the records below FROM when its bound is FROM, or above FROM with its n below FROM", () => {
    const k = readKnownFile(file([good()]), "k.json", map3, 1000n);
    expect(k.path).toEqual({ n: 703n, peakT: 125252n }); // 703 rises to 250504 (common practice): 125252 under T
    expect(readKnownFile(file([good()]), "k.json", map3, 704n).below).toBe(704n);
  });

  const bad: [string, string, RegExp][] = [
    ["not JSON", "{", /^--known k\.json: not JSON$/],
    ["another kind", toExactJson({ kind: "x", version: 1n, records: [] }), /kind must be "glidepath known records"/],
    ["no entry of the map", file([{ ...good(), map: "3x+5" }]), /no records of 3x\+1 \(it has: 3x\+5\)/],
    ["a negative value", file([{ ...good(), path: { n: 703n, peakT: -5n } }]), /records\[0\]\.path\.peakT must be a whole number/],
    ["a value as a string", file([{ ...good(), below: "1000" }]), /records\[0\]\.below must be a whole number/],
    ["no source", file([{ ...good(), source: "" }]), /records\[0\]\.source must say where the values come from/],
    ["a wrong glide", file([entry]), /records\[0\]\.glide \(n = 703\): 0 standard steps stated; BigInt iteration gives \d+/],
    [
      "a path in standard steps",
      file([{ ...good(), path: { n: 703n, peakT: 250504n } }]),
      /peakT 250504 stated; BigInt iteration gives 125252 \(the stated value is twice it/,
    ],
    ["a bound below FROM", file([{ ...good(), below: 1000n }]), /the numbers of \[1000, 2000\) are not covered/],
  ];
  for (const [what, text, line] of bad)
    it(`${what}: one line`, () => {
      const from = what === "a bound below FROM" ? 2000n : 1000n;
      expect(() => readKnownFile(text, "k.json", map3, from)).toThrow(UsageError);
      expect(() => readKnownFile(text, "k.json", map3, from)).toThrow(line);
    });

  it("a bound above FROM whose largest record is not below FROM is refused", () => {
    expect(() => readKnownFile(file([good()]), "k.json", map3, 700n)).toThrow(/its largest glide is at n = 703, not below FROM/);
    const noN = { ...good(), glide: { n: null, standardSteps: 5n } };
    expect(() => readKnownFile(file([noN]), "k.json", map3, 900n)).toThrow(/its largest glide names no n/);
  });
});

describe("the preimage test (known.ts preimageBelow) against a BigInt search for smaller numbers reaching n", () => {
  /**
   * Every n of [lo, hi) that some u < n reaches with every value before n above u, with the least
   * such u: each u below hi walked until its first value at or below u (values above hi may come
   * back into the window: the walk goes on), or for at most `within` steps.
   */
  function reached(map: CollatzMap, lo: bigint, hi: bigint, within = 1_000_000): Map<bigint, bigint> {
    const q = BigInt(map.q),
      r = BigInt(map.r);
    const found = new Map<bigint, bigint>();
    for (let u = 1n; u < hi; u++) {
      let v = u;
      for (let s = 0; s < within; s++) {
        v = T(q, r, v);
        if (v <= u) break;
        if (v >= lo && v < hi && !found.has(v)) found.set(v, u);
      }
    }
    return found;
  }

  for (const text of ["3x+1", "3x+5", "5x+1", "7x+1", "9x+1", "3x-1", "5x-3"]) {
    it(`${text}: on [1, 3000) and [10^5, 10^5 + 1500), a u within three steps exactly when the test finds one`, () => {
      const map = parseMap(text);
      for (const [lo, hi] of [
        [1n, 3000n],
        [100_000n, 101_500n],
      ] as const) {
        const three = reached(map, lo, hi, 3);
        for (let n = lo; n < hi; n++) {
          const u = preimageBelow(map, n);
          expect(u !== null, `${text}: n = ${n}`).toBe(three.has(n));
          // the u it names reaches n within three steps, every value before n above u
          if (u !== null) {
            let v = u;
            for (let s = 0; s < 3 && v !== n; s++) {
              v = T(BigInt(map.q), BigInt(map.r), v);
              if (v !== n) expect(v > u, `${text}: n = ${n}, u = ${u}`).toBe(true);
            }
            expect(v).toBe(n);
          }
        }
      }
    });
  }

  it("3x+1: the test holds exactly for n = 2 (mod 3) and n = 4 (mod 9), 4/9 of all n from 5 on (common practice)", () => {
    for (let n = 5n; n < 20_000n; n++) expect(preimageBelow(map3, n) !== null, `n = ${n}`).toBe(n % 3n === 2n || n % 9n === 4n);
  });

  it("3x+1 and 3x-1: more n have a smaller u at any distance; every n the test names is among them", () => {
    for (const text of ["3x+1", "3x-1"]) {
      const map = parseMap(text);
      const any = reached(map, 50_000n, 60_000n);
      let named = 0;
      for (let n = 50_000n; n < 60_000n; n++)
        if (preimageBelow(map, n) !== null) {
          named++;
          expect(any.has(n), `${text}: n = ${n}`).toBe(true);
        }
      expect(any.size).toBeGreaterThan(named);
    }
  });

  it("no new record of a slice is reached by a smaller number that goes below itself (the README's proof, on data)", () => {
    for (const [A, W] of [
      [100_000n, 60_000n],
      [1_000_000n, 50_000n],
    ] as const) {
      const b = bruteNew(map3, A, W);
      const reach = reached(map3, A, A + W);
      for (const n of [...b.glides, ...b.paths]) {
        const u = reach.get(n);
        // (u = 1, on the cycle 1 -> 2 -> 1, reaches only 2)
        expect(u === undefined || walk(map3, u).glide === null, `n = ${n} reached from ${u}`).toBe(true);
        expect(preimageBelow(map3, n)).toBeNull();
      }
    }
  });
});
