// Conjugacy permutations, step tables and the Arrow exports of the census, cycles and step tables.
import { afterAll, describe, expect, it } from "vitest";
import { tableFromIPC } from "apache-arrow";
import { parseMap } from "../src/core/map.js";
import { runCensus } from "../src/jobs/census/census.js";
import { searchCycles } from "../src/jobs/cycles/cycles.js";
import { conjugacy, conjugacyPermutation, cycleStructure } from "../src/jobs/conjugacy.js";
import { applySteps, stepTable } from "../src/jobs/steps.js";
import { censusArrow, cyclesArrow, stepTableArrow } from "../src/outputs/arrow.js";
import { nodePool } from "../src/node/kernel.js";
import { parities } from "./helpers.js";

const pool = await nodePool(2);
afterAll(() => pool.terminate());
const maps = ["3x+1", "3x-1", "3x+5", "5x+1"].map(parseMap);
import { iterateBig } from "./brute.js";

describe("conjugacy and step tables", () => {
  it("Q_k is a permutation of Z/2^k and its cycle structure matches a brute force, k <= 12 (Terras 1976)", async () => {
    for (const map of maps) {
      for (const k of [1, 5, 12]) {
        const perm = await conjugacyPermutation(pool, map, k);
        const brute = new Uint32Array(1 << k);
        for (let a = 0; a < 1 << k; a++) brute[a] = parities(map, BigInt(a), k).reduce((s, p, i) => s + p * 2 ** i, 0);
        expect(Array.from(perm)).toEqual(Array.from(brute));
        expect(new Set(perm).size).toBe(1 << k);
        const r = await conjugacy(pool, map, k);
        expect(r.cycles).toBe(cycleStructure(brute).cycles);
        expect(r.fixedPoints).toBe(cycleStructure(brute).fixedPoints);
      }
    }
  });
  it("a step table reproduces k single steps for n up to 2^200, every map (k = 12)", async () => {
    let s = 2n ** 61n - 1n;
    for (const map of maps) {
      const t = await stepTable(pool, map, 12);
      for (let i = 0; i < 200; i++) {
        s = (s * 6364136223846793005n + 1442695040888963407n) % 2n ** 200n; // a fixed LCG stream
        expect(applySteps(t, s)).toBe(iterateBig(map, s, 12));
      }
    }
  });
});

describe("arrow exports round-trip through apache-arrow's reader", () => {
  it("step table, census tallies and cycles", async () => {
    const map = parseMap("3x-1");
    const t = await stepTable(pool, map, 8);
    const st = tableFromIPC(stepTableArrow(t));
    expect(st.numRows).toBe(256);
    expect(st.schema.fields.map((f) => `${f.name}:${f.type}`)).toEqual(["residue:Uint32", "odd_steps:Uint8", "image:Int64"]);
    expect(Array.from(st.getChild("image")!.toArray() as BigInt64Array)).toEqual(Array.from(t.image));
    const c = await runCensus(pool, map, 10);
    const ct = tableFromIPC(censusArrow(c));
    const rows = ct.toArray().map((r) => r.toJSON());
    const live10 = rows.filter((r) => r.tally === "live" && r.depth === 10).reduce((s, r) => s + (r.count as bigint), 0n);
    expect(live10).toBe(c.levels[10]!.survivors);
    const cy = await searchCycles(pool, parseMap("3x+5"), 12);
    const yt = tableFromIPC(cyclesArrow(cy));
    expect(yt.getChild("representative")!.toArray()).toEqual(cy.cycles.map((x) => String(x.representative)));
    expect(Array.from(yt.getChild("elements")!.get(0)!.toArray())).toEqual(cy.cycles[0]!.elements.map(String));
  });
});
