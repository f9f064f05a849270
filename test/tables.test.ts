// Sorting class tables in bounded memory: buckets, passes and the u64 path, against a plain sort.
import { describe, expect, it } from "vitest";
import { passPlan, ResidueSorter } from "../src/jobs/sieve/sort.js";
import { radixSortU32 } from "../src/jobs/sieve/sort.js";
import type { LeafChunk } from "../src/jobs/sieve/messages.js";
import { parseMap } from "../src/core/map.js";
import { runSieve } from "../src/jobs/sieve/sieve.js";
import { nodePool } from "../src/node/kernel.js";
import { toExactJson, parseExactJson } from "../src/core/json.js";
import { sortBig } from "./helpers.js";
import { classTableArrow } from "../src/outputs/arrow.js";
import { A076227 } from "../src/core/published.js";

const TOOL = { version: "0.0.0-test", kernelBuild: "test" };

function chunkOf(residues: bigint[]): LeafChunk {
  return { a: BigUint64Array.from(residues), b: new BigUint64Array(residues.length), m: new Uint8Array(residues.length) };
}

function drain(s: ResidueSorter, wide: boolean): bigint[] {
  const out: bigint[] = [];
  for (const part of s.sorted()) {
    if (!wide) for (const x of part) out.push(BigInt(x));
    else for (let i = 0; i < part.length; i += 2) out.push((BigInt(part[i + 1]!) << 32n) + BigInt(part[i]!));
  }
  return out;
}

describe("tables: sorting", () => {
  it("radix sort equals a comparison sort (sanity)", () => {
    const xs = new Uint32Array(100_000);
    let s = 12345;
    for (let i = 0; i < xs.length; i++) xs[i] = s = (Math.imul(s, 1103515245) + 12345) >>> 0; // a fixed LCG stream
    const expected = Array.from(xs).sort((a, b) => a - b);
    expect(Array.from(radixSortU32(xs))).toEqual(expected);
  });

  it("3x+1 survivors mod 2^24 lifted to 34 bits sort as a BigInt sort does, in one pass or three (u64 path, special)", async () => {
    // Real survivor residues streamed in tree order, lifted to 34 bits.
    const pool = await nodePool(1);
    try {
      const leaves: bigint[] = [];
      const chunks: LeafChunk[] = [];
      const res = await runSieve(pool, { map: parseMap("3x+1"), depth: 24, mode: "survivors", onLeaves: (c) => chunks.push(c) });
      for (const c of chunks) for (const a of c.a) leaves.push(a);
      expect(BigInt(leaves.length)).toBe(res.levels[24]!.survivors);
      // lift to 34 bits: a + 2^24 t for several t (distinct values above 2^32 when t is large)
      const lifted = leaves.flatMap((a) => [a, a + (1023n << 24n), a + (777n << 24n)]);
      const one = new ResidueSorter(34, 10, 0, 1024);
      one.add(chunkOf(lifted));
      expect(drain(one, true)).toEqual(sortBig(lifted.slice()));
      // in three passes over bucket ranges: the concatenation is the same list
      const passes = [0, 341, 682, 1024];
      const joined: bigint[] = [];
      for (let p = 0; p < 3; p++) {
        const s = new ResidueSorter(34, 10, passes[p]!, passes[p + 1]!);
        s.add(chunkOf(lifted));
        for (const x of drain(s, true)) joined.push(x);
      }
      expect(joined).toEqual(sortBig(lifted.slice()));
    } finally {
      pool.terminate();
    }
  });

  it("pass plans: the fewest passes that keep 4 bytes a row of the published table sizes within the budget, searched here", () => {
    // rows: the survivors of the 3x+1 sieve at each depth, OEIS A076227 (published entry); the budget of a pass is
    // 768 MiB by default and a table of 4-byte residues must fit p passes (the least such p, by search)
    const least = (rows: bigint, budget: bigint) => {
      let p = 1n;
      while (4n * rows > p * budget) p++;
      return Number(p);
    };
    for (let d = 1; d < A076227.length; d++)
      for (const budget of [768n * 2n ** 20n, 2n ** 20n, 12_345n]) {
        // (a pass is a range of the at most 2^10 buckets of the top bits: more passes than buckets are refused)
        if (least(A076227[d]!, budget) > 1 << Math.min(d, 10)) expect(() => passPlan(d, A076227[d]!, Number(budget))).toThrow(/passes/);
        else
          expect(passPlan(d, A076227[d]!, Number(budget)), `depth ${d}, budget ${budget}`).toEqual({
            bucketBits: Math.min(d, 10),
            passes: least(A076227[d]!, budget),
          });
      }
    // past the table: 3x+1 at depth 36 has 527,682,754 survivors (OEIS A076227, from memory): 3 passes of 768 MiB
    expect(passPlan(36, 527_682_754n).passes).toBe(least(527_682_754n, 768n * 2n ** 20n));
    expect(least(527_682_754n, 768n * 2n ** 20n)).toBe(3);
  });
});

describe("json: exact integers", () => {
  it("writes BigInt as bare digits and reads them back exactly (special: 2^70, negative)", () => {
    const text = toExactJson({ n: 2n ** 70n, m: -5n, s: 'a"b', f: 0.5 });
    expect(text).toBe('{"n":1180591620717411303424,"m":-5,"s":"a\\"b","f":0.5}');
    expect(parseExactJson(text)).toEqual({ n: 2n ** 70n, m: -5n, s: 'a"b', f: 0.5 });
  });
});

describe("Arrow class tables: the image column takes the kernel's width", () => {
  it("3x+1 at depth 40: the all-odd class's image 3^40 - 1 >= 2^63 is kept exactly as uint64 (common practice: 3^40 < 2^64)", async () => {
    const { tableFromIPC, Type } = await import("apache-arrow");
    const image = 3n ** 40n - 1n; // T^40(2^40 - 1) for 3x+1: 40 odd steps
    let v = (1n << 40n) - 1n;
    for (let i = 0; i < 40; i++) v = v % 2n === 0n ? v / 2n : (3n * v + 1n) / 2n;
    expect(v).toBe(image);
    expect(image >= 1n << 63n).toBe(true);
    const t = tableFromIPC(classTableArrow([{ residue: (1n << 40n) - 1n, odd: 40, image }], parseMap("3x+1"), 40, TOOL));
    expect(t.schema.fields.find((f) => f.name === "image")!.type.typeId).toBe(Type.Int);
    expect((t.schema.fields.find((f) => f.name === "image")!.type as { isSigned: boolean }).isSigned).toBe(false);
    expect(t.getChild("image")!.get(0)).toBe(image);
    // the map, depth and tool travel in the schema's metadata
    expect(Object.fromEntries(t.schema.metadata)).toEqual({
      "glidepath.map": "3x+1",
      "glidepath.depth": "40",
      "glidepath.version": "0.0.0-test",
      "glidepath.kernel_build": "test",
    });
    // r < 0: signed, and a value that does not fit is refused rather than wrapped
    const s = tableFromIPC(classTableArrow([{ residue: 3n, odd: 1, image: -7n }], parseMap("3x-1"), 4, TOOL));
    expect(s.getChild("image")!.get(0)).toBe(-7n);
    expect(() => classTableArrow([{ residue: 3n, odd: 1, image: 1n << 63n }], parseMap("3x-1"), 4, TOOL)).toThrow(/does not fit int64/);
  });
});
