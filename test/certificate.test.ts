// Certificates: every field a reader relies on is re-derived by --check, so an edit to any one of them
// is found, also when the editor recomputes every digest (the format is public); and the sieved
// counts by depth against a BigInt brute force of each n's class cut on ranges with unaligned ends.
import { randomInt } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { certificate, digestOf, readCertificate, verifyFindings } from "../src/jobs/verify/certificate.js";
import { mergeVerify } from "../src/jobs/verify/merge.js";
import { checkCertificate, sievedInRange } from "../src/jobs/verify/check.js";
import { verifyTables } from "../src/jobs/verify/tables.js";
import { planVerify } from "../src/jobs/verify/plan.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import { tableHashes } from "../src/jobs/verify/certificate.js";
import { UsageError } from "../src/core/errors.js";
import { exactCounts } from "../src/core/exact.js";
import { parseExactJson, toExactJson } from "../src/core/json.js";
import { nodePool } from "../src/node/kernel.js";
import { createHash } from "node:crypto";
import { publishedKnown } from "../src/jobs/verify/known.js";
import type { KnownRecords } from "../src/jobs/verify/known.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");
const stamp = { version: "test", kernelBuild: "test" };

type Doc = Record<string, unknown> & {
  blockTable: Record<string, unknown>[];
};
// biome-ignore lint/suspicious/noExplicitAny: the edits reach into the parsed JSON freely, as a person editing the file would
type Loose = any;

async function makeCertificate(
  map: CollatzMap,
  from: bigint,
  to: bigint,
  sieveDepth: number,
  extra: { delay?: boolean } = {},
  known: KnownRecords | null = null,
) {
  const req = { map, from, to, sieveDepth, stepDepth: 8, blocks: 4, ...extra };
  const r = await runVerify(pool, req);
  const plan = planVerify(req);
  const hashes = plan.engine === "kernel" ? await tableHashes(await verifyTables(pool, plan), sha256) : null;
  const cert = await certificate(r, hashes, stamp, { started: "s", finished: "f", workers: 2 }, known);
  return toExactJson(cert, 2);
}

/** Recomputes every digest, as an editor who knows the format would. */
async function reseal(doc: Doc): Promise<string> {
  for (const e of doc.blockTable) {
    delete e.digest;
    e.digest = await digestOf(e);
  }
  delete doc.digest;
  doc.digest = await digestOf(doc);
  return toExactJson(doc, 2);
}

/** One number moved from checked to exceptions in block entry e and in the totals (each block still adds up). */
function checkedToException(d: Record<string, Loose>, e: Loose): void {
  e.counts.checked -= 1n;
  e.counts.exceptions += 1n;
  d.counts.checked -= 1n;
  d.counts.exceptions += 1n;
}

async function check(text: string, full = true, sample = 2) {
  return checkCertificate(readCertificate(text), { pool, sha256, sample, full, randomBelow: (n) => randomInt(n) });
}

describe("certificate: --check finds every edited field", async () => {
  const map = parseMap("3x+1");
  // [1, 2^17 + 12345): unaligned end; depth 10; with delays (OEIS A006877 style records)
  const text = await makeCertificate(map, 1n, (1n << 17n) + 12345n, 10, { delay: true });
  const fresh = () => parseExactJson(text) as Doc & Record<string, Loose>;

  it("the certificate as written holds, in full and sampled", async () => {
    expect((await check(text)).failure).toBeNull();
    expect((await check(text, false)).failure).toBeNull();
  });

  it("an edit without new digests is refused by the document digest", async () => {
    const d = fresh();
    d.counts.checked += 1n;
    const r = await check(toExactJson(d, 2));
    expect(r.failure).toMatch(/^digest: /);
  });

  // Each edit with every digest recomputed: the line names the field
  const edits: [string, (d: Record<string, Loose>) => void, RegExp][] = [
    ["a delay record's steps", (d) => (d.delay.records[5].steps += 1n), /^delay\.records\[5\]\.steps: /],
    ["a delay record deleted", (d) => d.delay.records.splice(3, 1), /^delay\.records\[3\]/],
    ["delay.max raised", (d) => (d.delay.max.standardSteps += 1n), /^delay\.max\.standardSteps: /],
    ["delay.unreached", (d) => (d.delay.unreached += 1n), /^delay\.unreached: 1 in the certificate; the block table gives 0/],
    ["the delay section removed", (d) => (d.delay = null), /^blockTable: the block table has \d+ entries, the plan \d+ blocks/],
    ["maxPath.peakT doubled", (d) => (d.maxPath.peakT *= 2n), /^maxPath\.peakT: /],
    ["maxGlide.standardSteps + 1", (d) => (d.maxGlide.standardSteps += 1n), /^maxGlide\.standardSteps: /],
    [
      "a count moved between sievedByDepth entries",
      (d) => {
        d.counts.sievedByDepth[0].count -= 1n;
        d.counts.sievedByDepth[1].count += 1n;
      },
      /^counts\.sievedByDepth\[0\]\.count: /,
    ],
    [
      "a count moved between depths in a block entry and the totals",
      (d) => {
        const e = d.blockTable.find((b: Loose) => b.kind === "range");
        e.counts.sievedByDepth[1] -= 1n;
        e.counts.sievedByDepth[2] += 1n;
        d.counts.sievedByDepth[0].count -= 1n;
        d.counts.sievedByDepth[1].count += 1n;
      },
      /^counts\.sievedByDepth\[1\]: .*the depth-10 sieve restricted to the range gives/,
    ],
    [
      "one count moved from checked to exceptions (totals)",
      (d) => {
        d.counts.checked -= 1n;
        d.counts.exceptions += 1n;
      },
      /^counts\.checked: /,
    ],
    [
      "one count moved from checked to exceptions in a block and the totals",
      (d) => {
        checkedToException(
          d,
          d.blockTable.find((b: Loose) => b.kind === "range"),
        );
      },
      /^blockTable\[\d+\]\.counts\.checked: .*running the block again gives/,
    ],
    ["a glide record deleted", (d) => d.glideRecords.splice(4, 1), /^glideRecords\[4\]\.n: /],
    ["a path record deleted", (d) => d.pathRecords.splice(4, 1), /^pathRecords\[4\]\.n: /],
    [
      "a glide record deleted in its block and the totals",
      (d) => {
        const i = d.glideRecords.findIndex((g: Loose) => g.n === 703n);
        d.glideRecords.splice(i, 1);
        for (const e of d.blockTable) e.glideRecords = e.glideRecords.filter((g: Loose) => g.n !== 703n);
        d.maxGlide = d.glideRecords.at(-1);
      },
      /glideRecords/,
    ],
    ["tables.sieve.rows", (d) => (d.tables.sieve.rows += 1n), /^tables\.sieve\.rows: /],
    ["tables.steps.sha256", (d) => (d.tables.steps.sha256 = "0".repeat(64)), /^tables\.steps\.sha256: /],
    ["the range's end", (d) => (d.to += 1n), /^blockTable: /],
    ["the map", (d) => (d.map = "3x+5"), /^(q|r|blockTable)/],
    ["a record outside the range", (d) => (d.glideRecords[0].n = 0n), /^glideRecords\[0\]\.n must be at least 1, got 0/],
  ];
  for (const [what, edit, line] of edits) {
    it(`${what}: refused, naming the field`, async () => {
      const d = fresh();
      edit(d);
      let failure: string | null;
      try {
        failure = (await check(await reseal(d))).failure;
      } catch (e) {
        expect(e).toBeInstanceOf(UsageError);
        failure = (e as Error).message;
      }
      expect(failure).toMatch(line);
      // both values are in the line
      if (failure && / in the certificate; /.test(failure)) expect(failure).toMatch(/: .+ in the certificate; .+ gives .+/);
    });
  }

  /** Path record i's value raised by 2 in its block, the list and the maximum, consistently. */
  function raisePathRecord(d: Record<string, Loose>, i: number): void {
    const target = d.pathRecords[i];
    target.peakT += 2n;
    for (const e of d.blockTable) for (const p of e.pathRecords as Loose[]) if (p.n === target.n) p.peakT = target.peakT;
    if (d.maxPath.n === target.n) d.maxPath.peakT = target.peakT;
  }

  it("a path value changed in its block and the totals, every digest recomputed, no block run again: BigInt iteration finds it", async () => {
    const d = fresh();
    raisePathRecord(d, 6);
    const r = await check(await reseal(d), false, 0);
    expect(r.failure).toMatch(
      /^blockTable\[\d+\]\.pathRecords\[\d+\]\.peakT \(n = \d+\): \d+ in the certificate; BigInt iteration gives \d+/,
    );
  });

  it("an entry changed and only the document's digest recomputed: the entry's own digest finds it", async () => {
    const d = fresh();
    raisePathRecord(d, 6);
    delete d.digest;
    d.digest = await digestOf(d);
    const r = await check(toExactJson(d, 2), false, 0);
    expect(r.failure).toMatch(/^blockTable\[\d+\]\.digest: [0-9a-f]{64} in the certificate; the entry gives [0-9a-f]{64}/);
  });

  it("a count written as a string, a missing field and another version are refused with one line naming the field", () => {
    const d = fresh();
    d.counts.numbers = String(d.counts.numbers);
    expect(() => readCertificate(toExactJson(d))).toThrow(/^counts\.numbers must be a whole number written as digits, got the string "/);
    const e = fresh();
    delete e.blockTable[2]!.counts;
    expect(() => readCertificate(toExactJson(e))).toThrow(/^blockTable\[2\]\.counts is missing/);
    const v = fresh();
    v.version = 1n;
    expect(() => readCertificate(toExactJson(v))).toThrow(/certificate version 1: this glidepath checks version 2/);
  });
});

describe("certificate: a run by classes", () => {
  it("[1, 2^20) and [2^16, 2^20) by classes hold; a leaf moved from checked to skipped, or the method changed, does not", async () => {
    const map = parseMap("3x+1");
    for (const from of [1n, 1n << 16n]) {
      const req = { map, from, to: 1n << 20n, stepDepth: 8, blocks: 4 };
      const r = await runVerify(pool, req);
      expect([r.method, r.preimage]).toEqual(["classes", true]);
      const hashes = await tableHashes(await verifyTables(pool, planVerify(req)), sha256);
      const text = toExactJson(await certificate(r, hashes, stamp, { started: "s", finished: "f", workers: 2 }), 2);
      expect((await check(text)).failure).toBeNull();
      const d = parseExactJson(text) as Loose;
      expect([d.method, d.preimage, d.tables.sieve.rows]).toEqual(["classes", true, 0n]);
      // one leaf moved between outcomes in a block and the totals, every digest recomputed: the block run again differs
      const moved = parseExactJson(text) as Loose;
      moved.blockTable[1].counts.checked -= 1n;
      moved.blockTable[1].counts.preimage += 1n;
      moved.counts.checked -= 1n;
      moved.counts.preimage += 1n;
      expect((await check(await reseal(moved))).failure).toMatch(/blockTable\[1\]/);
      // the method changed: the plan re-made from it is another
      const periods = parseExactJson(text) as Loose;
      periods.method = "periods";
      expect((await check(await reseal(periods))).failure).not.toBeNull();
    }
  });
});

describe("certificate: numbers past 2^64 stay whole (BigInt engine)", () => {
  it("a certificate of [2^64 + 1, 2^64 + 2^8) holds and lists n above 2^64", async () => {
    const from = (1n << 64n) + 1n;
    const text = await makeCertificate(parseMap("3x+1"), from, (1n << 64n) + 256n, 12);
    const d = parseExactJson(text) as { glideRecords: { n: bigint }[] };
    expect(d.glideRecords[0]!.n).toBe(from);
    expect(d.glideRecords.every((g) => g.n >= from)).toBe(true);
    expect((await check(text)).failure).toBeNull();
  });
});

describe("sieved counts by depth from the sieve alone", () => {
  /** Each n's class cut by BigInt iteration: the first j <= K with q^m < 2^j, and whether n first goes below itself there. */
  function brute(map: CollatzMap, K: number, from: bigint, to: bigint): bigint[] {
    const out = new Array<bigint>(K + 1).fill(0n);
    for (let n = from; n < to; n++) {
      let v = n;
      let qm = 1n;
      let below = false; // (r < 0 only) n went below itself before its cut
      for (let j = 1; j <= K; j++) {
        if (v % 2n !== 0n) {
          v = (BigInt(map.q) * v + BigInt(map.r)) / 2n;
          qm *= BigInt(map.q);
        } else v /= 2n;
        if (qm < 1n << BigInt(j)) {
          if (v < n && !below) out[j]!++; // first goes below n at its cut: sieved (otherwise an exception)
          break;
        }
        if (v < n) below = true;
      }
    }
    return out;
  }
  for (const [text, K, from, to] of [
    ["3x+1", 10, 1n, 5000n],
    ["3x+1", 8, 777n, (3n << 8n) + 19n],
    ["3x+1", 12, (1n << 40n) + 3n, (1n << 40n) + 9000n],
    ["5x+1", 9, 1n, 3000n],
    ["3x+5", 10, 1n, 4000n],
    // r < 0: the odd step's image taken mod 2^j must stay non-negative; a piece over a period's end
    ["3x-1", 10, 1n, 5000n],
    ["3x-1", 9, 1000n, 1700n],
    ["5x-3", 8, (1n << 30n) + 77n, (1n << 30n) + 1900n],
    ["3x-7", 11, 3n, (5n << 11n) + 1234n],
  ] as const) {
    it(`${text} depth ${K} on [${from}, ${to}): residues walked one by one and classes walked agree with the brute force`, async () => {
      const map = parseMap(text);
      const data = await verifyTables(pool, planVerify({ map, from, to, sieveDepth: K, stepDepth: 4 }));
      const want = brute(map, K, from, to);
      expect(sievedInRange(map, K, from, to, data.exceptions, "each")).toEqual(want);
      expect(sievedInRange(map, K, from, to, data.exceptions, "walk")).toEqual(want);
    });
  }
});

/**
 * Every field of a certificate, edited with every digest recomputed (docs/certificate.md's table, row by row):
 * refused by the strict reader (exit 2), or found by --check without running any block again
 * (--sample 0), or (edits inside a block that its own totals and the merge hide) only by running that
 * block again, which --full always does and a sample does with the probability --check prints.
 */
describe("certificate: each field, edited and re-sealed, and the step that finds it", async () => {
  const map = parseMap("3x+1");
  // periods with delays; an unaligned end (the same run as above)
  const periods = await makeCertificate(map, 1n, (1n << 17n) + 12345n, 10, { delay: true });
  // r < 0 (3x-1, cycles 1 -> 1, 5 -> 7 -> 10 -> 5, 17 -> ... from memory: common practice), unaligned at both ends
  const negative = await makeCertificate(parseMap("3x-1"), 5n, (1n << 14n) + 777n, 9);
  // 3x+5: cycle members 1, 5, 19, 23, 187, 347 (their own cycles; from memory, checked by BigInt iteration in --check)
  const cycles = await makeCertificate(parseMap("3x+5"), 1n, 1n << 12n, 8);
  const classesReq = { map, from: 1n, to: 1n << 20n, stepDepth: 8, blocks: 4 };
  const byClasses = toExactJson(
    await certificate(
      await runVerify(pool, classesReq),
      await tableHashes(await verifyTables(pool, planVerify(classesReq)), sha256),
      stamp,
      {
        started: "s",
        finished: "f",
        workers: 2,
      },
    ),
    2,
  );
  // the records known below 10^6 from the shipped lists (OEIS A060412 and A006884): the range holds
  // the glide records 1027431 and 1126015 and the path record 1042431 of those lists (from memory)
  const global = await makeCertificate(map, 1_000_000n, 1_000_000n + (1n << 17n), 10, {}, publishedKnown(map, 1_000_000n));
  const docs = { periods, negative, cycles, byClasses, global };
  /** The certificate's own findings made again from its (edited) block table, as a careful forger would. */
  const rederive = (d: Record<string, Loose>) => {
    const c = readCertificate(toExactJson(d));
    const found = verifyFindings(mergeVerify(planVerify(c.request), c.entries, 0));
    Object.assign(d, parseExactJson(toExactJson(found)));
  };
  type Expect = { reader: RegExp } | { sampleZero: RegExp } | { onlyRerun: RegExp };
  const rows: [string, keyof typeof docs, (d: Record<string, Loose>) => void, Expect][] = [
    ["kind", "periods", (d) => (d.kind = "a note"), { reader: /^not a glidepath verification certificate/ }],
    ["version", "periods", (d) => (d.version = 3n), { reader: /^certificate version 3/ }],
    [
      "a field of no version 2 certificate",
      "periods",
      (d) => (d.comment = "ok"),
      { reader: /^comment is not a field of a version 2 certificate/ },
    ],
    ["map", "periods", (d) => (d.map = "3x+5"), { sampleZero: /^r: 1 in the certificate; the plan gives 5/ }],
    ["q", "periods", (d) => (d.q = 5n), { sampleZero: /^q: 5 in the certificate; the plan gives 3/ }],
    ["r", "periods", (d) => (d.r = -1n), { sampleZero: /^r: -1 in the certificate; the plan gives 1/ }],
    ["r written as a string", "periods", (d) => (d.r = "1"), { reader: /^r must be a whole number/ }],
    ["from", "periods", (d) => (d.from += 1n), { sampleZero: /^blockTable: / }],
    ["to", "periods", (d) => (d.to += 1n), { sampleZero: /^blockTable: / }],
    ["sieveDepth", "periods", (d) => (d.sieveDepth = 11n), { sampleZero: /^blockTable: / }],
    [
      "sieveDepth of a run by classes",
      "byClasses",
      (d) => (d.sieveDepth = 30n),
      { sampleZero: /^sieveDepth: 30 in the certificate; the plan gives 20/ },
    ],
    [
      "sieveDepth as a string",
      "byClasses",
      (d) => (d.sieveDepth = "abc"),
      { reader: /^sieveDepth must be a whole number written as digits, got the string "abc"/ },
    ],
    [
      "stepDepth",
      "periods",
      (d) => (d.stepDepth = 9n),
      { sampleZero: /^tables\.steps\.rows: 256 in the certificate; the rebuilt tables gives 512/ },
    ],
    [
      "maxSteps below the longest glide",
      "periods",
      (d) => (d.maxSteps = 20n),
      { sampleZero: /^blockTable\[\d+\]\.glideRecords\[\d+\] \(n = \d+\): .* BigInt iteration gives unresolved/ },
    ],
    [
      "blockTarget",
      "periods",
      (d) => (d.blockTarget = 2n),
      { sampleZero: /^blockTable: the block table has \d+ entries, the plan \d+ blocks/ },
    ],
    ["method", "periods", (d) => (d.method = "classes"), { sampleZero: /^method: "classes" in the certificate; the plan gives "periods"/ }],
    ["method unknown", "periods", (d) => (d.method = "guess"), { reader: /^method must be classes or periods/ }],
    [
      "preimage on a run by periods",
      "periods",
      (d) => (d.preimage = true),
      { sampleZero: /^preimage: true in the certificate; the plan gives false/ },
    ],
    ["preimage null", "byClasses", (d) => (d.preimage = null), { reader: /^preimage must be true or false, got null/ }],
    [
      "preimage true to false on a run that skipped leaves",
      "byClasses",
      (d) => (d.preimage = false),
      { sampleZero: /^blockTable\[\d+\]\.counts\.preimage: \d+ in the certificate; the plan has no preimage skip, so 0/ },
    ],
    ["engine", "periods", (d) => (d.engine = "bigint"), { sampleZero: /^engine: "bigint" in the certificate; the plan gives "kernel"/ }],
    ["tables", "periods", (d) => (d.tables.sieve.sha256 = "0".repeat(64)), { sampleZero: /^tables\.sieve\.sha256: / }],
    [
      "counts",
      "periods",
      (d) => (d.counts.unresolved += 1n),
      { sampleZero: /^counts\.unresolved: 1 in the certificate; the block table gives 0/ },
    ],
    ["handoffs", "periods", (d) => (d.handoffs += 1n), { sampleZero: /^handoffs: 1 in the certificate; the block table gives 0/ }],
    ["blockCount", "periods", (d) => (d.blockCount += 1n), { sampleZero: /^blockCount: / }],
    ["cycleMembers", "cycles", (d) => d.cycleMembers.pop(), { sampleZero: /^cycleMembers: / }],
    [
      "a cycle member's period, in its block and the totals",
      "cycles",
      (d) => {
        const n = d.cycleMembers[1].n;
        d.cycleMembers[1].period += 2n;
        for (const e of d.blockTable) for (const m of e.cycleMembers) if (m.n === n) m.period += 2n;
      },
      {
        sampleZero: /^blockTable\[\d+\]\.cycleMembers\[\d+\] \(n = \d+, period \d+\): BigInt iteration finds the cycle of \d+, period \d+/,
      },
    ],
    [
      "a glide record's standard steps, in its block, the totals and the maximum",
      "periods",
      (d) => {
        const g = d.glideRecords.at(-1);
        g.standardSteps += 1n;
        for (const e of d.blockTable) for (const x of e.glideRecords) if (x.n === g.n) x.standardSteps = g.standardSteps;
        d.maxGlide.standardSteps = g.standardSteps;
      },
      {
        sampleZero:
          /^blockTable\[\d+\]\.glideRecords\[\d+\] \(n = \d+\): \d+ standard steps \(\d+ of T\) in the certificate; BigInt iteration gives/,
      },
    ],
    [
      "a block's own glide record (no record of the range), its value",
      "periods",
      (d) => {
        const global = new Set(d.glideRecords.map((g: Loose) => g.n));
        const e = d.blockTable.find((b: Loose) => b.glideRecords.some((g: Loose) => !global.has(g.n)));
        const g = e.glideRecords.find((x: Loose) => !global.has(x.n));
        g.steps += 1n;
      },
      { sampleZero: /^blockTable\[\d+\]\.glideRecords\[\d+\] \(n = \d+\): .* BigInt iteration gives/ },
    ],
    [
      "a delay number said not to reach 1, in its block and the totals",
      "periods",
      (d) => {
        const e = d.blockTable.find((b: Loose) => b.kind === "delay");
        e.delay.unreached += 1n;
        e.delay.unreachedList = [27n];
        d.delay.unreached += 1n;
        d.delay.unreachedList = [27n];
      },
      { sampleZero: /^blockTable\[\d+\]\.delay\.unreachedList\[0\]: 27 reaches 1 within 100000 steps/ },
    ],
    [
      "an unresolved n equal to TO, in the last block and the totals",
      "negative",
      (d) => {
        const e = d.blockTable.at(-1);
        e.counts.checked -= 1n;
        e.counts.unresolved += 1n;
        e.unresolved = [d.to];
        d.counts.checked -= 1n;
        d.counts.unresolved += 1n;
        d.unresolved = [d.to];
      },
      { sampleZero: /^blockTable\[\d+\]\.unresolved\[0\]: \d+ is outside the range/ },
    ],
    [
      "a list longer than its count",
      "cycles",
      (d) => {
        const e = d.blockTable.find((b: Loose) => b.cycleMembers.length > 1);
        e.counts.cycleMembers -= 1n;
        e.counts.checked += 1n;
        d.counts.cycleMembers -= 1n;
        d.counts.checked += 1n;
      },
      { sampleZero: /^blockTable\[\d+\]\.cycleMembers: \d+ entries in the certificate; its count gives \d+/ },
    ],
    [
      "sieved counts moved between depths in two aligned blocks (the totals unchanged)",
      "periods",
      (d) => {
        const aligned = d.blockTable.filter((b: Loose) => b.kind === "aligned");
        aligned[0].counts.sievedByDepth[1] -= 1n;
        aligned[0].counts.sievedByDepth[2] += 1n;
        aligned[1].counts.sievedByDepth[1] += 1n;
        aligned[1].counts.sievedByDepth[2] -= 1n;
      },
      { sampleZero: /^blockTable\[\d+\]\.counts\.sievedByDepth\[1\]: .* the exact counter's classes less the block's exceptions gives/ },
    ],
    [
      "skipped leaves beyond the depth-N survivors (taken from the sieved)",
      "byClasses",
      (d) => {
        const leaves = exactCounts(map, 20).levels[20]!.survivors;
        const x = leaves - (d.counts.checked + d.counts.preimage) + 1n;
        const e = d.blockTable[0];
        e.counts.sievedByDepth[1] -= x;
        e.counts.preimage += x;
        d.counts.sievedByDepth[0].count -= x;
        d.counts.sieved -= x;
        d.counts.preimage += x;
      },
      { sampleZero: /^counts: \d+ checked and \d+ skipped of \d+ survivors at depth 20/ },
    ],
    [
      "known: the assumed glide of its named n",
      "global",
      (d) => (d.known.glide.standardSteps += 1n),
      { sampleZero: /^known\.glide \(n = 626331\): \d+ standard steps stated; BigInt iteration gives \d+/ },
    ],
    [
      "known: its bound",
      "global",
      (d) => (d.known.below -= 1n),
      { sampleZero: /^known\.below: 999999 in the certificate; the range's from gives 1000000/ },
    ],
    [
      "known: a higher assumed path, its n removed",
      "global",
      (d) => {
        d.known.path.n = null;
        d.known.path.peakT *= 1000n;
      },
      {
        sampleZero: /^globalRecords\.pathRecords: 1 entries in the certificate; the range's records above the known values gives 0 entries/,
      },
    ],
    ["known: source as a number", "global", (d) => (d.known.source = 5n), { reader: /^known\.source must be a string/ }],
    [
      "globalRecords: a new record dropped",
      "global",
      (d) => d.globalRecords.glideRecords.pop(),
      {
        sampleZero:
          /^globalRecords\.glideRecords: 1 entries in the certificate; the range's records above the known values gives 2 entries/,
      },
    ],
    [
      "globalRecords: the range's first record claimed new (it does not beat the known glide)",
      "global",
      (d) => d.globalRecords.glideRecords.unshift(d.glideRecords[0]),
      {
        sampleZero:
          /^globalRecords\.glideRecords\[0\]\.n: 1000000 in the certificate; the range's records above the known values gives 1027431/,
      },
    ],
    [
      "globalRecords without known values",
      "periods",
      (d) => (d.globalRecords = { glideRecords: [], pathRecords: [] }),
      {
        sampleZero:
          /^globalRecords: \{"glideRecords":\[\],"pathRecords":\[\]\} in the certificate; no known values \(known: null\) gives null/,
      },
    ],
    ["tool", "periods", (d) => (d.tool.name = "other"), { reader: /^tool\.name must be "glidepath"/ }],
    ["workers", "periods", (d) => (d.workers = 0n), { reader: /^workers must be at least 1, got 0/ }],
    ["started", "periods", (d) => (d.started = 5n), { reader: /^started must be a string/ }],
    // inside one block, hidden by its own totals and the merge: only running the block again finds it
    [
      "a count moved between outcomes inside a block and the totals",
      "negative",
      (d) => {
        checkedToException(
          d,
          d.blockTable.find((b: Loose) => b.kind === "range"),
        );
      },
      { onlyRerun: /^blockTable\[\d+\]\.counts\.checked: / },
    ],
    [
      "a path record dropped from its block, the range's records re-derived",
      "periods",
      (d) => {
        const p = d.pathRecords[3];
        for (const e of d.blockTable) e.pathRecords = e.pathRecords.filter((x: Loose) => x.n !== p.n);
        rederive(d);
      },
      { onlyRerun: /^blockTable\[\d+\]\.pathRecords/ },
    ],
    [
      "a glide record dropped from its block, the range's records re-derived",
      "periods",
      (d) => {
        const g = d.glideRecords[4];
        for (const e of d.blockTable) e.glideRecords = e.glideRecords.filter((x: Loose) => x.n !== g.n);
        rederive(d);
      },
      { onlyRerun: /^blockTable\[\d+\]\.glideRecords/ },
    ],
  ];

  it("each certificate as written holds", async () => {
    for (const text of Object.values(docs)) expect((await check(text, false, 0)).failure).toBeNull();
  });

  for (const [what, which, edit, want] of rows) {
    it(`${what}: ${"reader" in want ? "refused by the strict reader" : "sampleZero" in want ? "found without running a block" : "found only by running its block again"}`, async () => {
      const d = parseExactJson(docs[which]) as Record<string, Loose>;
      edit(d);
      const text = await reseal(d as Doc);
      if ("reader" in want) {
        expect(() => readCertificate(text)).toThrow(UsageError);
        expect(() => readCertificate(text)).toThrow(want.reader);
      } else if ("sampleZero" in want) expect((await check(text, false, 0)).failure).toMatch(want.sampleZero);
      else {
        expect((await check(text, false, 0)).failure).toBeNull();
        expect((await check(text, true)).failure).toMatch(want.onlyRerun);
      }
    });
  }

  it("the sample can fall on the last block, and --check says what a sample proved", async () => {
    const d = parseExactJson(negative) as Record<string, Loose>;
    const last = d.blockTable.length - 1;
    checkedToException(d, d.blockTable[last]);
    const text = await reseal(d as Doc);
    // a sample of one that picks the largest index it may: the last block
    const r = await checkCertificate(readCertificate(text), { pool, sha256, sample: 1, randomBelow: (n) => n - 1 });
    expect(r.failure).toMatch(new RegExp(`^blockTable\\[${last}\\]\\.counts\\.checked: `));
    let k = 0; // the largest index, then the one below it
    const ok = await checkCertificate(readCertificate(negative), { pool, sha256, sample: 2, randomBelow: (n) => n - 1 - (k++ % n) });
    const n = d.blockTable.length;
    expect(ok.checked.at(-1)).toBe(
      `2 of ${n} blocks run again at random (${n - 2}, ${n - 1}): equal to their entries; a single altered block escapes this check with probability ${n - 2}/${n} = ${((n - 2) / n).toFixed(3)}; --full runs all`,
    );
  });
});
