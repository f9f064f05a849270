// The plan layer in one process: every job's shards, run one by one and merged, give exactly the
// whole run; the weights that balance a sieve's shards are exact; parts survive their serialisation.
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { makePlan, planHash, runWhole, splitTasks } from "../src/engine/plan.js";
import type { JobKind, PartBase } from "../src/engine/plan.js";
import { censusJob } from "../src/jobs/census/census.js";
import { conjugacyJob } from "../src/jobs/conjugacy.js";
import { cycleJob } from "../src/jobs/cycles/cycles.js";
import { liveDescendants, sieveJob, sieveParams } from "../src/jobs/sieve/sieve.js";
import { verifyJob } from "../src/jobs/verify/verify.js";
import { packData, toExactJson, unpackData } from "../src/core/json.js";
import { censusJson, conjugacyJson, cyclesJson, sieveJson } from "../src/outputs/summary.js";
import { verifyJson } from "../src/jobs/verify/certificate.js";
import { nodePool } from "../src/node/kernel.js";
import { A076227 } from "../src/core/published.js";
import { coefficientStop } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());

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
    expect(await planHash(censusJob, body)).toBe(hash);
    expect(await planHash(censusJob, { ...body, kernelBuild: "0000000000000000" })).not.toBe(hash);
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
