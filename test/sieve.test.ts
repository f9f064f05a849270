// The sieve through the worker pool: published counts, shard merging, cancel, width boundaries.
import { afterAll, describe, expect, it } from "vitest";
import { kernelDepthLimit, parseMap } from "../src/core/map.js";
import { LimitError } from "../src/core/errors.js";
import { exactCounts } from "../src/core/exact.js";
import { runSieve } from "../src/jobs/sieve/sieve.js";
import { nodePool } from "../src/node/kernel.js";
import { A076227 } from "../src/core/published.js";
import { coefficientStop, kernelOf, rowSums, T } from "./helpers.js";

const pool2 = await nodePool(2);
const pool1 = await nodePool(1);
afterAll(() => {
  pool2.terminate();
  pool1.terminate();
});

describe("sieve on the pool: sanity", () => {
  it("3x+1 survivors to depth 32 match OEIS A076227 (published entry) and the exact counter", async () => {
    const res = await runSieve(pool2, { map: parseMap("3x+1"), depth: 32, mode: "survivors" });
    expect(res.levels.map((l) => l.survivors)).toEqual(A076227);
    expect(res.levels).toEqual(exactCounts(parseMap("3x+1"), 32).levels);
    // nodes visited = the root and every live class: sum of survivors(j) (common practice)
    expect(res.nodes).toBe(A076227.reduce((s, x) => s + x, 0n));
    // Terras's coefficient stopping time conjecture (a conjecture, Terras 1976) says every n >= 2 descends
    // at its coefficient stopping time. This run verifies it for every n whose class is cut by depth 32:
    // the exceptions (members that do not descend at their class's cut) are exactly {1}.
    expect(res.exceptions).toEqual([{ n: 1n, residue: 1n, classDepth: 2 }]);
    expect(res.exceptionCount).toBe(1n);
  });

  it("the (j, m) tallies equal the exact counter's by-odd table, in both modes (5x+1, 3x-1)", async () => {
    for (const text of ["5x+1", "3x-1"]) {
      const map = parseMap(text);
      const exact = exactCounts(map, 22, { byOdd: true }).byOdd!;
      for (const mode of ["survivors", "full"] as const) {
        const res = await runSieve(pool2, { map, depth: 22, mode });
        res.live.forEach((row, j) => {
          const e = exact[j]!;
          row.forEach((c, m) => {
            expect(c).toBe(m >= e.mLow ? (e.live[m - e.mLow] ?? 0n) : 0n);
          });
        });
        expect(res.levels.map((l) => l.stopped)).toEqual(exactCounts(map, 22).levels.map((l) => l.stopped));
        if (mode === "full") expect(res.nodes).toBe((1n << 23n) - 1n);
      }
    }
  });

  it("1 worker and 2 workers give the same result; shards of the kernel sum to the one-shot run", async () => {
    const map = parseMap("3x+5");
    const a = await runSieve(pool1, { map, depth: 26, mode: "survivors" });
    const b = await runSieve(pool2, { map, depth: 26, mode: "survivors" });
    expect(b.levels).toEqual(a.levels);
    expect(b.live).toEqual(a.live);
    expect(b.nodes).toBe(a.nodes);
    expect(b.exceptions).toEqual(a.exceptions);
    // the kernel's own sharding: 2^d prefix shards with ancestor ownership sum to the whole run
    const kernel = await kernelOf("release");
    const req = { q: 3, r: 5, depth: 20, mode: "survivors" as const, leaves: false, walkTallies: true };
    const whole = kernel.enumerate({ ...req, prefixBits: 0, prefix: 0n });
    const d = 6;
    const live = new Array<bigint>(21).fill(0n);
    const stopped = new Array<bigint>(21).fill(0n);
    let nodes = 0n;
    let exc = 0;
    for (let s = 0n; s < 1n << BigInt(d); s++) {
      const part = kernel.enumerate({ ...req, prefixBits: d, prefix: s });
      rowSums(part.live, 20).forEach((x, j) => {
        live[j]! += x;
      });
      rowSums(part.stopped, 20).forEach((x, j) => {
        stopped[j]! += x;
      });
      nodes += part.nodes;
      exc += part.exceptionClasses.length;
    }
    expect(live).toEqual(rowSums(whole.live, 20));
    expect(stopped).toEqual(rowSums(whole.stopped, 20));
    expect(nodes).toBe(whole.nodes);
    expect(exc).toBe(whole.exceptionClasses.length);
  });

  it("a capped exception list is the smallest exceptions (3x+1048575, depth 12: over a million exceptions)", async () => {
    const map = parseMap("3x+1048575");
    const K = 12;
    const res = await runSieve(pool2, { map, depth: K, mode: "survivors" });
    expect(res.exceptionCount).toBeGreaterThan(BigInt(res.exceptionLimit));
    expect(res.exceptions).toHaveLength(res.exceptionLimit);
    const last = Number(res.exceptions.at(-1)!.n);
    // every n up to the last listed one, by direct iteration (numbers stay below 2^53 here): an
    // exception is an n whose coefficient stops at some j <= K with T^j(n) >= n
    const brute: number[] = [];
    for (let n = 1; n <= last; n++) {
      let v = n,
        m = 0;
      for (let j = 1; j <= K; j++) {
        if (v % 2 === 1) {
          m++;
          v = (3 * v + 1048575) / 2;
        } else v /= 2;
        if (3 ** m < 2 ** j) {
          if (v >= n) brute.push(n);
          break;
        }
      }
    }
    expect(res.exceptions.map((e) => Number(e.n))).toEqual(brute);
    expect(brute).toContain(9);
    expect(brute).toContain(13);
  });

  it("3x+5: every member of its cycles whose class stops is listed as an exception (cycles found by direct iteration)", async () => {
    const map = parseMap("3x+5");
    const K = 30;
    const res = await runSieve(pool2, { map, depth: K, mode: "survivors" });
    const listed = new Set(res.exceptions.map((e) => e.n));
    // cycle minima 1, 5, 19, 23, 187, 347 (Lagarias 1990, "The set of rational cycles for the 3x+1 problem", from memory)
    for (const start of [1n, 5n, 19n, 23n, 187n, 347n]) {
      const cycle: bigint[] = [];
      let v = start;
      do {
        cycle.push(v);
        v = T(3n, 5n, v);
      } while (v !== start && cycle.length < 1000);
      expect(v).toBe(start); // it is a cycle
      expect(cycle.reduce((a, b) => (a < b ? a : b))).toBe(start); // and start is its minimum
      expect(listed.has(start) || coefficientStop(map, start, K) === null).toBe(true);
      for (const n of cycle) {
        const s = coefficientStop(map, n, K);
        if (s !== null && s.image >= n) expect(listed.has(n)).toBe(true);
      }
      expect(listed.has(start)).toBe(true);
    }
  });
});

describe("sieve on the pool: special", () => {
  // Width boundaries. The bound is derived here, independently of src/core/map.ts: every image at
  // depth j is b = T^j(a) for some a < 2^j, and every intermediate the kernel forms is b + q^m =
  // T^j(a + 2^j) with a + 2^j < 2^(j+1). Since |T(v)| <= (q |v| + |r|) / 2, iterating that bound from
  // the largest start bounds them all. A depth is safe when both fit the width (u64 for r > 0, i64
  // for r < 0): 3^40 < 2^64 < 3^41 and 5^27 < 2^64 < 5^28 make 40 and 27 (common practice).
  function independentLimit(q: bigint, r: bigint): number {
    const top = r > 0n ? 1n << 64n : 1n << 63n;
    const bound = (start: bigint, steps: number) => {
      let x = start;
      for (let i = 0; i < steps; i++) x = (q * x + (r < 0n ? -r : r) + 1n) / 2n;
      return x;
    };
    let limit = 0;
    for (let K = 1; K <= 63; K++) {
      if (bound((1n << BigInt(K)) - 1n, K) >= top || bound((1n << BigInt(K)) - 1n, K - 1) >= top) break;
      limit = K;
    }
    return limit;
  }

  /** The class of a parity word (first step first), built here bit by bit: (a, m, b). */
  function classOfWord(q: bigint, r: bigint, word: number[]): { a: bigint; m: number; b: bigint } {
    let a = 0n,
      b = 0n,
      qm = 1n,
      m = 0;
    word.forEach((p, j) => {
      const e = ((b % 2n) + 2n + BigInt(p)) % 2n; // makes b + e q^m have parity p (q^m odd)
      const v = b + e * qm;
      a += e << BigInt(j);
      if (p === 0) b = v / 2n;
      else {
        b = (q * v + r) / 2n;
        qm *= q;
        m++;
      }
    });
    return { a, m, b };
  }

  for (const [text, published] of [
    ["3x+1", 40],
    ["5x+1", 27],
    ["3x-1", 39],
    ["3x+5", 40],
  ] as const) {
    it(`${text}: the limit depth is ${published} by an independent bound; the classes with the largest images run exactly there; one deeper is refused`, async () => {
      const map = parseMap(text);
      const q = BigInt(map.q),
        r = BigInt(map.r);
      const K = independentLimit(q, r);
      expect(K).toBe(published);
      expect(kernelDepthLimit(map)).toBe(K);
      // The images nearest the bound, found here by a beam search over parity words: extend every
      // kept class by both bits, keep the 128 of largest |b|; the six largest at depth K are checked.
      const abs = (x: bigint) => (x < 0n ? -x : x);
      let beam: number[][] = [[]];
      for (let j = 0; j < K; j++) {
        const next = beam.flatMap((w) => [
          [...w, 0],
          [...w, 1],
        ]);
        next.sort((u, v) => (abs(classOfWord(q, r, u).b) > abs(classOfWord(q, r, v).b) ? -1 : 1));
        beam = next.slice(0, 128);
      }
      const extreme = beam.slice(0, 6).map((w) => classOfWord(q, r, w));
      const top = r > 0n ? 1n << 64n : 1n << 63n;
      expect(abs(extreme[0]!.b)).toBeGreaterThan(top / 16n); // near the bound (3x-1: its q^39 intermediates are the binding ones)
      const kernel = await kernelOf("debug");
      const d = K - 3;
      for (const c of extreme) {
        const found: { a: bigint; m: number; b: bigint }[] = [];
        kernel.enumerate(
          {
            q: map.q,
            r: map.r,
            depth: K,
            mode: "full",
            prefixBits: d,
            prefix: c.a & ((1n << BigInt(d)) - 1n),
            leaves: true,
            walkTallies: false,
          },
          (chunk) => {
            for (let i = 0; i < chunk.a.length; i++)
              if (chunk.a[i] === c.a) found.push({ a: chunk.a[i]!, m: chunk.m[i]!, b: BigInt(chunk.b[i]!) });
          },
        );
        expect(found).toEqual([c]);
        // and (m, b) is T^K of the residue itself, by plain iteration
        let v = c.a;
        for (let i = 0; i < K; i++) v = T(q, r, v);
        expect(v).toBe(c.b);
      }
      await expect(runSieve(pool2, { map, depth: K + 1, mode: "survivors" })).rejects.toBeInstanceOf(LimitError);
      await expect(runSieve(pool2, { map, depth: K + 1, mode: "survivors" })).rejects.toThrow(/beyond the exact 64-bit range/);
    });
  }
});
