// Certificates: every field a reader relies on is re-derived by --check, so an edit to any one of them
// is found, also when the editor recomputes every digest (the format is public); and the sieved
// counts by depth against a BigInt brute force of each n's class cut on ranges with unaligned ends.
import { randomInt } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { certificate, digestOf, readCertificate } from "../src/jobs/verify/certificate.js";
import { checkCertificate, sievedInRange } from "../src/jobs/verify/check.js";
import { verifyTables } from "../src/jobs/verify/tables.js";
import { planVerify } from "../src/jobs/verify/plan.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import { tableHashes } from "../src/jobs/verify/certificate.js";
import { UsageError } from "../src/core/errors.js";
import { parseExactJson, toExactJson } from "../src/core/json.js";
import { nodePool } from "../src/node/kernel.js";
import { createHash } from "node:crypto";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");
const stamp = { version: "test", kernelBuild: "test" };

type Doc = Record<string, unknown> & {
  blockTable: Record<string, unknown>[];
};
// biome-ignore lint/suspicious/noExplicitAny: the edits reach into the parsed JSON freely, as a person editing the file would
type Loose = any;

async function makeCertificate(map: CollatzMap, from: bigint, to: bigint, sieveDepth: number, extra: { delay?: boolean } = {}) {
  const req = { map, from, to, sieveDepth, stepDepth: 8, blocks: 4, ...extra };
  const r = await runVerify(pool, req);
  const plan = planVerify(req);
  const hashes = plan.engine === "kernel" ? await tableHashes(await verifyTables(pool, plan), sha256) : null;
  const cert = await certificate(r, hashes, stamp, { started: "s", finished: "f", workers: 2 });
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
        const e = d.blockTable.find((b: Loose) => b.kind === "range");
        e.counts.checked -= 1n;
        e.counts.exceptions += 1n;
        d.counts.checked -= 1n;
        d.counts.exceptions += 1n;
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
    expect(r.failure).toMatch(/^pathRecords\[6\]\.peakT \(n = \d+\): \d+ in the certificate; BigInt iteration gives \d+/);
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
  /** Each n's class cut by BigInt iteration: the first j <= K with q^m < 2^j, and whether n descends there. */
  function brute(map: CollatzMap, K: number, from: bigint, to: bigint): bigint[] {
    const out = new Array<bigint>(K + 1).fill(0n);
    for (let n = from; n < to; n++) {
      let v = n;
      let qm = 1n;
      for (let j = 1; j <= K; j++) {
        if (v % 2n === 1n) {
          v = (BigInt(map.q) * v + BigInt(map.r)) / 2n;
          qm *= BigInt(map.q);
        } else v /= 2n;
        if (qm < 1n << BigInt(j)) {
          if (v < n) out[j]!++; // descends at its cut: sieved (otherwise an exception)
          break;
        }
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
  ] as const) {
    it(`${text} depth ${K} on [${from}, ${to})`, async () => {
      const map = parseMap(text);
      const data = await verifyTables(pool, planVerify({ map, from, to, sieveDepth: K, stepDepth: 4 }));
      expect(sievedInRange(map, K, from, to, data.exceptions)).toEqual(brute(map, K, from, to));
    });
  }
});
