// The Verify view as a user reads it, in Debian's Chromium: a verdict that follows from the counts
// (against the BigInt brute force of test/brute.ts), the phase of a run shown while the main thread stays
// free, a sieve depth suited to the range, a refused link value beside its field, and one time.
import { classifyStart } from "../brute.js";
import type { StartKind } from "../brute.js";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { parseExactJson } from "../../src/core/json.js";
import { DEFAULT_MAX_STEPS } from "../../src/jobs/verify/plan.js";
import { summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();
const text = async (page: Page, sel: string) => ((await page.textContent(sel)) ?? "").trim();
const grouped = (n: bigint | number) => n.toLocaleString("en-US");
const bitLength = (n: number) => n.toString(2).length;

type Kind = StartKind;
const classify = (q: bigint, r: bigint, n: bigint): Kind => classifyStart(q, r, n, DEFAULT_MAX_STEPS);

/** The brute force's verdict on [from, to): u, the first n the induction does not prove (numbers below from assumed), and the lists. */
function brute(q: bigint, r: bigint, from: bigint, to: bigint) {
  const kinds = new Map<bigint, Kind>();
  const proved = new Map<bigint, boolean>();
  let u: bigint | null = null;
  for (let n = from; n < to; n++) {
    const k = classify(q, r, n);
    kinds.set(n, k);
    proved.set(n, k.kind === "member" || (k.kind === "descent" && (k.below < from || proved.get(k.below) === true)));
    if (u === null && !proved.get(n)) u = n;
  }
  const of = (kind: Kind["kind"]) => [...kinds].filter(([, k]) => k.kind === kind).map(([n]) => n);
  return { kinds, u, entrants: of("entrant"), unresolved: of("unresolved") };
}

describe.skipIf(!hasChromium)("the Verify view: verdict, phases, depth, refused values, time", () => {
  it("the verdict follows from the counts: 5x+1 is proved only below its first cycle entrant, the rest is said to be unproved", async () => {
    const b = brute(5n, 1n, 1n, 60n);
    const u = b.u!;
    const entrant = b.kinds.get(u) as { kind: "entrant"; min: bigint };
    expect(entrant.kind).toBe("entrant"); // 5 -> 13 -> 33 -> 83 -> 208 -> 104 -> 52 -> 26 -> 13 (brute force above)
    const page = await open("?view=verify&vmap=5x%2B1&from=1&to=60&run=1");
    await summaryOf(page);
    expect(await text(page, "#verify-claim")).toMatch(new RegExp(`^Proved only for \\[1, ${u}\\): `));
    expect(await text(page, "#verify-not-proved")).toContain(
      `Not proved: the numbers from ${u} on ([${u}, 60)). ${u} enters the cycle of ${entrant.min}`,
    );
    expect(await text(page, "#verify-assumption")).toMatch(/^By induction from 1: /);
    expect(await text(page, "#verify-descent")).toContain(`1 cycle entrant and ${b.unresolved.length} unresolved numbers listed below`);
    // the lists: the entrant with its cycle, every unresolved number (fewer than the cap), smallest first
    const lists = await page.$$eval("#verify-lists dt, #verify-lists dd", (els) => els.map((e) => e.textContent));
    expect(lists).toContain(`enter a cycle of larger numbers: ${b.entrants.length}`);
    expect(lists).toContain(b.entrants.map((n) => `${n} (the cycle of ${(b.kinds.get(n) as { min: bigint }).min})`).join(", "));
    expect(lists).toContain(`unresolved after ${grouped(DEFAULT_MAX_STEPS)} steps: ${b.unresolved.length}`);
    expect(lists).toContain(b.unresolved.join(", "));
    // a range above 1: the claim names numbers below From, the assumption on its own line
    const b6 = brute(5n, 1n, 6n, 60n);
    const above = await open("?view=verify&vmap=5x%2B1&from=6&to=60&run=1");
    await summaryOf(above);
    expect(await text(above, "#verify-claim")).toMatch(
      new RegExp(`^Proved only for \\[6, ${b6.u}\\): every n there reaches a number below 6`),
    );
    expect(await text(above, "#verify-not-proved")).toContain(`${b6.u} is unresolved after ${grouped(DEFAULT_MAX_STEPS)} steps`);
    expect(await text(above, "#verify-assumption")).toMatch(/^Given the numbers below 6: /);
    await page.close();
    await above.close();
  });

  it("a run from 1 states the least length of any other cycle, in the Verify view and then in the Cycles view", async () => {
    // the least m (odd elements) and l (steps of T) of a cycle of 3x+1 with every element >= X: the first m
    // with 2^l > 3^m and 2^l X^m <= (3X + 1)^m for l the least power of 2 above 3^m, searched here in BigInt
    // (the inequality of a cycle's product: 2^l = prod (3 + 1/x_i) over its odd elements; common practice)
    const X = 1n << 12n;
    let three = 1n;
    let top = 1n;
    let xm = 1n;
    let least: { m: number; l: number } | null = null;
    for (let m = 1; m <= 20_000 && least === null; m++) {
      three *= 3n;
      top *= 3n * X + 1n;
      xm *= X;
      const l = three.toString(2).length; // 2^l > 3^m (3^m is no power of 2)
      if ((1n << BigInt(l)) * xm <= top) least = { m, l };
    }
    expect(least).not.toBeNull();
    const { m, l } = least!;
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E12&run=1");
    await summaryOf(page);
    const line = await text(page, "#verify-cycle-bound");
    expect(line).toContain(`every n below X = `);
    expect(line).toContain(
      `any other cycle (the cycle of 1 aside), one with all its elements >= X, has at least ${grouped(m)} odd elements and ${grouped(l)} elements`,
    );
    // the Cycles view of the same page states it for the map's verified range, and nothing for a map not verified
    await page.click("#tab-cycles");
    await page.fill("#cycles-map", "3x+1");
    await page.fill("#cycles-period", "12");
    await page.click("#cycles-go");
    await page.waitForFunction(
      () => /integer cycles of 3x\+1/.test(document.getElementById("cycles-message")?.textContent ?? ""),
      undefined,
      {
        timeout: 60_000,
      },
    );
    const said = `${await text(page, "#cycles-status")} ${await text(page, "#cycles-message")}`;
    expect(said).toContain(`From the Verify view's run of [1, 4,096): every n below X = `);
    expect(said).toContain(`has at least ${grouped(m)} odd elements and ${grouped(l)} elements`);
    await page.fill("#cycles-map", "3x+5");
    await page.click("#cycles-go");
    await page.waitForFunction(
      () =>
        /integer cycles of 3x\+5/.test(
          `${document.getElementById("cycles-status")?.textContent} ${document.getElementById("cycles-message")?.textContent}`,
        ),
      undefined,
      { timeout: 60_000 },
    );
    expect(`${await text(page, "#cycles-status")} ${await text(page, "#cycles-message")}`).not.toContain("From the Verify view");
    await page.close();
  });

  it("the whole claim when nothing is left: 3x+1 from 1 to 2^20 reaches the cycle of 1", async () => {
    // 3x+1 has no n below 2^20 that fails to go below itself but 1, on 1 -> 2 -> 1 (published verification runs)
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E20&run=1");
    await summaryOf(page);
    expect(await text(page, "#verify-claim")).toBe(
      "Proved: every n in [1, 1,048,576) reaches one of the cycles listed below; none starts a divergent trajectory, and every cycle with its least member in the range is listed (1 cycle).",
    );
    expect(await page.isVisible("#verify-not-proved")).toBe(false);
    await page.close();
  });

  it("while the blocks finish the status names that phase and the bar moves; no task holds the main thread for a second", async () => {
    // by classes: the path bounds' probes (in BigInt, the whole step cap for each that does not descend) run in the workers
    const page = await open("?view=verify&vmap=5x%2B1&from=1&to=2%5E8");
    await page.evaluate(() => {
      const w = window as unknown as { seen: [string, number][]; long: number[] };
      w.seen = [];
      w.long = [];
      new PerformanceObserver((l) => {
        for (const e of l.getEntries()) w.long.push(e.duration);
      }).observe({ entryTypes: ["longtask"] });
      setInterval(() => {
        const p = document.getElementById("verify-progress") as HTMLProgressElement;
        w.seen.push([document.getElementById("verify-status")!.textContent!, p.hasAttribute("value") ? p.value : -1]);
      }, 10);
    });
    await page.click("#verify-go");
    await summaryOf(page);
    const { seen, long } = await page.evaluate(() => {
      const w = window as unknown as { seen: [string, number][]; long: number[] };
      return { seen: w.seen, long: w.long };
    });
    const checking = seen.findIndex(([s]) => s.startsWith("Checking 255 numbers in "));
    expect(checking).toBeGreaterThan(-1);
    // after the tables, the status never reads as if they were still being built
    expect(seen.slice(checking).some(([s]) => s.startsWith("Building"))).toBe(false);
    // the bar shows shares of the numbers as blocks finish (several blocks: a share strictly between 0 and 1)
    expect(seen.some(([, v]) => v > 0 && v < 1)).toBe(true);
    expect(Math.max(0, ...long)).toBeLessThan(1000);
    await page.close();
  });

  it("a range of 1,999 numbers gets a sieve depth suited to it, not depth-26 tables; the run shows one time", async () => {
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2000&run=1");
    const s = parseExactJson(await summaryOf(page)) as { verify: { sieveDepth: bigint } };
    // no deeper than the bit length of the range's size (the page's rule)
    expect(Number(s.verify.sieveDepth)).toBeLessThanOrEqual(bitLength(1999));
    expect(await text(page, "#verify-depth-note")).toBe(`auto: ${s.verify.sieveDepth} for 1,999 numbers`);
    // one time: the status's, with a rate that is the numbers over it
    const status = await text(page, "#verify-status");
    const m = /^Done in (\d+\.\d\d) s: 1,999 numbers, ([\d,]+) a second/.exec(status);
    expect(m).not.toBeNull();
    const seconds = Number(m![1]);
    const rate = Number(m![2]!.replace(/,/g, ""));
    expect(Math.abs(rate - 1999 / seconds)).toBeLessThanOrEqual((1999 / seconds) * (0.006 / seconds) + 1);
    expect(await text(page, "#verify-message")).toBe("");
    expect(await text(page, "#verify-result")).not.toMatch(/\d\.\d+ s\b/);
    // a depth given deeper than the range can use: the range's bit length runs, and the field says so
    await page.fill("#verify-depth", "26");
    expect(await text(page, "#verify-depth-note")).toBe(`26 is deeper than 1,999 numbers can use: ${bitLength(1999)} is run`);
    await page.click("#verify-go");
    await page.waitForFunction(() => (document.getElementById("verify-status")!.textContent ?? "").startsWith("Done"));
    const s2 = parseExactJson(await summaryOf(page)) as { verify: { sieveDepth: bigint } };
    expect(Number(s2.verify.sieveDepth)).toBe(bitLength(1999));
    await page.close();
  });

  it("the Sieve depth field is off, with the reason beside it, while the range goes class by class", async () => {
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E20");
    expect(await page.isDisabled("#verify-depth")).toBe(true);
    expect(await text(page, "#verify-depth-note")).toBe("not used: classes go to depth 20");
    await page.selectOption("#verify-method", "periods");
    expect(await page.isDisabled("#verify-depth")).toBe(false);
    // 2^20 - 1 numbers: 2^15 is about a sixteenth of them
    expect(await text(page, "#verify-depth-note")).toBe(`auto: ${bitLength(2 ** 20 - 1) - 5} for 1,048,575 numbers`);
    await page.selectOption("#verify-method", "classes");
    await page.fill("#verify-to", "2^20+1");
    expect(await page.isDisabled("#verify-depth")).toBe(false);
    await page.close();
  });

  it("a link's value that a select does not offer is refused beside its field, vmethod too, and nothing runs", async () => {
    for (const [view, key, id] of [
      ["run", "mode", "run-mode"],
      ["verify", "vmethod", "verify-method"],
      ["tree", "tsteps", "tree-steps"],
    ] as const) {
      const page = await open(`?view=${view}&${key}=bogus&run=1`);
      await page.waitForFunction((sel) => (document.getElementById(sel)?.textContent ?? "") !== "", `${id}-error`);
      expect(await text(page, `#${id}-error`)).toBe('the link asks for "bogus", which this field does not offer');
      expect(await page.getAttribute(`#${id}`, "aria-invalid")).toBe("true");
      await page.waitForTimeout(300);
      expect(await page.textContent("[data-run-summary]")).toBe("");
      await page.close();
    }
  });
});
