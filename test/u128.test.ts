// The kernels' 128-bit helpers (assembly/u128.ts) against BigInt, on the operands where carries go
// wrong: across the word boundary, results at exactly 2^128 and one below, 64-bit factors, zero.
import { describe, expect, it } from "vitest";
import { Kernel } from "../src/engine/loader.js";
import { loadKernelModule } from "../src/node/kernel.js";

const M64 = (1n << 64n) - 1n;
const M128 = (1n << 128n) - 1n;
const words = (x: bigint) => [x & M64, (x >> 64n) & M64] as const;
const signed = (x: bigint) => BigInt.asIntN(128, x);

// values near the edges of each word, and ordinary ones
const EDGES = [0n, 1n, 2n, 3n, (1n << 32n) - 1n, 1n << 32n, (1n << 63n) - 1n, 1n << 63n, M64 - 1n, M64];
const WIDE = [
  ...EDGES,
  1n << 64n,
  (1n << 64n) + 1n,
  M64 << 1n,
  (1n << 127n) - 1n,
  1n << 127n,
  M128 - 1n,
  M128,
  0x1234_5678_9abc_def0_0fed_cba9_8765_4321n,
];

for (const flavour of ["debug", "release"] as const) {
  describe(`u128 helpers (${flavour}) against BigInt`, async () => {
    const kernel = await Kernel.instantiate(await loadKernelModule(flavour));
    const out = kernel.region("probe128", 24);
    const probe = (op: number, a: bigint, b: bigint, c = 0n) => {
      const [alo, ahi] = words(a);
      const [blo, bhi] = words(b);
      kernel.call("probe128", [op, alo, ahi, blo, bhi, c, out]);
      const v = new BigUint64Array(kernel.memory, out, 3);
      return { value: (v[1]! << 64n) | v[0]!, flag: v[2]! };
    };

    it("mulAdd: (a * y + add) exactly below 2^128, and carry exactly when it is not (64-bit factors, carries across words, 2^128)", () => {
      const ys = [0n, 1n, 2n, 3n, 5n, 99n, (1n << 32n) + 1n, 1n << 63n, M64];
      const adds = [0n, 1n, (1n << 63n) + 7n, M64];
      // the carries the operands reach, told apart in BigInt: out of the low word (low 64 bits of a y, plus add,
      // past 2^64) with the result below 2^128, the same with the result past it, and a high product past 2^128
      const reached = { lowCarry: 0, lowCarryPast: 0, highPast: 0 };
      for (const a of WIDE)
        for (const y of ys)
          for (const add of adds) {
            const exact = a * y + add;
            const { value, flag } = probe(0, a, y, add);
            expect(flag, `${a} * ${y} + ${add}: carry`).toBe(exact > M128 ? 1n : 0n);
            expect(value, `${a} * ${y} + ${add}`).toBe(exact & M128);
            const lowCarry = ((a * y) & M64) + add > M64;
            if (lowCarry && exact <= M128) reached.lowCarry++;
            if (lowCarry && exact > M128 && a * y <= M128) reached.lowCarryPast++;
            if (a * y > M128) reached.highPast++;
          }
      expect(reached.lowCarry).toBeGreaterThan(0);
      expect(reached.lowCarryPast).toBeGreaterThan(0);
      expect(reached.highPast).toBeGreaterThan(0);
      // exactly 2^128 and one below it
      expect(probe(0, M128, 1n, 1n)).toEqual({ value: 0n, flag: 1n });
      expect(probe(0, M128 - 1n, 1n, 1n)).toEqual({ value: M128, flag: 0n });
      expect(probe(0, 1n << 64n, M64, M64)).toEqual({ value: M128, flag: 0n }); // (2^64)(2^64 - 1) + 2^64 - 1 = 2^128 - 1
    });

    it("add, shr1 and mul (signed, two's complement, mod 2^128) and the unsigned comparison", () => {
      for (const a of WIDE)
        for (const b of WIDE) {
          expect(probe(1, a, b).value, `${a} + ${b}`).toBe((a + b) & M128);
          expect(probe(3, a, b).value, `${a} * ${b}`).toBe((a * b) & M128);
          expect(probe(1, a, b).flag, `${a} < ${b}`).toBe(a < b ? 1n : 0n);
        }
      for (const a of WIDE) expect(probe(2, a, 0n).value, `${a} >> 1`).toBe(BigInt.asUintN(128, signed(a) >> 1n));
    });

    it("mulhi: the high word of a 64 x 64-bit product", () => {
      for (const a of EDGES) for (const b of EDGES) expect(probe(4, a, b).value, `${a} * ${b}`).toBe((a * b) >> 64n);
    });
  });
}
