// The verification kernel's run pairs (assembly/verify/walk.ts runPairs: q = 3, r > 0, one word),
// probed directly against plain BigInt iteration of T(n) = n/2 | (3n + r)/2 written here: the first
// descent's step and odd steps, a return to n, and where the lane hands n back (a value that would
// pass 2^64 or reach the best path, or the step cap a run pair away) with the value, steps and odd
// steps at that point.
import { describe, expect, it } from "vitest";
import { Kernel } from "../src/engine/loader.js";
import { loadKernelModule } from "../src/node/kernel.js";

const M64 = (1n << 64n) - 1n;
const DESCENT = 0n;
const CYCLE = 1n;
const STOPPED = -1n;
const RUN_MAX = 40; // the lane's longest odd run (3^40 < 2^64 < 3^41: common practice)

const step = (v: bigint, r: bigint) => (v & 1n ? (3n * v + r) >> 1n : v >> 1n);

/** A small deterministic generator (xorshift64*) of n = 3 mod 4 with the given bit length, the same on every run. */
function rng(seed: bigint) {
  let s = seed;
  return (bits: number) => {
    s ^= s >> 12n;
    s ^= (s << 25n) & M64;
    s ^= s >> 27n;
    const x = (s * 0x2545f4914f6cdd1dn) & M64;
    return (x >> BigInt(64 - bits)) | (1n << BigInt(bits - 1)) | 3n; // n = 3 mod 4: T(n) > n
  };
}

for (const flavour of ["debug", "release"] as const) {
  describe(`run pairs (${flavour}) against BigInt iteration`, async () => {
    const kernel = await Kernel.instantiate(await loadKernelModule(flavour));
    const out = kernel.region("probeRuns", 40);
    const probe = (r: bigint, n: bigint, v: bigint, steps: number, best: bigint, cap: number) => {
      kernel.call("probeRuns", [Number(r), n, v, steps, best & M64, best >> 64n, cap, out]);
      const o = new BigInt64Array(kernel.memory, out, 5);
      return {
        done: o[0]!,
        v: BigInt.asUintN(64, o[1]!),
        steps: Number(o[2]!),
        odd: Number(o[3]!),
        on: (o[4]! & 1n) === 1n,
        exceeded: (o[4]! & 2n) === 2n,
      };
    };

    /**
     * Checks one probe from v = T^s(n) against the trajectory: every value before the lane's answer
     * is above n (and below the best path), and the answer is the first descent, the return to n, or
     * a stop where the next run pair would leave the word, reach the best path or come near the cap.
     */
    const check = (r: bigint, n: bigint, s: number, best: bigint, cap: number) => {
      let v = n;
      for (let i = 0; i < s; i++) v = step(v, r);
      const got = probe(r, n, v, s, best, cap);
      expect(got.on).toBe(true);
      let steps = s;
      let odd = 0;
      let peak = v > n ? v : n;
      while (steps < got.steps) {
        expect(v > n || steps === s, `n = ${n}: a value at or below n before step ${got.steps}`).toBe(true);
        expect(v < best || steps === s, `n = ${n}: a value at or above the best path inside the lane`).toBe(true);
        if (v & 1n) odd++;
        v = step(v, r);
        steps++;
        if (v > peak) peak = v;
      }
      expect(got.odd, `n = ${n}: odd steps`).toBe(odd);
      if (got.done === DESCENT) {
        expect(v < n, `n = ${n}: the value at the glide is below n`).toBe(true);
        // a descent after the cap is an unresolved n (single steps stop at the cap): the lane never reports one
        expect(got.steps, `n = ${n}: a descent past the cap ${cap}`).toBeLessThanOrEqual(cap);
        expect(got.exceeded, `n = ${n}: its path ${peak} against the best ${best}`).toBe(peak > best);
      } else if (got.done === CYCLE) expect(v, `n = ${n}: back at n`).toBe(n);
      else {
        expect(got.done).toBe(STOPPED);
        expect(got.v, `n = ${n}: the value where the lane stopped`).toBe(v);
        // why it stopped: n again, the cap a run pair away, or the next odd run leaves the word or reaches the best path
        let w = v;
        for (let a = 0; a < RUN_MAX && w & 1n; a++) w = step(w, r);
        const why = v <= n || got.steps >= cap - RUN_MAX - 64 || w > M64 - r || w >= best || v >= M64 - r;
        expect(why, `n = ${n}: the lane stopped at ${v} (step ${got.steps}) with no reason`).toBe(true);
      }
      return got;
    };

    it("3x+1: the glide of n from 2^10 to 2^62 (its first value below n) and its odd steps, with no path to beat", () => {
      const next = rng(0x9e3779b97f4a7c15n);
      let descents = 0;
      for (let bits = 10; bits <= 62; bits += 4)
        for (let i = 0; i < 60; i++) if (check(1n, next(bits), 1, (1n << 128n) - 1n, 100_000).done === DESCENT) descents++;
      expect(descents).toBeGreaterThan(700);
    });

    it("3x+1: values that would pass 2^64 (n near 2^63) stop the lane exactly before the odd run that passes it", () => {
      const next = rng(12345n);
      let stops = 0;
      for (let i = 0; i < 400; i++) if (check(1n, next(63), 1, (1n << 128n) - 1n, 100_000).done === STOPPED) stops++;
      expect(stops).toBeGreaterThan(50);
    });

    it("3x+1: the best path so far stops the lane before a run that reaches it (the threshold floor(U / 3^alpha))", () => {
      const next = rng(777n);
      let stops = 0;
      for (let i = 0; i < 600; i++) {
        const n = next(40);
        // a best path a few bits above n: some trajectories reach it, some do not
        const best = n * BigInt(2 + (i % 9)) + BigInt(i % 3);
        if (check(1n, n, 1, best, 100_000).done === STOPPED) stops++;
      }
      expect(stops).toBeGreaterThan(100);
    });

    it("a path whose highest value is where the lane starts (n = 1 mod 4: T(n) even, then below n) is flagged against the best", () => {
      const next = rng(31337n);
      for (let i = 0; i < 200; i++) {
        const n = next(45) - 2n; // = 1 mod 4
        const v = (3n * n + 1n) / 2n;
        // a best path between n and T(n), at T(n), and above it
        for (const best of [n + 1n, v - 1n, v, v + 1n]) check(1n, n, 1, best, 100_000);
      }
    });

    it("an odd run longer than 40 steps (n + 1 divisible by 2^41 and more) is taken 40 at a time, exactly", () => {
      for (const k of [41n, 45n, 50n, 55n]) check(1n, (1n << k) * 3n - 1n, 1, (1n << 128n) - 1n, 100_000);
    });

    it("the step cap: the lane stops once the cap is within a run pair, never past it", () => {
      const next = rng(4242n);
      for (let i = 0; i < 200; i++) {
        const got = check(1n, next(50), 1, (1n << 128n) - 1n, 120 + (i % 200));
        if (got.done === STOPPED) expect(got.steps).toBeLessThan(120 + (i % 200));
      }
    });

    it("the step cap just below a long glide: the lane never reports a descent past the cap", () => {
      // glide records of 3x+1 (OEIS A060412, from memory; their glides are counted here in BigInt)
      for (const n of [63728127n, 1200991791n, 2788008987n]) {
        let v = n;
        let glide = 0;
        do {
          v = step(v, 1n);
          glide++;
        } while (v >= n);
        for (let cap = glide - 110; cap < glide; cap++) expect(check(1n, n, 1, (1n << 128n) - 1n, cap).done).toBe(STOPPED);
      }
    });

    it("3x+5: its cycles of odd minima 19, 23, 187, 347 come back to n (Lagarias 1990, from memory), and other r > 0 descend exactly", () => {
      for (const n of [19n, 23n, 187n, 347n]) {
        const got = check(5n, n, 1, (1n << 128n) - 1n, 100_000);
        expect(got.done === CYCLE || (got.done === STOPPED && got.v === n), `3x+5: ${n}`).toBe(true);
      }
      const next = rng(99n);
      for (const r of [3n, 5n, 7n, 65535n]) for (let i = 0; i < 100; i++) check(r, next(30) + 70000n, 1, (1n << 128n) - 1n, 100_000);
    });
  });
}
