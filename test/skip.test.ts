// The skip of slices (verify --skip-reached, README: global records): the kernel's test against a
// BigInt search for smaller preimages (below 2^12 and past 2^64, where n mod q^2 takes both words);
// runs with the skip against a brute force given a floor (the new records among all n, the counts by
// each n's own class and preimages); the certificate and --check; the option's refusals.
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { promisify } from "node:util";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { parseExactJson, toExactJson } from "../src/core/json.js";
import { Kernel } from "../src/engine/loader.js";
import { loadKernelModule } from "../src/node/kernel.js";
import { blockTotal } from "../src/jobs/verify/block.js";
import { certificate, digestOf, readCertificate, tableHashes } from "../src/jobs/verify/certificate.js";
import { checkCertificate } from "../src/jobs/verify/check.js";
import { givenKnown, globalRecords } from "../src/jobs/verify/known.js";
import { planVerify } from "../src/jobs/verify/plan.js";
import { verifyTables } from "../src/jobs/verify/tables.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import { nodePool } from "../src/node/kernel.js";
import { T } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const map3 = parseMap("3x+1");

/**
 * The numbers u < n with T^j(u) = n for some j <= 3 and every value between above u, found backwards
 * from n: the predecessors of v are 2v and, when it is a positive odd integer, (2v - r)/q.
 */
function smallerPreimages(map: CollatzMap, n: bigint): bigint[] {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  const found: bigint[] = [];
  // chains back from n: [u, ..., n], the values strictly between u and n all above u
  const back = (chain: bigint[]) => {
    const v = chain[0]!;
    if (chain.length > 1) {
      const u = v;
      if (u < n && chain.slice(1, -1).every((x) => x > u)) found.push(u);
    }
    if (chain.length === 4) return;
    back([2n * v, ...chain]);
    const t = 2n * v - r;
    if (t > 0n && t % q === 0n && (t / q) % 2n === 1n) back([t / q, ...chain]);
  };
  back([n]);
  // (a check of the walk itself: each u steps forward onto n)
  for (const u of found) {
    let v = u;
    for (let s = 0; s < 3 && v !== n; s++) v = T(q, r, v);
    if (v !== n) throw new Error(`${u} does not reach ${n}`);
  }
  return found;
}

/** n's glide in standard steps and its path (highest value under T before the first value below n), in BigInt. */
function walk(map: CollatzMap, n: bigint): { glide: number; path: bigint } {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let v = n,
    std = 0,
    path = n;
  for (let i = 0; i < 100_000; i++) {
    const odd = v % 2n !== 0n;
    v = T(q, r, v);
    std += odd ? 2 : 1;
    if (v > path) path = v;
    if (v < n) return { glide: std, path };
    if (v === n) throw new Error(`${n} is on a cycle`);
  }
  throw new Error(`${n} does not descend`);
}

/** Whether n's class mod 2^K survives the depth-K sieve: q^m >= 2^j after each of its first K steps (n itself iterated). */
function survives(map: CollatzMap, n: bigint, K: number): boolean {
  const q = BigInt(map.q),
    r = BigInt(map.r);
  let v = n,
    m = 0;
  for (let j = 1; j <= K; j++) {
    if (v % 2n === 1n) m++;
    v = T(q, r, v);
    if (q ** BigInt(m) < 2n ** BigInt(j)) return false;
  }
  return true;
}

/** The slice's new records given a floor (glide, path) below it: each n beating the floor and every n of the slice before it. */
function bruteNew(map: CollatzMap, A: bigint, W: bigint, floor: { glide: number; path: bigint }) {
  let g = floor.glide,
    p = floor.path;
  const glides: bigint[] = [];
  const paths: bigint[] = [];
  for (let n = A; n < A + W; n++) {
    const w = walk(map, n);
    if (w.glide > g) {
      g = w.glide;
      glides.push(n);
    }
    if (w.path > p) {
      p = w.path;
      paths.push(n);
    }
  }
  return { glides, paths };
}

/** The largest glide and path below A, by brute force from 1 (3x+1: 1 on its cycle, path 2 and no glide). */
function floorBelow(map: CollatzMap, A: bigint): { glide: number; path: bigint } {
  let glide = 0,
    path = 2n;
  for (let n = 2n; n < A; n++) {
    const w = walk(map, n);
    if (w.glide > glide) glide = w.glide;
    if (w.path > path) path = w.path;
  }
  return { glide, path };
}

describe("the kernel's skip of slices (verifySliceSkip) against a backward search for smaller preimages", () => {
  it("below 2^12 and past 2^64 (n mod q^2 from both words), for five maps with r > 0", async () => {
    const kernel = await Kernel.instantiate(await loadKernelModule("debug"));
    for (const text of ["3x+1", "3x+5", "5x+1", "7x+3", "9x+1"]) {
      const map = parseMap(text);
      const starts = [1n, (1n << 64n) - 700n, (1n << 64n) * 5n + 3n, (1n << 100n) + 12_345n, (1n << 126n) + 77n];
      for (const start of starts)
        for (let n = start; n < start + 1500n; n++) {
          const skipped = kernel.call("verifySliceSkip", [map.q, map.r, BigInt.asUintN(64, n), n >> 64n]) === 1;
          expect(skipped, `${text}: n = ${n}`).toBe(smallerPreimages(map, n).length > 0);
        }
    }
  });
});

describe("runs with the skip against a brute force given a floor", () => {
  const cases: [string, bigint, bigint, "brute" | "none"][] = [
    ["3x+1", 100_000n, 60_000n, "brute"],
    ["3x+1", 1_000_000n, 50_000n, "brute"],
    ["3x+1", 1_000_000n, 50_000n, "none"],
    ["3x+1", (1n << 64n) + 1_000n, 20_000n, "brute"],
  ];
  for (const [text, A, W, kind] of cases)
    it(`${text} over [${A}, ${A + W}), ${kind === "brute" ? "the floor below it" : "a floor above every n of it"}: new records, counts`, async () => {
      const map = parseMap(text);
      const K = 10;
      // past 2^64 no brute force from 1: the floor is the largest glide and path of the numbers below A
      // that reach the slice within three steps (those the skip rests on), which is all the proof uses
      let floor: { glide: number; path: bigint };
      if (A < 1n << 32n) floor = floorBelow(map, A);
      else {
        floor = { glide: 0, path: 0n };
        for (let n = A; n < A + W; n++)
          for (const u of smallerPreimages(map, n))
            if (u < A) {
              const w = walk(map, u);
              if (w.glide > floor.glide) floor.glide = w.glide;
              if (w.path > floor.path) floor.path = w.path;
            }
      }
      if (kind === "none") {
        const all = bruteNew(map, A, W, { glide: 0, path: 0n });
        floor = { glide: walk(map, all.glides.at(-1)!).glide, path: walk(map, all.paths.at(-1)!).path };
      }
      const b = bruteNew(map, A, W, floor);
      const r = await runVerify(pool, { map, from: A, to: A + W, sieveDepth: K, stepDepth: 6, blocks: 3, skipReached: true });
      expect(r.passes).toBe(1);
      const g = globalRecords(r, givenKnown(A, String(floor.glide), String(floor.path)));
      expect(g.glideRecords.map((x) => x.n)).toEqual(b.glides);
      expect(g.pathRecords.map((x) => x.n)).toEqual(b.paths);
      if (kind === "brute")
        expect(b.glides.length + b.paths.length).toBeGreaterThan(0); // (the slice holds new records)
      else expect(b.glides.length + b.paths.length).toBe(0);
      // counts: the survivors (each n's class iterated) split into skipped (a smaller preimage) and checked
      let survivors = 0n,
        skipped = 0n;
      for (let n = A; n < A + W; n++)
        if (survives(map, n, K)) {
          survivors++;
          if (smallerPreimages(map, n).length > 0) skipped++;
        }
      expect(r.counts.preimage).toBe(skipped);
      expect(r.counts.checked).toBe(survivors - skipped);
      expect(r.counts.sieved + r.counts.exceptions).toBe(W - survivors);
      expect(r.entries.reduce((s, e) => s + blockTotal(e.counts), 0n)).toBe(W);
      // no record the run lists is a skipped survivor
      for (const x of [...r.glideRecords, ...r.pathRecords])
        expect(survives(map, x.n, K) && smallerPreimages(map, x.n).length > 0, `n = ${x.n}`).toBe(false);
    });

  it("a cycle member in the range ends the skip: the run goes on without it (3x+5, the cycle of 19)", async () => {
    const map = parseMap("3x+5");
    const r = await runVerify(pool, { map, from: 15n, to: 4000n, sieveDepth: 6, stepDepth: 4, skipReached: true });
    const plain = await runVerify(pool, { map, from: 15n, to: 4000n, sieveDepth: 6, stepDepth: 4 });
    expect(r.passes).toBe(2);
    expect(r.skipReached).toBe(false);
    expect(toExactJson({ ...r.counts, g: r.glideRecords, p: r.pathRecords })).toBe(
      toExactJson({ ...plain.counts, g: plain.glideRecords, p: plain.pathRecords }),
    );
  });
});

describe("the certificate of a run with the skip", () => {
  const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");
  // 3x+1 over [10^6, 10^6 + 2^16), the floor below 10^6: glide 287 (n = 626331), path 28495741760 (n = 704511), OEIS A060412 and A006884 (from memory)
  const from = 1_000_000n,
    to = 1_000_000n + (1n << 16n);
  const known = givenKnown(from, "287", "28495741760");
  const make = async () => {
    const req = { map: map3, from, to, sieveDepth: 10, stepDepth: 6, blocks: 4, skipReached: true };
    const r = await runVerify(pool, req);
    const hashes = await tableHashes(await verifyTables(pool, planVerify(req)), sha256);
    return parseExactJson(
      toExactJson(await certificate(r, hashes, { version: "t", kernelBuild: "t" }, { started: "s", finished: "f", workers: 2 }, known)),
    ) as Record<
      string,
      // biome-ignore lint/suspicious/noExplicitAny: the edits reach into the parsed JSON as a person editing the file would
      any
    >;
  };
  let drawn = 0; // (the sample's blocks in turn: 0, 1, 2, ...)
  const check = async (doc: Record<string, unknown>) =>
    checkCertificate(readCertificate(toExactJson(doc)), { pool, sha256, sample: 2, randomBelow: (n) => drawn++ % n });
  // biome-ignore lint/suspicious/noExplicitAny: as above
  const reseal = async (doc: any) => {
    for (const e of doc.blockTable) {
      delete e.digest;
      e.digest = await digestOf(e);
    }
    delete doc.digest;
    doc.digest = await digestOf(doc);
    return doc;
  };

  it("states the skip and its count, and --check holds", async () => {
    const doc = await make();
    expect(doc.skipReached).toBe(true);
    expect(doc.counts.preimage).toBeGreaterThan(0n);
    const report = await check(doc);
    expect(report.failure).toBeNull();
    expect(report.checked.join("\n")).toMatch(/the skip of numbers a smaller number reaches: each block's skipped count/);
  });

  it("--check finds a block's skipped count moved to checked, the skip removed, a skipped survivor listed as a record", async () => {
    const a = await make();
    a.blockTable[1].counts.preimage -= 1n;
    a.blockTable[1].counts.checked += 1n;
    a.counts.preimage -= 1n;
    a.counts.checked += 1n;
    expect((await check(await reseal(a))).failure).toMatch(
      /^blockTable\[1\]\.counts\.preimage: \d+ in the certificate; the block's survivors/,
    );
    const b = await make();
    delete b.skipReached;
    expect((await check(await reseal(b))).failure).toMatch(/counts\.preimage|no preimage skip/);
    // 1000003 = 2 mod 3 is odd, a survivor at depth 10, reached from 666669: stated as a new glide record
    const c = await make();
    c.globalRecords.glideRecords.unshift({ n: 1000003n, standardSteps: 300n, steps: 200n });
    expect((await check(await reseal(c))).failure).toMatch(/^globalRecords/);
  });
});

describe("verify --skip-reached on the command line: refusals", () => {
  const BIN = new URL("../bin/glidepath.js", import.meta.url).pathname;
  const cli = async (...args: string[]) => {
    try {
      const { stdout, stderr } = await promisify(execFile)("node", [BIN, ...args], { timeout: 100_000, killSignal: "SIGKILL" });
      return { code: 0, stdout, stderr };
    } catch (e) {
      return e as { code: number; stdout: string; stderr: string };
    }
  };
  for (const [args, message] of [
    [["verify", "--from", "1000", "--to", "2000", "--skip-reached"], /--skip-reached needs the records known below FROM/],
    [
      ["verify", "--map", "3x-1", "--from", "1000", "--to", "2000", "--skip-reached", "--known-glide", "3", "--known-path", "9"],
      /needs r > 0/,
    ],
    [["verify", "--from", "2^20", "--to", "2^21", "--skip-reached", "--known-published"], /goes class by class.*give --periods/],
    [
      ["verify", "--from", "2^127", "--to", "2^127+10", "--skip-reached", "--known-glide", "3", "--known-path", "9"],
      /runs in the kernel: n below 2\^127/,
    ],
  ] as const)
    it(`${args.join(" ")}: one line, exit 2`, async () => {
      const r = await cli(...args);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    });
});
