// The page as a user meets it, in Debian's Chromium: links that reproduce every view, the class table
// from the keyboard and the wheel, results marked stale, the colour scheme, a phone's width, and the
// census against the exact counter and a BigInt brute force.
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { parseExactJson } from "../../src/core/json.js";
import { parseMap } from "../../src/core/map.js";
import { exactCounts } from "../../src/core/exact.js";
import { A076227 } from "../../src/core/published.js";
import { coefficientStop, T } from "../helpers.js";
import { summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();
/** The summary without its timings. */
const stable = (text: string): string => text.replace(/"seconds":[0-9.]+/g, '"seconds":0');
/** The address bar's query, with run=1 added: the link a user would send. */
const link = (page: Page) => `${new URL(page.url()).search}&run=1`;
const text = async (page: Page, sel: string) => ((await page.textContent(sel)) ?? "").trim();

describe.skipIf(!hasChromium)("web app: links, table, stale results, schemes, widths", () => {
  it("a link reproduces each view: run, inspector, cycles and verify, each with its own inputs", async () => {
    const page = await open();
    // the run view
    await page.fill("#run-map", "3x+5");
    await page.fill("#run-depth", "18");
    await page.selectOption("#run-mode", "full");
    await page.click("#run-start");
    const run = stable(await summaryOf(page));
    const again = await open(link(page));
    expect(stable(await summaryOf(again))).toBe(run);
    expect(await again.inputValue("#run-map")).toBe("3x+5");
    // the inspector keeps its own map: 187 under 3x+5 stays under 3x+5
    await page.click("#tab-inspect");
    await page.fill("#inspect-input", "187");
    await page.fill("#inspect-map", "3x+5");
    await page.click("#inspect-go");
    const card = await text(page, "#inspect-card");
    expect(card).toContain("3x+5");
    const inspector = await open(new URL(page.url()).search);
    expect(await text(inspector, "#inspect-card")).toBe(card);
    // cycles: run=1 runs the search, not a sieve
    await page.click("#tab-cycles");
    await page.fill("#cycles-map", "5x+1");
    await page.fill("#cycles-period", "20");
    await page.click("#cycles-go");
    await page.waitForSelector("#cycles-table tbody tr");
    const cycles = await text(page, "#cycles-table");
    const searched = await open(link(page));
    await searched.waitForSelector("#cycles-table tbody tr");
    expect(await text(searched, "#cycles-table")).toBe(cycles);
    // 5x+1 has the positive cycles with minima 1, 13 and 17 (common practice)
    const minima = await searched.$$eval("#cycles-table tbody tr", (rows) =>
      rows.filter((r) => r.children[0]!.textContent === "positive").map((r) => r.children[1]!.textContent),
    );
    expect(minima).toEqual(["1", "13", "17"]);
    expect(await searched.textContent("[data-run-summary]")).toBe("");
    // verify
    await page.click("#tab-verify");
    await page.fill("#verify-map", "3x+1");
    await page.fill("#verify-from", "1");
    await page.fill("#verify-to", "2^18");
    await page.selectOption("#verify-method", "periods");
    await page.fill("#verify-depth", "12");
    await page.click("#verify-go");
    const verified = stable(await summaryOf(page));
    const reverified = await open(link(page));
    expect(stable(await summaryOf(reverified))).toBe(verified);
    for (const p of [page, again, inspector, searched, reverified]) await p.close();
  });

  it("the class table at depth 30: one row a key press, pages, Home and End, the wheel, go to a row; a click opens the Inspector", async () => {
    const page = await open("?view=table&map=3x%2B1&depth=30&mode=survivors&run=1");
    await summaryOf(page);
    const rows = Number(A076227[30]); // 12,771,274 survivors mod 2^30 (OEIS A076227)
    const cursor = async () => {
      const row = page.locator(".vlist-row.cursor");
      return {
        n: Number((await row.locator("span").nth(0).textContent())!.replace(/,/g, "")),
        a: (await row.locator("span").nth(1).textContent())!.replace(/,/g, ""),
      };
    };
    const first = async () => Number((await page.locator(".vlist-row span").first().textContent())!.replace(/,/g, ""));
    // the two least survivors mod 2^30, by a BigInt brute force: no coefficient stopping time within 30 steps
    const least: string[] = [];
    for (let a = 1n; least.length < 2; a++) if (coefficientStop(parseMap("3x+1"), a, 30) === null) least.push(String(a));
    await page.focus("#table-list");
    expect(await cursor()).toEqual({ n: 1, a: least[0] });
    await page.keyboard.press("ArrowDown");
    expect(await cursor()).toEqual({ n: 2, a: least[1] });
    await page.keyboard.press("ArrowUp");
    expect((await cursor()).n).toBe(1);
    await page.keyboard.press("PageDown");
    const page1 = (await cursor()).n;
    expect(page1).toBeGreaterThan(10);
    await page.keyboard.press("PageUp");
    expect((await cursor()).n).toBe(1);
    await page.keyboard.press("End");
    expect(await cursor()).toEqual({ n: rows, a: String(2 ** 30 - 1) }); // 2^30 - 1: all 30 steps odd, never drops
    await page.keyboard.press("Home");
    expect((await cursor()).n).toBe(1);
    await page.fill("#table-jump", "5000000");
    await page.press("#table-jump", "Enter");
    await page.focus("#table-list");
    expect((await cursor()).n).toBe(5_000_000);
    for (let i = 1; i <= 3; i++) {
      await page.keyboard.press("ArrowUp");
      expect((await cursor()).n).toBe(5_000_000 - i);
    }
    await page.keyboard.press("Home");
    await page.hover("#table-list");
    await page.mouse.wheel(0, 100); // one notch
    await page.waitForTimeout(100);
    const after = await first();
    expect(after).toBeGreaterThanOrEqual(2);
    expect(after).toBeLessThanOrEqual(6);
    // the header names the columns for a screen reader
    expect(await page.$$eval("#table-grid [role=columnheader]", (h) => h.map((x) => x.textContent))).toContain("parity word");
    await page.locator(".vlist-row").nth(1).click();
    expect(await page.getAttribute("#tab-inspect", "aria-selected")).toBe("true");
    expect(await page.inputValue("#inspect-input")).toMatch(/ mod 2\^30$/);
    expect(await text(page, "#inspect-card")).toContain("3x+1");
    // Enter on a row: the Inspector opens and the focus goes to its heading, not to the page body
    await page.click("#tab-table");
    await page.focus("#table-list");
    await page.keyboard.press("Enter");
    expect(await page.getAttribute("#tab-inspect", "aria-selected")).toBe("true");
    expect(await page.evaluate(() => document.activeElement?.id)).toBe("inspect-heading");
    await page.close();
  });

  it("marks the previous results stale during a run, after a cancel, and beside inputs that are not valid", async () => {
    const page = await open("?map=3x%2B1&depth=16&run=1");
    await summaryOf(page);
    await page.fill("#run-depth", "36");
    await page.click("#run-start");
    await page.waitForSelector("#run-results.stale");
    expect(await text(page, "#run-stale")).toMatch(/previous result \(3x\+1, depth 16, survivors\); a new run is in progress/);
    await page.click("#run-cancel");
    await page.waitForFunction(() => document.querySelector("#run-stale")?.textContent?.includes("cancelled"));
    await page.fill("#run-depth", "12");
    await page.click("#run-start");
    await page.waitForFunction(() => !document.querySelector("#run-results")!.classList.contains("stale"));
    expect(await page.isHidden("#run-stale")).toBe(true);
    // a corrected field loses its old error
    await page.fill("#run-depth", "99");
    await page.click("#run-start");
    expect(await text(page, "#run-depth-error")).not.toBe("");
    expect(await page.getAttribute("#run-results", "class")).toContain("stale");
    await page.fill("#run-depth", "20");
    expect(await text(page, "#run-depth-error")).toBe("");
    // cycles and inspector
    await page.click("#tab-cycles");
    await page.click("#cycles-go");
    await page.waitForSelector("#cycles-table tbody tr");
    await page.fill("#cycles-period", "0");
    await page.click("#cycles-go");
    expect(await page.getAttribute("#cycles-results", "class")).toContain("stale");
    await page.click("#tab-inspect");
    await page.click("#inspect-go");
    await page.fill("#inspect-map", "4x+1");
    await page.click("#inspect-go");
    expect(await page.getAttribute("#inspect-results", "class")).toContain("stale");
    await page.close();
  });

  it("workers outside 1..16 are refused beside the field; 3n+1 is read as 3x+1", async () => {
    const page = await open();
    await page.fill("#run-workers", "40");
    await page.fill("#run-depth", "12");
    await page.click("#run-start");
    expect(await text(page, "#run-workers-error")).toMatch(/from 1 to 16/);
    expect(await page.textContent("[data-run-summary]")).toBe("");
    await page.fill("#run-workers", "2");
    await page.fill("#run-map", "3n + 1");
    await page.click("#run-start");
    expect((parseExactJson(await summaryOf(page)) as { map: string }).map).toBe("3x+1");
    await page.close();
  });

  it("charts follow a change of colour scheme", async () => {
    const page = await open("?map=3x%2B1&depth=14&run=1");
    await page.emulateMedia({ colorScheme: "dark" });
    await summaryOf(page);
    expect(await page.getAttribute("#chart-heat", "data-scheme")).toBe("dark");
    await page.emulateMedia({ colorScheme: "light" });
    await page.waitForFunction(() => document.querySelector("#chart-heat")!.getAttribute("data-scheme") === "light");
    expect(await page.getAttribute("#chart-density", "data-scheme")).toBe("light");
    await page.close();
  });

  it("at 420 px wide no view scrolls sideways", async () => {
    const page = await open("?map=3x%2B1&depth=20&mode=full&run=1");
    await page.setViewportSize({ width: 420, height: 900 });
    await summaryOf(page);
    for (const view of ["run", "table", "inspect", "cycles", "verify", "tree"]) {
      await page.click(`#tab-${view}`);
      expect(await page.evaluate(() => document.documentElement.scrollWidth), view).toBeLessThanOrEqual(420);
    }
    await page.close();
  });

  it("the census at depth 24 agrees with the exact counter and with a BigInt brute force", async () => {
    const page = await open("?map=3x%2B1&depth=24&mode=full&run=1");
    type Census = {
      levels: { survivors: bigint; stopped: bigint }[];
      exceptions: { n: bigint }[];
      census: {
        agreesWithExactCounter: boolean;
        differ: { count: bigint; listed: { n: bigint }[] };
        maxRatio: { n: bigint; step: bigint; value: bigint };
      };
    };
    const s = parseExactJson(await summaryOf(page)) as Census;
    const map = parseMap("3x+1");
    const K = 24;
    // the independent lattice-path counter (core/exact.ts) and OEIS A076227
    expect(s.levels).toEqual(
      exactCounts(map, K).levels.map((l) => ({ depth: BigInt(l.depth), survivors: l.survivors, stopped: l.stopped })),
    );
    expect(s.levels.map((l) => l.survivors)).toEqual(A076227.slice(0, K + 1));
    expect(s.census.agreesWithExactCounter).toBe(true);
    expect(s.exceptions.map((e) => e.n)).toEqual([1n]);
    // the largest ratio: 2^24 - 1, all 24 steps odd, T^24 = 3^24 - 1 (iterated here)
    let v = 2n ** 24n - 1n;
    for (let i = 0; i < K; i++) v = T(3n, 1n, v);
    expect(s.census.maxRatio).toMatchObject({ n: 2n ** 24n - 1n, step: 24n, value: v });
    // members below 2^14 whose first descent is not at their coefficient stopping time, by brute force
    const brute: bigint[] = [];
    for (let a = 1n; a < 1n << 14n; a++) {
      let x = a,
        descent: number | null = null;
      for (let j = 1; j <= K && descent === null; j++) {
        x = T(3n, 1n, x);
        if (x < a) descent = j;
      }
      if ((coefficientStop(map, a, K)?.j ?? null) !== descent) brute.push(a);
    }
    expect(s.census.differ.listed.map((d) => d.n).filter((n) => n < 1n << 14n)).toEqual(brute);
    await page.close();
  });
  it("the inverse tree view: a link builds the tree of 1 (OEIS A060322), the drawing opens a node in the Inspector, bad N is refused beside the field", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=20&tsteps=T&run=1");
    const s = parseExactJson(await summaryOf(page)) as { tree: { levels: { nodes: bigint }[] } };
    // OEIS A060322 (published entry, terms 0..20)
    expect(s.tree.levels.map((l) => l.nodes)).toEqual(
      [1, 1, 1, 1, 2, 3, 4, 5, 6, 8, 12, 18, 24, 31, 39, 50, 68, 91, 120, 159, 211].map(BigInt),
    );
    const again = await open(link(page));
    expect(stable(await summaryOf(again))).toBe(stable(await summaryOf(page)));
    await page.click('#tree-drawing circle[data-n="5"]');
    expect(await page.getAttribute("#tab-inspect", "aria-selected")).toBe("true");
    expect(await page.inputValue("#inspect-input")).toBe("5");
    await page.click("#tab-tree");
    await page.fill("#tree-n", "9");
    await page.click("#tree-go");
    expect(await text(page, "#tree-n-error")).toMatch(/multiple of q = 3/);
    expect(await page.getAttribute("#tree-results", "class")).toContain("stale");
    await page.close();
    await again.close();
  });
});
