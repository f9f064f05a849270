// Links and history in Debian's Chromium: an address taken after a run makes its results again on a
// reload and in another tab, Back and Forward into a run entry of another page load show its results, and
// one Back returns from the Inspector to the class table or the tree that opened it.
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { A076227 } from "../../src/core/published.js";
import { summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();
const text = async (page: Page, sel: string) => ((await page.textContent(sel)) ?? "").trim();
/** The summary without its timings. */
const stable = (s: string): string => s.replace(/"seconds":[0-9.]+/g, '"seconds":0');
const query = (page: Page) => new URL(page.url()).searchParams;

/** Each view's job started from the page, and how to read its results off the screen. */
const VIEWS: readonly {
  readonly view: string;
  readonly start: (page: Page) => Promise<void>;
  readonly result: (page: Page) => Promise<string>;
}[] = [
  {
    view: "run",
    start: async (page) => {
      await page.fill("#run-depth", "14");
      await page.click("#run-start");
    },
    result: async (page) => stable(await summaryOf(page)),
  },
  {
    view: "table",
    start: async (page) => {
      await page.click("#tab-run");
      await page.fill("#run-depth", "12");
      await page.click("#run-start");
      await summaryOf(page);
      await page.click("#tab-table");
    },
    result: async (page) => {
      await page.waitForSelector(".vlist-row");
      return `${await text(page, "#table-caption")} | ${await text(page, ".vlist-row")}`;
    },
  },
  {
    view: "inspect",
    start: async (page) => {
      await page.fill("#inspect-input", "27");
      await page.click("#inspect-go");
    },
    result: (page) => text(page, "#inspect-card"),
  },
  {
    view: "cycles",
    start: async (page) => {
      await page.fill("#cycles-map", "3x+1");
      await page.fill("#cycles-period", "12");
      await page.click("#cycles-go");
    },
    result: async (page) => {
      await page.waitForSelector("#cycles-table tbody tr");
      return text(page, "#cycles-table");
    },
  },
  {
    view: "verify",
    start: async (page) => {
      await page.fill("#verify-from", "1");
      await page.fill("#verify-to", "2^14");
      await page.click("#verify-go");
    },
    result: async (page) => {
      await summaryOf(page);
      return text(page, "#verify-counts");
    },
  },
  {
    view: "tree",
    start: async (page) => {
      await page.fill("#tree-n", "1");
      await page.fill("#tree-depth", "10");
      await page.click("#tree-go");
    },
    result: async (page) => {
      await page.waitForSelector("#tree-results:not([hidden]) #tree-drawing circle");
      return text(page, "#tree-levels");
    },
  },
];

describe.skipIf(!hasChromium)("web app: links and history", () => {
  for (const { view, start, result } of VIEWS)
    it(`${view}: the address after a run keeps run=1; a reload and the same address in a new tab show the same results`, async () => {
      const page = await open(`?view=${view}`);
      await start(page);
      const shown = await result(page);
      expect(query(page).get("view")).toBe(view);
      expect(query(page).get("run")).toBe("1");
      const link = new URL(page.url()).search;
      await page.reload();
      expect(await result(page)).toBe(shown);
      expect(query(page).get("run")).toBe("1");
      const other = await open(link);
      expect(await result(other)).toBe(shown);
      await other.close();
      await page.close();
    });

  it("an edit after a run drops run=1 from the address; undoing it brings it back", async () => {
    const page = await open("?depth=10&run=1");
    await summaryOf(page);
    expect(query(page).get("run")).toBe("1");
    await page.fill("#run-depth", "11");
    await page.press("#run-depth", "Tab"); // the change event
    expect(query(page).get("run")).toBeNull();
    await page.fill("#run-depth", "10");
    await page.press("#run-depth", "Tab");
    expect(query(page).get("run")).toBe("1");
    // another view without results of its own: no run=1 there
    await page.click("#tab-cycles");
    expect(query(page).get("run")).toBeNull();
    await page.click("#tab-run");
    expect(query(page).get("run")).toBe("1");
    await page.close();
  });

  it("Back and Forward into a run entry of another page load show its results, not Ready.", async () => {
    const page = await open("?depth=13");
    await page.click("#run-start");
    const sieve = stable(await summaryOf(page));
    expect(JSON.parse(sieve).levels[13].survivors).toBe(Number(A076227[13])); // OEIS A076227
    // another page load in the same tab, with a run of its own
    await page.goto(`${new URL(page.url()).origin}/?view=cycles&cmap=3x%2B1&period=12`);
    await page.click("#cycles-go");
    await page.waitForSelector("#cycles-table tbody tr");
    const cycles = await text(page, "#cycles-table");
    // back to the sieve's entry (past the cycles view's own entry before its run)
    for (let i = 0; i < 3 && !(await page.isVisible("#view-run")); i++) await page.goBack();
    expect(new URL(page.url()).searchParams.get("depth")).toBe("13");
    expect(stable(await summaryOf(page, 30_000))).toBe(sieve);
    await page.goForward();
    expect(await page.isVisible("#view-cycles")).toBe(true);
    await page.waitForSelector("#cycles-table tbody tr");
    expect(await text(page, "#cycles-table")).toBe(cycles);
    await page.close();
  });

  it("a class-table row opened in the Inspector: one Back returns to the table, its results kept (no new run)", async () => {
    const page = await open("?view=table&depth=12&run=1");
    await summaryOf(page);
    await page.waitForSelector(".vlist-row");
    const table = page.url();
    await page.locator(".vlist-row").nth(1).click();
    expect(await page.isVisible("#view-inspect")).toBe(true);
    expect(await text(page, "#inspect-card")).toMatch(/ mod 2\^12 of 3x\+1/);
    await page.goBack();
    await page.waitForFunction(() => !document.getElementById("view-table")!.hidden);
    expect(page.url()).toBe(table);
    expect(await text(page, "#run-status")).toMatch(/^Done in/);
    expect(await page.locator(".vlist-row").count()).toBeGreaterThan(0);
    // and Forward: the Inspector's card again
    await page.goForward();
    await page.waitForFunction(() => !document.getElementById("view-inspect")!.hidden);
    expect(await text(page, "#inspect-card")).toMatch(/ mod 2\^12 of 3x\+1/);
    await page.close();
  });

  it("a tree node opened in the Inspector: one Back returns to the tree with its drawing", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=8&run=1");
    await page.waitForSelector('#tree-drawing circle[data-n="13"]');
    const tree = page.url();
    await page.click('#tree-drawing circle[data-n="13"]');
    expect(await page.inputValue("#inspect-input")).toBe("13");
    await page.goBack();
    await page.waitForFunction(() => !document.getElementById("view-tree")!.hidden);
    expect(page.url()).toBe(tree);
    expect(await page.isVisible('#tree-drawing circle[data-n="13"]')).toBe(true);
    await page.close();
  });
});
