// The claim a verification run states (src/jobs/verify/claim.ts) against a plain BigInt brute force
// written here: every n of a small range iterated, and "proved" decided by the induction itself.
import { classifyStart } from "./brute.js";
import type { StartKind } from "./brute.js";
import { describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import type { CollatzMap } from "../src/core/map.js";
import { bigintBlock } from "../src/jobs/verify/block.js";
import { mergeVerify } from "../src/jobs/verify/merge.js";
import type { VerifyResult } from "../src/jobs/verify/merge.js";
import { planVerify } from "../src/jobs/verify/plan.js";
import { CLAIM_CAPS, verifyClaim } from "../src/jobs/verify/claim.js";

const MAX_STEPS = 1000;

/**
 * A run of the library's BigInt engine over [from, to): every block walked n by n (bigintBlock) and
 * merged (mergeVerify), as the workers and the merge of a real run do, without a pool.
 */
function run(map: CollatzMap, from: bigint, to: bigint): VerifyResult {
  const plan = planVerify({ map, from, to, sieveDepth: 4, classes: false, maxSteps: MAX_STEPS });
  const ctx = { map, sieveDepth: plan.sieveDepth, maxSteps: MAX_STEPS, stoppedClasses: [] };
  return mergeVerify(
    plan,
    plan.blocks.map((b) => bigintBlock(ctx, b)),
    0,
  );
}

type Kind = StartKind;
const classify = (q: bigint, r: bigint, n: bigint): Kind => classifyStart(q, r, n, MAX_STEPS);

/** The brute force's verdict: each n's kind and whether the induction proves it (n below from assumed proved). */
function brute(map: CollatzMap, from: bigint, to: bigint) {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  const kinds = new Map<bigint, Kind>();
  const proved = new Map<bigint, boolean>();
  for (let n = from; n < to; n++) {
    const k = classify(q, r, n);
    kinds.set(n, k);
    // proved: n is its cycle's least member, or goes below itself onto a number that is proved (or below from)
    proved.set(n, k.kind === "member" || (k.kind === "descent" && (k.below < from || proved.get(k.below) === true)));
  }
  let u: bigint | null = null;
  for (let n = from; n < to && u === null; n++) if (!proved.get(n)) u = n;
  const of = (kind: Kind["kind"]) => [...kinds].filter(([, k]) => k.kind === kind).map(([n]) => n);
  return { kinds, u, members: of("member"), entrants: of("entrant"), unresolved: of("unresolved") };
}

describe("the claim of a run against a BigInt brute force", () => {
  // 5x+1 and 3x+5 have numbers that neither descend nor cycle (common practice), 3x+1 none below 2^68 (published verification runs)
  const cases: [string, bigint, bigint][] = [
    ["5x+1", 1n, 600n],
    ["5x+1", 8n, 700n],
    ["5x+1", 7n, 200n],
    ["3x+5", 1n, 500n],
    ["3x+5", 100n, 700n],
    ["3x+1", 1n, 500n],
    ["3x+1", 27n, 300n],
  ];
  for (const [name, from, to] of cases)
    it(`${name} over [${from}, ${to}): proved up to the first number the induction does not reach, and no further`, () => {
      const map = parseMap(name);
      const r = run(map, from, to);
      const b = brute(map, from, to);
      const claim = verifyClaim(r);
      // the counts the claim reads agree with the brute force
      expect(r.counts.cycleMembers).toBe(BigInt(b.members.length));
      expect(r.counts.cycleEntrants).toBe(BigInt(b.entrants.length));
      expect(r.counts.unresolved).toBe(BigInt(b.unresolved.length));
      // every n below provedTo is proved by the induction, provedTo itself is not
      expect(claim.provedTo).toBe(b.u ?? to);
      if (b.u === null) {
        expect(claim.firstUnproved).toBeNull();
        expect(claim.notProved).toBeNull();
        expect(claim.claim).toMatch(/^Proved: every n in \[/);
      } else {
        const k = b.kinds.get(b.u)!;
        expect(claim.firstUnproved).toEqual({
          n: b.u,
          reason: k.kind === "entrant" ? "cycle entrant" : "unresolved",
          cycleMin: k.kind === "entrant" ? k.min : null,
        });
        expect(claim.notProved).toContain(`from ${b.u.toLocaleString("en-US")} on`);
        if (b.u > from) expect(claim.claim).toContain(`Proved only for [${from.toLocaleString("en-US")}, ${b.u.toLocaleString("en-US")})`);
        else expect(claim.claim).toMatch(/^Nothing in the range is proved/);
      }
      expect(claim.assumption).toMatch(from === 1n ? /^By induction from 1/ : new RegExp(`^Given the numbers below ${from}`));
      // the lists: the smallest first, capped, with the exact count of the rest
      const byTitle = (t: RegExp) => claim.lists.find((l) => t.test(l.title));
      const expectList = (t: RegExp, all: bigint[], cap: number) => {
        const l = byTitle(t);
        if (all.length === 0) return expect(l).toBeUndefined();
        expect(l!.count).toBe(BigInt(all.length));
        expect(l!.shown.map((s) => BigInt(s.split(" ")[0]!.replace(/,/g, "")))).toEqual(all.slice(0, cap));
        expect(l!.more).toBe(BigInt(Math.max(0, all.length - cap)));
      };
      expectList(/^cycle members/, b.members, CLAIM_CAPS.members);
      expectList(/^enter a cycle/, b.entrants, CLAIM_CAPS.entrants);
      expectList(/^unresolved/, b.unresolved, CLAIM_CAPS.unresolved);
    });

  it("5x+1 from 1: 5 enters the cycle of 13, so nothing from 5 on is proved, though 6 goes below itself", () => {
    // 5x+1: 5 -> 13 -> 33 -> 83 -> 208 -> 104 -> 52 -> 26 -> 13 (brute force: classify above); 6 -> 3 (one halving)
    const b = brute(parseMap("5x+1"), 1n, 40n);
    expect(b.kinds.get(5n)).toEqual({ kind: "entrant", min: 13n });
    expect(b.kinds.get(6n)).toEqual({ kind: "descent", below: 3n });
    const claim = verifyClaim(run(parseMap("5x+1"), 1n, 40n));
    expect(claim.provedTo).toBe(5n);
    expect(claim.claim).toContain("Proved only for [1, 5)");
    expect(claim.notProved).toContain("5 enters the cycle of 13");
    expect(claim.descent).toContain("except the");
  });
});
