// The plan layer in one process: every job's shards, run one by one and merged, give exactly the
// whole run; the weights that balance a sieve's shards are exact; parts survive their serialisation.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { makePlan, planHash, runWhole, sha256Hex, splitTasks } from "../src/engine/plan.js";
import type { JobKind, JobName, PartBase, Plan } from "../src/engine/plan.js";
import { censusJob } from "../src/jobs/census/census.js";
import type { CensusParams } from "../src/jobs/census/census.js";
import { conjugacyJob } from "../src/jobs/conjugacy.js";
import type { ConjugacyParams } from "../src/jobs/conjugacy.js";
import { cycleJob } from "../src/jobs/cycles/cycles.js";
import type { CycleParams } from "../src/jobs/cycles/cycles.js";
import { liveDescendants, sieveJob, sieveParams } from "../src/jobs/sieve/sieve.js";
import type { SieveParams } from "../src/jobs/sieve/sieve.js";
import { treeJob } from "../src/jobs/tree/tree.js";
import type { TreeParams } from "../src/jobs/tree/tree.js";
import { runVerify, verifyJob } from "../src/jobs/verify/verify.js";
import type { VerifyParams, VerifyPart } from "../src/jobs/verify/verify.js";
import { checkParts } from "../src/node/cluster/parts.js";
import { createRun, readRun } from "../src/node/cluster/rundir.js";
import { runShardToDisk } from "../src/node/cluster/shard.js";
import { packData, toExactJson, unpackData } from "../src/core/json.js";
import { censusJson, conjugacyJson, cyclesJson, sieveJson } from "../src/outputs/summary.js";
import { verifyJson } from "../src/jobs/verify/certificate.js";
import { nodePool } from "../src/node/kernel.js";
import { A076227 } from "../src/core/published.js";
import { coefficientStop } from "./helpers.js";

const pool = await nodePool(2);
const tmp = mkdtempSync(join(tmpdir(), "glidepath-plan-"));
afterAll(async () => {
  await pool.terminate();
  rmSync(tmp, { recursive: true, force: true });
});

/** A result's JSON without its time. */
const untimed = (j: Record<string, unknown>) => toExactJson({ ...j, seconds: 0 });

async function shardedEqualsWhole<P, Part extends PartBase, R>(
  job: JobKind<P, Part, R>,
  params: P,
  shards: number,
  json: (r: R) => Record<string, unknown>,
): Promise<R> {
  const whole = await runWhole(pool, job, params);
  const plan = await makePlan(pool, job, params, shards, 24);
  const parts: Part[] = [];
  for (let i = 0; i < shards; i++) {
    // each part goes through its serialised form, as it would between machines
    const part = await job.runShard(pool, plan, i);
    parts.push(unpackData(JSON.parse(JSON.stringify(packData(part)))) as Part);
  }
  const merged = await job.merge(pool, plan, parts);
  expect(untimed(json(merged))).toBe(untimed(json(whole)));
  return merged;
}

describe("plan layer: shards merge to the whole run", () => {
  it("sieve 3x+1 and 3x-1 to depth 26 in 7 shards", async () => {
    const r = await shardedEqualsWhole(sieveJob, sieveParams({ map: parseMap("3x+1"), depth: 26, mode: "survivors" }, true), 7, sieveJson);
    expect(r.levels.map((l) => l.survivors)).toEqual(A076227.slice(0, 27)); // OEIS A076227 (published entry)
    await shardedEqualsWhole(sieveJob, sieveParams({ map: parseMap("3x-1"), depth: 26, mode: "survivors" }, false), 7, sieveJson);
  });

  it("census 5x+1 depth 20, cycles 3x+5 to period 24, conjugacy depth 14 and a verification range, in 5 shards", async () => {
    const c = await shardedEqualsWhole(censusJob, { map: parseMap("5x+1"), depth: 20 }, 5, censusJson);
    expect(c.agreesWithExactCounter).toBe(true);
    await shardedEqualsWhole(cycleJob, { map: parseMap("3x+5"), maxPeriod: 24 }, 5, cyclesJson);
    const k = await shardedEqualsWhole(conjugacyJob, { map: parseMap("3x+1"), depth: 14 }, 5, conjugacyJson);
    expect(k.lengths.reduce((s, l) => s + l.length * l.count, 0)).toBe(2 ** 14); // a permutation (common practice)
    const v = await shardedEqualsWhole(verifyJob, { map: parseMap("3x+1"), from: 1000n, to: 3n << 20n, sieveDepth: 14 }, 5, verifyJson);
    expect(v.counts.unresolved).toBe(0n);
  });

  it("a shard outside the plan is refused", async () => {
    const plan = await makePlan(pool, censusJob, { map: parseMap("3x+1"), depth: 12 }, 3);
    await expect(censusJob.runShard(pool, plan, 3)).rejects.toThrow(/shard 3 is not in the plan/);
  });
});

describe("plan layer: layout, weights and hashes", () => {
  it("splitTasks covers every task once, contiguously, balancing weights where given, and makes no shard without work", () => {
    for (const [tasks, shards, made] of [
      [10, 3, 3],
      [3, 5, 3],
      [0, 2, 1],
      [100, 1, 1],
    ] as const) {
      const ranges = splitTasks(tasks, shards);
      expect(ranges).toHaveLength(made);
      expect(ranges[0]!.first).toBe(0);
      expect(ranges.at(-1)!.end).toBe(tasks);
      for (let i = 1; i < ranges.length; i++) expect(ranges[i]!.first).toBe(ranges[i - 1]!.end);
    }
    // weights 5+1+1+1+1+1 | 5+5: the first boundary where the preceding weight reaches half (10 of 20)
    const w = [5n, 1n, 1n, 1n, 1n, 1n, 5n, 5n];
    expect(splitTasks(8, 2, w)).toEqual([
      { first: 0, end: 6 },
      { first: 6, end: 8 },
    ]);
    // one heavy task and weightless ones: 4 shards asked, the work fits 2 (the weightless tasks join a neighbour)
    expect(splitTasks(5, 4, [0n, 9n, 0n, 0n, 1n])).toEqual([
      { first: 0, end: 2 },
      { first: 2, end: 5 },
    ]);
  });

  it("the sieve's weights are the survivors below each prefix, by BigInt brute force (depth 14 below depth 6)", async () => {
    const map = parseMap("3x+1");
    const plan = await makePlan(pool, sieveJob, sieveParams({ map, depth: 14, mode: "survivors" }, true), 3, 2);
    expect(plan.prefixBits).toBeGreaterThan(0);
    const d = plan.prefixBits;
    // brute force here: a mod 2^14 survives when its coefficient does not drop within 14 steps
    const below = new Map<bigint, bigint>();
    for (let a = 0n; a < 1n << 14n; a++) {
      if (coefficientStop(map, a === 0n ? 1n << 14n : a, 14) === null) {
        const p = a % (1n << BigInt(d));
        below.set(p, (below.get(p) ?? 0n) + 1n);
      }
    }
    expect(plan.prefixes!.map((p) => below.get(p) ?? 0n)).toEqual(plan.weights);
    expect(plan.weights!.reduce((s, w) => s + w, 0n)).toBe(A076227[14]); // OEIS A076227 (published entry)
    expect(liveDescendants(3, 0, 14, "survivors")).toEqual([A076227[14]]);
  });

  it("the plan hash names the parameters, the layout and the build", async () => {
    const a = await makePlan(pool, censusJob, { map: parseMap("3x+1"), depth: 12 }, 3);
    const b = await makePlan(pool, censusJob, { map: parseMap("3x+1"), depth: 13 }, 3);
    const c = await makePlan(pool, censusJob, { map: parseMap("3x+1"), depth: 12 }, 4);
    expect(new Set([a.hash, b.hash, c.hash]).size).toBe(3);
    const { hash, ...body } = a;
    // a sha256 in hex, by a digest that gives the standard's example: sha256("abc") (FIPS 180-2, from memory)
    expect(hash).toMatch(/^[0-9a-f]{64}$/);
    expect(await sha256Hex("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    // every field of the plan is in the hash: another value of any one of them (the plan's own list of fields) gives another hash
    const other = (key: string, v: unknown): unknown => {
      if (key === "params") return { ...(v as { depth: number }), depth: (v as { depth: number }).depth + 1 };
      if (typeof v === "string") return `${v}x`;
      if (typeof v === "number") return v + 1;
      if (Array.isArray(v)) return v.length > 0 ? v.slice(1) : [1n];
      if (v === null) return [1n];
      throw new Error(`no other value for the plan's field ${key}`);
    };
    for (const [key, v] of Object.entries(body))
      expect(await planHash(censusJob, { ...body, [key]: other(key, v) } as typeof body), key).not.toBe(hash);
  });

  it("packData round-trips bigints and typed arrays exactly, inline or spilled to files", () => {
    const value = {
      n: -(2n ** 100n),
      u: BigUint64Array.from([0n, 2n ** 64n - 1n]),
      i: BigInt64Array.from([-1n]),
      w: new Uint32Array(3e5),
      k: 3,
    };
    value.w[299_999] = 7;
    const files = new Map<string, Uint8Array>();
    const packed = packData(value, (bytes) => {
      files.set(`f${files.size}`, bytes.slice());
      return `f${files.size - 1}`;
    });
    expect(files.size).toBe(1); // only the array above the spill size
    const back = unpackData(JSON.parse(JSON.stringify(packed)), (f) => files.get(f)!) as typeof value;
    expect(back).toEqual(value);
  });
});

// ---- every field of every job's request survives plan.json, and the plan hash names each one ----

/**
 * A job's request with every field set (`full`: Required<P>, so a field added to the request type
 * and not here does not compile), each field to something other than its default, and a second
 * value for every field (`other`); `minimal` leaves every optional field out.
 */
interface CodecCase<P> {
  readonly job: JobKind<P, PartBase, unknown>;
  readonly full: Required<P>;
  readonly other: Required<P>;
  readonly minimal: P;
}

/** A case with its request type erased, for the table of all jobs. */
interface AnyCase {
  readonly job: JobKind<unknown, PartBase, unknown>;
  readonly full: Record<string, unknown>;
  readonly other: Record<string, unknown>;
  readonly minimal: Record<string, unknown>;
}
const caseOf = <P>(c: CodecCase<P>): AnyCase => c as unknown as AnyCase;

// One case per job the plan layer knows (a job missing from the table does not compile). The values
// are chosen here, each valid for its job's layout (checked by makePlan below).
const CODEC_CASES: Record<JobName, AnyCase> = {
  verify: caseOf<VerifyParams>({
    job: verifyJob,
    full: {
      map: parseMap("3x+1"),
      from: (1n << 20n) + 5n,
      to: (1n << 21n) + 3n,
      sieveDepth: 12,
      stepDepth: 9,
      maxSteps: 500,
      blocks: 5,
      limitBits: 24,
      delay: true,
      classes: false,
      preimage: false,
      skipReached: true,
      // (values for the codec only, no claim: the run does not read them)
      known: { below: (1n << 20n) + 5n, glide: { n: null, standardSteps: 443 }, path: { n: null, peakT: 10n ** 14n }, source: "codec" },
    },
    other: {
      map: parseMap("3x-1"),
      from: 7n,
      to: 1n << 22n,
      sieveDepth: 13,
      stepDepth: 10,
      maxSteps: 501,
      blocks: 6,
      limitBits: 25,
      delay: false,
      classes: true,
      preimage: true,
      skipReached: false,
      // (codec values; under 3x+1 they are the records below 7: n = 3, 3 5 8 4 2, glide 4 steps of T, 2 odd, 6 standard, highest 8)
      known: { below: 7n, glide: { n: 3n, standardSteps: 6 }, path: { n: 3n, peakT: 8n }, source: "records below 7" },
    },
    minimal: { map: parseMap("3x+1"), from: 1n, to: 1n << 16n },
  }),
  sieve: caseOf<SieveParams>({
    job: sieveJob,
    full: { map: parseMap("3x-1"), depth: 14, mode: "full", leaves: true, exceptionLimit: 7 },
    other: { map: parseMap("5x+1"), depth: 15, mode: "survivors", leaves: false, exceptionLimit: 8 },
    minimal: { map: parseMap("3x+1"), depth: 10, mode: "survivors", leaves: false, exceptionLimit: 50 },
  }),
  census: caseOf<CensusParams>({
    job: censusJob,
    full: { map: parseMap("5x+1"), depth: 10 },
    other: { map: parseMap("3x+1"), depth: 11 },
    minimal: { map: parseMap("3x+1"), depth: 10 },
  }),
  cycles: caseOf<CycleParams>({
    job: cycleJob,
    full: { map: parseMap("3x+5"), maxPeriod: 12 },
    other: { map: parseMap("3x+1"), maxPeriod: 13 },
    minimal: { map: parseMap("3x+1"), maxPeriod: 12 },
  }),
  conjugacy: caseOf<ConjugacyParams>({
    job: conjugacyJob,
    full: { map: parseMap("3x-1"), depth: 10 },
    other: { map: parseMap("3x+1"), depth: 11 },
    minimal: { map: parseMap("3x+1"), depth: 10 },
  }),
  tree: caseOf<TreeParams>({
    job: treeJob,
    full: { map: parseMap("3x+1"), n: 5n, depth: 12, steps: "standard", below: 100n },
    other: { map: parseMap("3x+5"), n: 7n, depth: 13, steps: "T", below: 101n },
    minimal: { map: parseMap("3x+1"), n: 1n, depth: 12, steps: "T", below: null },
  }),
};

/** The params as plan.json carries them: encoded, packed, written as JSON text, read back and decoded. */
function throughJson(job: JobKind<unknown, PartBase, unknown>, params: unknown): unknown {
  return job.codec.decode(unpackData(JSON.parse(JSON.stringify(packData(job.codec.encode(params))))) as Record<string, unknown>);
}

const jobOf = (name: string) => CODEC_CASES[name as JobName].job;

describe("plan layer: every field of every job's request survives plan.json", () => {
  for (const [name, c] of Object.entries(CODEC_CASES)) {
    it(`${name}: the codec has exactly the request's fields, each round-trips, and each changes the plan hash`, async () => {
      expect(c.job.name).toBe(name);
      // the field table's keys are the request type's keys (those `full` must list to compile)
      expect(Object.keys(c.job.codec.fields).sort()).toEqual(Object.keys(c.full).sort());
      expect(Object.keys(c.other).sort()).toEqual(Object.keys(c.full).sort());
      for (const params of [c.full, c.other, c.minimal]) expect(throughJson(c.job, params)).toEqual(params);
      expect(throughJson(c.job, c.full)).toStrictEqual(c.full); // every field present, with its own value
      // the plan hash goes through the same codec: changing any one field changes it
      const body: Omit<Plan<unknown>, "hash"> = {
        kind: "glidepath plan",
        job: c.job.name,
        params: c.full,
        prefixBits: 0,
        prefixes: null,
        tasks: 1,
        weights: null,
        shards: [{ first: 0, end: 1 }],
        kernelBuild: "0000000000000000",
      };
      const hash = await planHash(c.job, body);
      for (const key of Object.keys(c.full)) {
        expect(await planHash(c.job, { ...body, params: { ...c.full, [key]: c.other[key] } }), key).not.toBe(hash);
        if (!(key in c.minimal)) expect(await planHash(c.job, { ...body, params: { ...c.full, [key]: undefined } }), key).not.toBe(hash);
      }
    });
  }

  it("every job's full request through a stored plan.json (createRun, readRun) comes back field for field", async () => {
    for (const [name, c] of Object.entries(CODEC_CASES)) {
      const plan = await makePlan(pool, c.job, c.full, 2);
      const dir = join(tmp, `stored-${name}`);
      await createRun(dir, c.job, plan, { cpusPerTask: 1, estimate: { seconds: 1, memoryMiB: 300 } });
      const run = await readRun(dir, jobOf);
      expect(run.plan.params, name).toStrictEqual(c.full);
      expect(run.plan.hash, name).toBe(plan.hash);
    }
  });

  it("a stored field edited, removed, added or of the wrong type is refused with a line naming it", async () => {
    const dir = join(tmp, "stored-verify");
    const path = join(dir, "plan.json");
    const text = readFileSync(path, "utf8");
    const edit = (key: string, value: unknown) => {
      const j = JSON.parse(text) as { plan: { params: Record<string, unknown> } };
      if (value === undefined) delete j.plan.params[key];
      else j.plan.params[key] = value;
      writeFileSync(path, JSON.stringify(j));
    };
    // each case: one stored field set to a value (undefined: removed), and the refusal it gets
    const cases: [string, unknown, RegExp][] = [
      // the old encoder kept no `classes`: an edit of it went unseen by the hash
      ["classes", null, /was changed after it was written: its hash does not match/],
      ["preimage", true, /was changed after it was written/],
      ["blocks", 6, /was changed after it was written/],
      ["limitBits", undefined, /plan\.json is damaged: params\.limitBits is missing/],
      ["colour", "red", /plan\.json is damaged: params\.colour is not a parameter of this job/],
      ["delay", "yes", /plan\.json is damaged: params\.delay must be true or false, got "yes"/],
      ["sieveDepth", 12.5, /plan\.json is damaged: params\.sieveDepth must be a whole number, got 12\.5/],
      ["map", "3X + 1", /plan\.json is damaged: params\.map must be a map's canonical name/],
      ["known", { below: 5, glide: 3 }, /plan\.json is damaged: params\.known must be the records known below FROM/],
    ];
    try {
      for (const [key, value, why] of cases) {
        edit(key, value);
        await expect(readRun(dir, jobOf)).rejects.toThrow(why);
      }
    } finally {
      writeFileSync(path, text);
    }
    expect((await readRun(dir, jobOf)).plan.params).toStrictEqual(CODEC_CASES.verify.full);
  });

  it("verify with every field set (blocks, limitBits, delay, periods, depths, cap): stored plan, parts on disk, merge = one process", async () => {
    const req = CODEC_CASES.verify.full as unknown as VerifyParams;
    const plan = await makePlan(pool, verifyJob, req, 3);
    const dir = join(tmp, "verify-every-field");
    await createRun(dir, verifyJob as JobKind<unknown, PartBase, unknown>, plan, {
      cpusPerTask: 1,
      estimate: { seconds: 1, memoryMiB: 300 },
    });
    const run = await readRun(dir, jobOf);
    for (let i = 0; i < run.plan.shards.length; i++) await runShardToDisk(run, verifyJob as JobKind<unknown, VerifyPart, unknown>, i, pool);
    const parts = await checkParts<unknown, VerifyPart>(run, pool.build);
    const merged = await verifyJob.merge(
      pool,
      run.plan as Plan<VerifyParams>,
      parts.map((p) => p.part),
    );
    const whole = await runVerify(pool, req);
    expect(untimed(verifyJson(merged))).toBe(untimed(verifyJson(whole)));
    expect(toExactJson(merged.entries)).toBe(toExactJson(whole.entries));
    // each field took effect (a field lost on the way would change these; values computed by the plan here)
    expect(merged.blockTarget).toBe(5);
    expect(merged.method).toBe("periods");
    expect(merged.sieveDepth).toBe(12);
    expect(merged.stepDepth).toBe(9);
    expect(merged.maxSteps).toBe(500);
    expect(merged.delay).not.toBeNull();
    expect(merged.handoffs).toBeGreaterThan(0n); // limitBits 24: values past 2^24 finish in BigInt
  });
});
