// The cycle bound: the least (ℓ, m) of a cycle with every element >= X, against a BigInt brute force
// over the exact inequality, the known cycles of the cycle search, and published values for 3x+1.
import { execFile } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { convergentsOf, floorSum, log2Bracket, Log2, sharedTerms, Window } from "../src/core/cyclebound.js";
import type { Frac } from "../src/core/cyclebound.js";
import { cycleBoundReport, cycleThrough, positiveCycles } from "../src/jobs/cyclebound.js";
import { searchCycles } from "../src/jobs/cycles/cycles.js";
import { parseExactJson } from "../src/core/json.js";
import { nodePool } from "../src/node/kernel.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());

/**
 * Brute force, written here: the least m >= 1 (and its least ℓ) with, for r > 0,
 * 2^ℓ > q^m and 2^ℓ·X^m <= (q·X + r)^m; for r < 0, 2^ℓ < q^m, 2^ℓ·X^m >= (q·X + r)^m (or q·X + r <= 0)
 * and ℓ >= m (every odd element is one step). Running powers, every comparison in BigInt.
 */
function bruteLeast(map: CollatzMap, X: bigint, maxM: number): { length: bigint; odd: bigint } | null {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  const top = q * X + r;
  let qm = 1n;
  let Xm = 1n;
  let tm = 1n;
  for (let m = 1; m <= maxM; m++) {
    qm *= q;
    Xm *= X;
    tm *= top;
    const M = BigInt(m);
    if (r > 0n) {
      let l = 0n;
      while (1n << l <= qm) l++; // least ℓ with 2^ℓ > q^m
      if ((1n << l) * Xm <= tm) return { length: l, odd: M };
    } else {
      for (let l = M; 1n << l < qm; l++) if (top <= 0n || (1n << l) * Xm >= tm) return { length: l, odd: M };
    }
  }
  return null;
}

/** Every admissible (ℓ, m) with m <= M by the same inequality, sorted by (m, ℓ). */
function brutePairs(map: CollatzMap, X: bigint, M: number): [bigint, bigint][] {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  const top = q * X + r;
  const out: [bigint, bigint][] = [];
  for (let m = 1; m <= M; m++) {
    const mm = BigInt(m);
    const qm = q ** mm;
    const Xm = X ** mm;
    const tm = top ** mm;
    for (let l = mm; l <= 8n * mm; l++) {
      const p = 1n << l;
      const ok = r > 0n ? p > qm && p * Xm <= tm : p < qm && (top <= 0n || p * Xm >= tm);
      if (ok) out.push([l, mm]);
    }
  }
  return out;
}

describe("cycle bound: sanity", () => {
  it("log2Bracket holds: 2^lo.num <= 3^lo.den and 2^hi.num >= 3^hi.den, for every precision to 14 bits (exact powers)", () => {
    for (let bits = 1; bits <= 14; bits++) {
      const { lo, hi } = log2Bracket(3n, 1n, bits);
      expect(1n << lo.num <= 3n ** lo.den).toBe(true);
      expect(1n << hi.num >= 3n ** hi.den).toBe(true);
      expect(hi.num - lo.num).toBe(1n);
    }
  });
  it("log2Bracket of a ratio below 1 and above 2^20: 2^lo.num·d^lo.den <= n^lo.den (exact powers)", () => {
    for (const [n, d] of [
      [5n, 7n],
      [3n * 2n ** 30n + 1n, 2n ** 10n],
      [1n, 3n],
    ] as const) {
      const { lo, hi } = log2Bracket(n, d, 12);
      const le = (f: Frac) => (f.num >= 0n ? (1n << f.num) * d ** f.den <= n ** f.den : d ** f.den <= (n ** f.den) << -f.num);
      expect(le(lo)).toBe(true);
      expect(le(hi)).toBe(false);
    }
  });
  it("log2Bracket holds where a square lies within rounding of 2: n/d with n^2 - 2 d^2 = ±1 (Pell), d up to 2^80 (exact powers)", () => {
    // (n, d) -> (3n + 4d, 2n + 3d) keeps n^2 - 2d^2 (a theorem on Pell's equation): 1 from (3, 2), -1 from (1, 1)
    const starts: [bigint, bigint][] = [
      [3n, 2n],
      [1n, 1n],
    ];
    for (let [n, d] of starts) {
      for (; d < 2n ** 80n; [n, d] = [3n * n + 4n * d, 2n * n + 3n * d]) {
        for (let bits = 1; bits <= 4; bits++) {
          const { lo, hi } = log2Bracket(n, d, bits);
          const le = (f: Frac) => (1n << f.num) * d ** f.den <= n ** f.den; // 2^(num/den) <= n/d
          expect(le(lo), `${n}/${d} lo`).toBe(true);
          expect((1n << hi.num) * d ** hi.den >= n ** hi.den, `${n}/${d} hi`).toBe(true);
        }
      }
    }
  });
  it("log2Bracket holds at y = 2^(b/a) rounded up or down at 2^-200 (b/a = 3/4, 5/8, 7/8, 1/2: squares meet 2 after bits 1; exact powers)", () => {
    // the integer a-th root by bisection, written here
    const root = (x: bigint, a: bigint) => {
      let lo = 0n;
      let hi = 1n << BigInt(Math.ceil(x.toString(2).length / Number(a)) + 1);
      while (hi - lo > 1n) {
        const mid = (lo + hi) / 2n;
        if (mid ** a <= x) lo = mid;
        else hi = mid;
      }
      return lo;
    };
    const K = 200n;
    const roots: [bigint, bigint][] = [
      [3n, 4n],
      [5n, 8n],
      [7n, 8n],
      [1n, 2n],
    ];
    for (const [b, a] of roots) {
      const r = root(1n << (b + a * K), a); // floor(2^(b/a) 2^K)
      for (const n of [r, r + 1n]) {
        const d = 1n << K;
        for (let bits = 1; bits <= 6; bits++) {
          const { lo, hi } = log2Bracket(n, d, bits);
          expect((1n << lo.num) * d ** lo.den <= n ** lo.den, `${b}/${a} ${bits} lo`).toBe(true);
          expect((1n << hi.num) * d ** hi.den >= n ** hi.den, `${b}/${a} ${bits} hi`).toBe(true);
        }
      }
    }
  });
  it("log2 3 = [1; 1, 1, 2, 2, 3, 1, 5, 2, 23, 2, 2, 1, 1, 55, 1, 4, 3, 1, 1, ...] (OEIS A028507, from memory)", () => {
    expect(new Log2(3n, 1n).terms(20)).toEqual([1n, 1n, 1n, 2n, 2n, 3n, 1n, 5n, 2n, 23n, 2n, 2n, 1n, 1n, 55n, 1n, 4n, 3n, 1n, 1n]);
  });
  it("log2 5 = [2; 3, 9, 2, 2, 4, 6, 2, 1, 1, ...] (OEIS A028508, from memory) and every convergent checked by exact powers", () => {
    const t = new Log2(5n, 1n).terms(10);
    expect(t).toEqual([2n, 3n, 9n, 2n, 2n, 4n, 6n, 2n, 1n, 1n]);
    // even convergents lie below log2 5, odd ones above (a theorem on continued fractions)
    for (const [k, c] of convergentsOf(t).entries()) expect(1n << c.num < 5n ** c.den).toBe(k % 2 === 0);
  });
  it("sharedTerms stops where the ends differ; floorSum equals the plain sum (brute force here)", () => {
    // every x in (3/2, 8/5) = [1; 1, 1, y] with y in (2, ∞): three terms shared (3/2 = [1; 1, 1], 8/5 = [1; 1, 1, 2])
    expect(sharedTerms({ num: 3n, den: 2n }, { num: 8n, den: 5n }, 10)).toEqual([1n, 1n, 1n]);
    // (7/5, 11/5) holds numbers of integer part 1 and 2: no term is certain
    expect(sharedTerms({ num: 7n, den: 5n }, { num: 11n, den: 5n }, 10)).toEqual([]);
    for (const [n, m, a, b] of [
      [10n, 7n, 12n, 3n],
      [1n, 5n, 0n, 9n],
      [50n, 13n, 29n, 0n],
    ] as const) {
      let s = 0n;
      for (let i = 0n; i < n; i++) s += (a * i + b) / m;
      expect(floorSum(n, m, a, b)).toBe(s);
    }
  });
  it("an exact power of two: 3x+1 at X = 1 has β = log2 4 = 2, and the pair (2, 1) (the cycle 1 2) lies on the boundary", () => {
    const w = new Window(parseMap("3x+1"), 1n);
    expect(w.beta?.integer).toBe(2n);
    expect(w.least().least).toEqual({ length: 2n, odd: 1n });
  });
});

describe("cycle bound: brute force over the inequality", () => {
  const Xs = [...Array.from({ length: 200 }, (_, i) => BigInt(i + 1)), ...Array.from({ length: 60 }, (_, i) => BigInt(201 + 83 * i))];
  for (const name of ["3x+1", "3x+5", "3x-1", "5x+1", "3x-5", "7x+3"]) {
    it(`${name}: the least (ℓ, m) for X = 1..200 and up to ${Xs.at(-1)} equals the brute force (written here)`, () => {
      const map = parseMap(name);
      for (const X of Xs) {
        const want = bruteLeast(map, X, 4000);
        expect(want, `${name} X = ${X}`).not.toBeNull();
        expect(new Window(map, X).least().least, `${name} X = ${X}`).toEqual(want);
      }
    });
  }
  it("the admissible pairs and their count up to m <= 40 equal the brute force, for X in 1..12 and 97 (written here)", () => {
    for (const name of ["3x+1", "3x+5", "3x-1", "5x+1", "3x-5"]) {
      const map = parseMap(name);
      for (const X of [1n, 2n, 3n, 4n, 5n, 6n, 7n, 9n, 12n, 97n]) {
        const want = brutePairs(map, X, 40);
        const got = new Window(map, X).pairs(40n, 100_000);
        expect(got.count, `${name} X = ${X}`).toBe(BigInt(want.length));
        expect(
          got.listed.map((p) => [p.length, p.odd]),
          `${name} X = ${X}`,
        ).toEqual(want);
        const capped = new Window(map, X).pairs(40n, 7);
        expect(capped.listed.map((p) => [p.length, p.odd])).toEqual(want.slice(0, 7));
        expect(capped.more).toBe(BigInt(want.length - capped.listed.length));
      }
    }
  });
  it("counts for a larger bound agree with the brute force count (3x+1 and 3x-1, X = 1000, m <= 320; written here)", () => {
    for (const name of ["3x+1", "3x-1"]) {
      const map = parseMap(name);
      expect(new Window(map, 1000n).count(320n)).toBe(BigInt(brutePairs(map, 1000n, 320).length));
    }
  });
});

describe("cycle bound: the known cycles", () => {
  // the cycle search (src/jobs/cycles) finds, for 3x+5: 1, 5, 19, 23, 187, 347 (periods 3, 2, 5, 5, 27, 27);
  // 3x-1: 1, 5, 17 (periods 1, 3, 11); 5x+1: 1, 13, 17 (periods 5, 7, 7) (the cycles test checks these lists)
  for (const [name, period] of [
    ["3x+5", 27],
    ["3x-1", 20],
    ["5x+1", 12],
  ] as const) {
    it(`${name}: each positive cycle's (ℓ, m) is admitted with X = its least element, and no pair with fewer odd elements is (brute force)`, async () => {
      const map = parseMap(name);
      const cycles = positiveCycles(await searchCycles(pool, map, period));
      expect(cycles.length).toBeGreaterThanOrEqual(3);
      for (const c of cycles) {
        const w = new Window(map, c.min);
        expect(w.admits({ num: BigInt(c.period), den: BigInt(c.odd) }), `${name} cycle of ${c.min}`).toBe(true);
        const least = w.least().least;
        expect(least.odd <= BigInt(c.odd)).toBe(true);
        // no shorter pair is admitted than the least: the brute force over every m below it finds none
        expect(bruteLeast(map, c.min, Number(least.odd) - 1)).toBeNull();
        // X one above the least element: the cycle is no longer bounded (it has an element below X) — the
        // report names it as an exception there, and as lying above X at X = its least element
        const at = cycleBoundReport(map, c.min, cycles, { list: 0 });
        expect(at.above.map((x) => x.min)).toContain(c.min);
        expect(cycleBoundReport(map, c.min + 1n, cycles, { list: 0 }).below.map((x) => x.min)).toContain(c.min);
      }
    });
  }
  it("3x+5: the cycles of 187 and 347 (ℓ = 27, m = 17) are exactly the least pair at X = 187 and at X = 347 (brute force agrees)", () => {
    const map = parseMap("3x+5");
    for (const n of [187n, 347n]) {
      const c = cycleThrough(map, n, 27);
      expect(c.odd).toBe(17);
      expect(new Window(map, n).least().least).toEqual({ length: 27n, odd: 17n });
      expect(bruteLeast(map, n, 100)).toEqual({ length: 27n, odd: 17n });
    }
  });
});

describe("cycle bound: published values for 3x+1 (from memory)", () => {
  const map = parseMap("3x+1");
  it("Eliahou (Discrete Math. 118, 1993), verification to 2^40: at least 17,087,915 elements; his count is ℓ, the steps of T (m = 10,781,274 odd)", () => {
    const b = new Window(map, 2n ** 40n).least();
    expect(b.least).toEqual({ length: 17_087_915n, odd: 10_781_274n });
    // 17087915/10781274 is a convergent of log2 3 (p_15/q_15), the previous upper one 301994/190537
    expect(b.convergents).toContainEqual({ num: 17_087_915n, den: 10_781_274n });
    expect(b.previous).toEqual({ num: 301_994n, den: 190_537n });
    // his lengths are 301994a + 17087915b + 85137581c: the listed pairs begin 17087915, 17087915 + 301994, ...
    const pairs = new Window(map, 2n ** 40n).pairs(30_000_000n, 3).listed.map((p) => p.length);
    expect(pairs).toEqual([17_087_915n, 17_389_909n, 17_691_903n]);
  });
  it("verification to 5·2^60 (Oliveira e Silva): 10,439,860,591 elements (reported with that limit, from memory)", () => {
    expect(new Window(map, 5n * 2n ** 60n).least().least.length).toBe(10_439_860_591n);
  });
  it("verification to 2^68 (Barina): 114,208,327,604 elements, 186,265,759,595 standard steps (from memory)", () => {
    const { least } = new Window(map, 2n ** 68n).least();
    expect(least.length).toBe(114_208_327_604n);
    expect(least.length + least.odd).toBe(186_265_759_595n);
  });
  it("2^71: this inequality still admits 114,208,327,604 (it does to X ≈ 1.85·2^71); 217,976,794,617, reported from memory for 2^71, is the next pair", () => {
    const w = new Window(map, 2n ** 71n);
    expect(w.least().least.length).toBe(114_208_327_604n);
    expect(w.pairs(200_000_000_000n, 2).listed.map((p) => p.length)).toEqual([114_208_327_604n, 217_976_794_617n]);
  });
});

describe("cycle bound: the command", () => {
  const BIN = new URL("../bin/glidepath.js", import.meta.url).pathname;
  const run = promisify(execFile);
  const dir = mkdtempSync(join(tmpdir(), "glidepath-cyclebound-"));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  async function cli(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
    try {
      const { stdout, stderr } = await run("node", [BIN, ...args], { timeout: 100_000, killSignal: "SIGKILL" });
      return { code: 0, stdout, stderr };
    } catch (e) {
      const x = e as { code: number; stdout: string; stderr: string };
      return { code: x.code, stdout: x.stdout, stderr: x.stderr };
    }
  }
  it("--to 2^40 --json: Eliahou's value (from memory) as exact integers, the exception {1, 2}", async () => {
    const r = await cli("cycle-bound", "--to", "2^40", "--json", "--workers", "2");
    expect(r.code).toBe(0);
    const j = parseExactJson(r.stdout) as { least: { length: bigint; odd: bigint }; exceptions: { min: bigint }[]; X: bigint };
    expect(j.least).toEqual({ length: 17_087_915n, odd: 10_781_274n, standard: 27_869_189n });
    expect(j.X).toBe(2n ** 40n);
    expect(j.exceptions.map((c) => c.min)).toEqual([1n]);
  });
  it("refuses with one line and exit 2: q even, X = 0, both or neither input", async () => {
    for (const args of [["--map", "4x+1", "--to", "100"], ["--to", "0"], ["--to", "10", "--certificate", "x.json"], []]) {
      const r = await cli("cycle-bound", ...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    }
  });
  it("a certificate of [1, 2^16) gives X = 2^16 after its check; one of [2^10, 2^16) is refused (exit 2)", async () => {
    const cert = join(dir, "cert.json");
    expect((await cli("verify", "--map", "3x+5", "--from", "1", "--to", "2^16", "--out", cert, "--workers", "2")).code).toBe(0);
    const r = await cli("cycle-bound", "--certificate", cert, "--json", "--workers", "2");
    expect(r.code).toBe(0);
    const j = parseExactJson(r.stdout) as { X: bigint; map: string; exceptions: { min: bigint }[] };
    expect(j.map).toBe("3x+5");
    expect(j.X).toBe(2n ** 16n);
    expect(j.exceptions.map((c) => c.min)).toEqual([1n, 5n, 19n, 23n, 187n, 347n]);
    const part = join(dir, "part.json");
    expect((await cli("verify", "--from", "2^10", "--to", "2^16", "--out", part, "--workers", "2")).code).toBe(0);
    const bad = await cli("cycle-bound", "--certificate", part);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/not a range from 1/);
    // an edited certificate does not hold: refused
    const text = readFileSync(cert, "utf8").replace(/"to": 65536/, '"to": 65537');
    expect(text).toContain('"to": 65537');
    writeFileSync(join(dir, "edited.json"), text);
    expect((await cli("cycle-bound", "--certificate", join(dir, "edited.json"))).code).toBe(2);
  }, 120_000);
});
