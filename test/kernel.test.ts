// The enumeration kernel, debug build (assertions on) and release build, against BigInt references.
import { describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { exactCounts } from "../src/core/exact.js";
import { decodeExceptionClasses, expandExceptions } from "../src/jobs/sieve/exceptions.js";
import { allResidues, coefficientStop, kernelOf, parities, rowSums, runAll, sortBig, T } from "./helpers.js";

for (const flavour of ["debug", "release"] as const) {
  describe(`kernel (${flavour}): sanity`, async () => {
    const kernel = await kernelOf(flavour);
    const map = parseMap("3x+1");
    const base = { q: 3, r: 1, leaves: true } as const;

    it("survivors mod 32 are {7, 15, 27, 31} (common practice)", () => {
      const { leaves } = runAll(kernel, { ...base, depth: 5, mode: "survivors" });
      expect(sortBig(allResidues(leaves))).toEqual([7n, 15n, 27n, 31n]);
    });

    it("3 mod 16 stops at depth 4 (6 standard steps, 4 halvings); 11 and 23 mod 32 at depth 5 (common practice)", () => {
      const { res } = runAll(kernel, { ...base, depth: 5, mode: "survivors" });
      // stopped at depth 4: exactly one class, with m = 2 odd steps: 4 + 2 = 6 standard steps
      expect(rowSums(res.stopped, 5)[4]).toBe(1n);
      expect(res.stopped[4 * 64 + 2]).toBe(1n);
      expect(rowSums(res.stopped, 5)[5]).toBe(2n);
      // which classes: read the live leaves at depth 4 and 5 from separate runs
      const at4 = allResidues(runAll(kernel, { ...base, depth: 4, mode: "survivors" }).leaves);
      expect(at4).not.toContain(3n);
      expect(sortBig(at4)).toEqual([7n, 11n, 15n]);
      const at3 = allResidues(runAll(kernel, { ...base, depth: 3, mode: "survivors" }).leaves);
      expect(at3).toContain(3n); // 3 mod 8 still alive: it stops exactly at depth 4
      const at5 = allResidues(runAll(kernel, { ...base, depth: 5, mode: "survivors" }).leaves);
      expect(at5).not.toContain(11n);
      expect(at5).not.toContain(23n);
      expect(coefficientStop(map, 3n, 8)).toMatchObject({ j: 4, m: 2 });
      expect(coefficientStop(map, 11n, 8)).toMatchObject({ j: 5 });
      expect(coefficientStop(map, 23n, 8)).toMatchObject({ j: 5 });
    });

    const terrasDepth = flavour === "debug" ? 16 : 20;
    it(`Terras bijection at depth ${terrasDepth}: every residue once, each reached by its own parity vector (Terras 1976)`, () => {
      const K = terrasDepth;
      const { res, leaves } = runAll(kernel, { ...base, depth: K, mode: "full" });
      expect(res.nodes).toBe((1n << BigInt(K + 1)) - 1n);
      const seen = new Uint8Array(1 << K);
      for (const c of leaves) {
        for (let i = 0; i < c.a.length; i++) {
          const a = Number(c.a[i]!);
          seen[a]!++;
          // (m, b): m = odd steps of a's own parity vector, b = T^K(a) (the class image at x = 0)
          if ((a & 1023) === 0 || a < 1024) {
            const p = parities(map, BigInt(a), K);
            expect(c.m[i]).toBe(p.reduce((s, x) => s + x, 0));
            let v = BigInt(a);
            for (let s = 0; s < K; s++) v = T(3n, 1n, v);
            expect(c.b[i]).toBe(v);
          }
        }
      }
      expect(seen.every((x) => x === 1)).toBe(true);
    });

    it("leaf (a, m, b) is the affine form T^K(a + 2^K x) = q^m x + b for several x (BigInt check)", () => {
      const K = 12;
      const { leaves } = runAll(kernel, { q: 5, r: -3, depth: K, mode: "full", leaves: true });
      for (const c of leaves) {
        for (let i = 0; i < c.a.length; i += 97) {
          for (const x of [0n, 1n, 7n, -5n, 123456789n]) {
            let v = c.a[i]! + (1n << BigInt(K)) * x;
            for (let s = 0; s < K; s++) v = T(5n, -3n, v);
            expect(v).toBe(5n ** BigInt(c.m[i]!) * x + BigInt(c.b[i]!));
          }
        }
      }
    });
  });

  describe(`kernel (${flavour}): brute force, k <= 18, four maps`, async () => {
    const kernel = await kernelOf(flavour);
    const K = flavour === "debug" ? 14 : 18;
    for (const text of ["3x+1", "3x-1", "3x+5", "5x+1"]) {
      it(`${text} to depth ${K}: survivor set, stopped counts and exceptions agree with direct iteration`, () => {
        const map = parseMap(text);
        const { res, leaves } = runAll(kernel, { q: map.q, r: map.r, depth: K, mode: "survivors", leaves: true });
        const size = 1 << K;
        const expectSurvivors: bigint[] = [];
        const stoppedMod2K = new Array<bigint>(K + 1).fill(0n);
        for (let a = 0; a < size; a++) {
          const s = coefficientStop(map, BigInt(a), K);
          if (s === null) expectSurvivors.push(BigInt(a));
          else stoppedMod2K[s.j]! += 1n;
        }
        expect(sortBig(allResidues(leaves))).toEqual(expectSurvivors);
        // classes mod 2^K stopping at j are 2^(K-j) copies of each class mod 2^j
        const stopped = rowSums(res.stopped, K);
        for (let j = 1; j <= K; j++) expect(stopped[j]! << BigInt(K - j)).toBe(stoppedMod2K[j]);
        expect(rowSums(res.live, K)).toEqual(exactCounts(map, K).levels.map((l) => l.survivors));

        // Exceptions: n > 0 whose class stops at j <= K but T^j(n) >= n, found by iterating every n up to
        // a bound derived here: a member n = a + 2^j x of a class cut at j, with T^j(n) = q^m x + b,
        // fails to descend exactly when (2^j - q^m) x <= b - a; b = T^j(a) comes from the BigInt
        // iteration above (a < 2^j its least member), so the largest such n over all classes bounds them all.
        let bound = 1n;
        for (let a = 1n; a < BigInt(size); a++) {
          const st = coefficientStop(map, a, K);
          if (st === null || a >= 1n << BigInt(st.j) || st.image < a) continue; // only each class's least member
          const x = (st.image - a) / ((1n << BigInt(st.j)) - BigInt(map.q) ** BigInt(st.m));
          const n = a + (1n << BigInt(st.j)) * x;
          if (n + 1n > bound) bound = n + 1n;
        }
        const { list, count } = expandExceptions(map, decodeExceptionClasses(res.exceptionClasses, map.r < 0));
        const brute: bigint[] = [];
        for (let n = 1n; n < bound; n++) {
          const s = coefficientStop(map, n, K);
          if (s !== null && s.image >= n) brute.push(n);
        }
        expect(list.map((e) => e.n)).toEqual(brute);
        expect(count).toBe(BigInt(brute.length));
        for (const e of list) expect(coefficientStop(map, e.n, K)!.j).toBe(e.classDepth);
      });
    }
  });
}
