// The verification kernel's deeper sieve (assembly/verify/deeper.ts: a survivor of the depth-K sieve
// cut, or not, within E more steps, read from a table on T^K(n) mod 2^E), probed directly against
// plain BigInt iteration of T(n) = n/2 | (3n + r)/2 written here: where the class's coefficient
// 3^m / 2^j first drops below 1 (Terras 1976: the coefficient stopping time, from memory), the
// glide there when the value is below n, the value and odd steps at step K + E otherwise, and
// whether the path could beat a best path.
import { describe, expect, it } from "vitest";
import { Kernel } from "../src/engine/loader.js";
import { loadKernelModule } from "../src/node/kernel.js";

const M64 = (1n << 64n) - 1n;
const DESCENT = 0n;
const ON = -2n;
const WALK = -1n;
const E = 10; // the table's steps (DEEPER_BITS)

const step = (v: bigint, r: bigint) => (v & 1n ? (3n * v + r) >> 1n : v >> 1n);

/** xorshift64* bits, the same on every run. */
function rng(seed: bigint) {
  let s = seed;
  return (bits: number) => {
    let x = 0n;
    for (let got = 0; got < bits; got += 64) {
      s ^= s >> 12n;
      s ^= (s << 25n) & M64;
      s ^= s >> 27n;
      x = (x << 64n) | ((s * 0x2545f4914f6cdd1dn) & M64);
    }
    return (x & ((1n << BigInt(bits)) - 1n)) | (1n << BigInt(bits - 1));
  };
}

/** n's first K steps: v = T^K(n) and its odd steps m, or null when n's class is cut by depth K (3^m_j < 2^j). */
function survivor(n: bigint, r: bigint, K: number) {
  let v = n;
  let m = 0;
  for (let j = 1; j <= K; j++) {
    if (v & 1n) m++;
    v = step(v, r);
    if (3n ** BigInt(m) < 1n << BigInt(j)) return null;
  }
  return { v, m };
}

for (const flavour of ["debug", "release"] as const) {
  describe(`the deeper sieve (${flavour}) against BigInt iteration`, async () => {
    const kernel = await Kernel.instantiate(await loadKernelModule(flavour));
    const out = kernel.region("probeDeeper", 48);
    const probe = (r: bigint, K: number, n: bigint, v: bigint, m: number, best: bigint) => {
      kernel.call("probeDeeper", [Number(r), K, n & M64, n >> 64n, v & M64, v >> 64n, m, best & M64, best >> 64n, out]);
      const o = new BigInt64Array(kernel.memory, out, 6);
      return {
        done: o[0]!,
        steps: Number(o[1]!),
        odd: Number(o[2]!),
        v: BigInt.asUintN(64, o[3]!) | (BigInt.asUintN(64, o[4]!) << 64n),
        on: (o[5]! & 1n) === 1n,
        exceeded: (o[5]! & 2n) === 2n,
      };
    };

    /** One survivor n of the depth-K sieve checked; returns the probe's outcome. */
    const check = (r: bigint, K: number, n: bigint, v: bigint, m: number) => {
      // the next E steps in BigInt: the first cut depth, and the highest value from step K on before it
      let w = v;
      let odd = m;
      let peak = v;
      let cut = 0;
      for (let s = 1; s <= E; s++) {
        if (w & 1n) odd++;
        w = step(w, r);
        if (3n ** BigInt(odd) < 1n << BigInt(K + s)) {
          cut = s;
          break;
        }
        if (w > peak) peak = w;
      }
      const got = probe(r, K, n, v, m, (1n << 128n) - 1n);
      expect(got.on).toBe(true);
      if (w << BigInt(cut || E) >= 1n << 128n) {
        // 3^m' v + d = T^s(v) 2^s past 128 bits: walked as before
        expect(got.done, `n = ${n}: past 128 bits`).toBe(WALK);
        return got.done;
      }
      if (cut === 0) {
        expect(got.done, `n = ${n}: not cut within ${E} steps`).toBe(ON);
        expect([got.steps, got.odd, got.v], `n = ${n}: where it goes on`).toEqual([K + E, odd, w]);
        return got.done;
      }
      if (w >= n) {
        // the class is cut, but n is small: its value there is not below it (walked as before)
        expect(got.done, `n = ${n}: cut at ${K + cut} but T^${K + cut}(n) = ${w} >= n`).toBe(WALK);
        return got.done;
      }
      expect(got.done, `n = ${n}: cut at ${K + cut}`).toBe(DESCENT);
      expect([got.steps, got.odd], `n = ${n}: glide and odd steps`).toEqual([K + cut, odd]);
      // the glide is n's first value below n (every earlier value is above it: r > 0)
      let x = n;
      let t = 0;
      while (x >= n || t === 0) {
        x = step(x, r);
        t++;
      }
      expect(t, `n = ${n}: its glide by single steps`).toBe(K + cut);
      // a best path just below the highest value after step K: the path could beat it
      expect(probe(r, K, n, v, m, peak - 1n).exceeded, `n = ${n}: path ${peak} against ${peak - 1n}`).toBe(true);
      return got.done;
    };

    it("3x+1 and 3x+5, sieve depths 12, 20 and 26, n from 2^13 to 2^110: cut, glide or the value K + E steps on", () => {
      const next = rng(0x51ed2701n);
      const seen = new Map<bigint, number>();
      for (const r of [1n, 5n])
        for (const K of [12, 20, 26])
          for (const bits of [K + 1, 40, 63, 64, 72, 110]) {
            let found = 0;
            for (let tries = 0; found < 40 && tries < 40_000; tries++) {
              const n = next(bits);
              const s = survivor(n, r, K);
              if (!s) continue;
              found++;
              const done = check(r, K, n, s.v, s.m);
              seen.set(done, (seen.get(done) ?? 0) + 1);
            }
            expect(found, `r = ${r}, K = ${K}, ${bits} bits: survivors found`).toBe(40);
          }
      expect(seen.get(DESCENT)).toBeGreaterThan(300);
      expect(seen.get(ON)).toBeGreaterThan(300);
    });

    it("small n whose class is cut but whose value there is not below n (3x+5, 3x+7, 3x+31) are walked as before", () => {
      // the depth-(K + s) class of n is cut, yet T^(K + s)(n) >= n: for 3x+5 at K = 8, n = 11 (BigInt search here)
      let walked = 0;
      for (const r of [5n, 7n, 31n])
        for (const K of [4, 8, 12])
          for (let n = r; n < 1n << 12n; n++) {
            const s = survivor(n, r, K);
            if (s && check(r, K, n, s.v, s.m) === WALK) walked++;
          }
      expect(walked).toBeGreaterThan(10);
    });
  });
}
