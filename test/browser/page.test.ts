// The page a user keeps open: results dimmed as soon as an input differs from what produced them,
// Back and Forward through views and runs, links with values a field does not offer, the tree's own
// map, keyboard reach, headings, and contrast computed from the styles.
import { readFile } from "node:fs/promises";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();
const stale = (page: Page, id: string) => page.$eval(`#${id}`, (e) => e.classList.contains("stale"));

/** WCAG 2 contrast ratio of two computed colours "rgb(r, g, b)" (common practice: the WCAG 2.1 formula). */
function contrast(a: string, b: string): number {
  const lum = (c: string) => {
    const [r, g, bl] = c
      .match(/\d+(\.\d+)?/g)!
      .slice(0, 3)
      .map(Number)
      .map((v) => {
        const s = v / 255;
        return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
      });
    return 0.2126 * r! + 0.7152 * g! + 0.0722 * bl!;
  };
  const [x, y] = [lum(a), lum(b)].sort((u, v) => v - u);
  return (x! + 0.05) / (y! + 0.05);
}

describe.skipIf(!hasChromium)("web app: the page kept open", () => {
  it("results are dimmed as soon as a field differs from what produced them, and current again when it is put back", async () => {
    const page = await open("?view=cycles");
    await page.fill("#cycles-map", "3x+5");
    await page.fill("#cycles-period", "12");
    await page.click("#cycles-go");
    await page.waitForSelector("#cycles-table tbody tr");
    expect(await stale(page, "cycles-results")).toBe(false);
    await page.fill("#cycles-period", "13");
    expect(await stale(page, "cycles-results")).toBe(true);
    expect(await page.textContent("#cycles-stale")).toContain("the inputs above have changed");
    await page.fill("#cycles-period", "12");
    expect(await stale(page, "cycles-results")).toBe(false);
    // the worker count does not change a result: no dimming
    await page.click("#tab-run");
    await page.fill("#run-depth", "12");
    await page.click("#run-start");
    await summaryOf(page);
    await page.fill("#run-workers", "1");
    expect(await stale(page, "run-results")).toBe(false);
    await page.selectOption("#run-mode", "full");
    expect(await stale(page, "run-results")).toBe(true);
    await page.close();
  });

  it("each view chosen and each run is a history entry: Back and Forward bring back the view, its fields and its results", async () => {
    const page = await open();
    await page.click("#tab-cycles");
    await page.click("#tab-verify");
    await page.click("#tab-tree");
    await page.goBack();
    expect(await page.isVisible("#view-verify")).toBe(true);
    await page.goBack();
    expect(await page.isVisible("#view-cycles")).toBe(true);
    await page.goForward();
    expect(await page.isVisible("#view-verify")).toBe(true);
    // two runs of the inspector, then Back: the first one's input and card
    await page.click("#tab-inspect");
    await page.fill("#inspect-input", "27");
    await page.click("#inspect-go");
    const first = await page.textContent("#inspect-card");
    await page.fill("#inspect-input", "97");
    await page.click("#inspect-go");
    expect(await page.textContent("#inspect-card")).not.toBe(first);
    await page.goBack();
    await page.waitForFunction(() => (document.getElementById("inspect-input") as HTMLInputElement).value === "27");
    await page.waitForFunction((t) => document.getElementById("inspect-card")!.textContent === t, first);
    // the glossary's fragment stays on a reload
    await page.click('a[href="#glossary"]');
    await page.click("#tab-cycles");
    expect(new URL(page.url()).hash).toBe("#glossary");
    await page.close();
  });

  it("a link with a value a select does not offer is refused beside the field, and nothing runs", async () => {
    const page = await open("?mode=bogus&depth=12&run=1");
    expect(await page.textContent("#run-mode-error")).toContain('"bogus"');
    expect(await page.inputValue("#run-mode")).toBe("survivors");
    await page.waitForTimeout(500);
    expect(await page.textContent("[data-run-summary]")).toBe("");
    const tree = await open("?view=tree&tsteps=weird&run=1");
    expect(await tree.textContent("#tree-steps-error")).toContain('"weird"');
    expect(await tree.isVisible("#tree-results")).toBe(false);
    await page.close();
    await tree.close();
  });

  it("a tree node opens under the map that drew it, by click or by keyboard, and focus goes to the Inspector", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=8&run=1");
    await page.waitForSelector('#tree-drawing circle[data-n="13"]');
    await page.fill("#tree-map", "garbage");
    await page.click('#tree-drawing circle[data-n="13"]');
    expect(await page.inputValue("#inspect-input")).toBe("13");
    expect(await page.inputValue("#inspect-map")).toBe("3x+1");
    expect(await page.evaluate(() => document.activeElement?.id)).toBe("inspect-heading");
    // by keyboard: the nodes are focusable, Enter opens one
    await page.click("#tab-tree");
    await page.focus('#tree-drawing circle[data-n="26"]');
    await page.keyboard.press("Enter");
    expect(await page.inputValue("#inspect-input")).toBe("26");
    await page.close();
  });

  it("each view has its own heading; Home and End move along the tabs", async () => {
    const page = await open();
    for (const view of ["run", "table", "inspect", "cycles", "verify", "tree"]) {
      await page.click(`#tab-${view}`);
      expect((await page.textContent(`#view-${view} h2`))?.trim().length).toBeGreaterThan(0);
    }
    await page.focus("#tab-tree");
    await page.keyboard.press("Home");
    expect(await page.isVisible("#view-run")).toBe(true);
    await page.keyboard.press("End");
    expect(await page.isVisible("#view-tree")).toBe(true);
    await page.close();
  });

  it("at 1400 px every column of the By-depth table shows, and the chart boxes keep their charts' height", async () => {
    const page = await open("?depth=24&run=1");
    await page.setViewportSize({ width: 1400, height: 900 });
    await summaryOf(page);
    const [table, box] = await page.$eval("#run-levels", (t) => [t.scrollWidth, t.parentElement!.clientWidth]);
    expect(table).toBeLessThanOrEqual(box!);
    const heights = await page.$$eval("#view-run figure:not([hidden])", (fs) => fs.map((f) => (f as HTMLElement).offsetHeight));
    for (const h of heights) expect(h).toBeLessThan(340); // a 240 px chart with its caption
    await page.close();
  });

  it("a job waiting behind another is cancelled at once; the running one goes on", async () => {
    const page = await open("?mode=full&depth=30&workers=2");
    await page.click("#run-start");
    await page.click("#tab-cycles");
    await page.fill("#cycles-period", "20");
    await page.click("#cycles-go");
    await page.waitForFunction(() => document.getElementById("cycles-status")!.textContent!.startsWith("Waiting"));
    await page.click("#cycles-cancel");
    await page.waitForFunction(() => document.getElementById("cycles-status")!.textContent === "Cancelled.", undefined, { timeout: 2_000 });
    expect(await page.textContent("#run-status")).not.toMatch(/^Done|Cancelled/);
    await page.close();
  });

  it("Verify names each cycle member with its cycle and states the induction assumption of a range above 1", async () => {
    // 3x+5: cycles of 1 (1 -> 4 -> 2 -> 1) and 5 (5 -> 10 -> 5) (common practice)
    const page = await open("?view=verify&vmap=3x%2B5&from=1&to=1000&vdepth=8&run=1");
    await summaryOf(page);
    const items = await page.$$eval("#verify-cycles li", (li) => li.map((x) => x.textContent));
    expect(items[0]).toBe("n = 1 on 1 → 4 → 2 → 1");
    expect(items[1]).toBe("n = 5 on 5 → 10 → 5");
    expect(await page.textContent("#verify-assumption")).toMatch(/^By induction from 1/);
    const above = await open("?view=verify&vmap=3x%2B1&from=1000&to=5000&vdepth=8&run=1");
    await summaryOf(above);
    expect(await above.textContent("#verify-assumption")).toMatch(/^Given the numbers below 1,000: /);
    await page.close();
    await above.close();
  });

  it("after a cancel the previous run's certificate, still shown dimmed, can be downloaded", async () => {
    const page = await open("?view=verify&from=1&to=2%5E16&vdepth=10&run=1");
    await summaryOf(page);
    await page.fill("#verify-from", "2^50");
    await page.fill("#verify-to", "2^50+2^36");
    await page.click("#verify-go");
    await page.waitForFunction(() => (document.getElementById("verify-progress") as HTMLProgressElement).value > 0, undefined, {
      timeout: 30_000,
    });
    await page.click("#verify-cancel");
    await page.waitForFunction(() => document.getElementById("verify-status")!.textContent === "Cancelled.");
    expect(await stale(page, "verify-result")).toBe(true);
    const [download] = await Promise.all([page.waitForEvent("download"), page.click("#verify-certificate")]);
    const cert = JSON.parse(await readFile((await download.path())!, "utf8")) as { to: string | number };
    expect(String(cert.to)).toBe(String(2 ** 16));
    await page.close();
  });

  it("the range's errors stand beside their own field, in the form's words", async () => {
    const page = await open("?view=verify");
    await page.fill("#verify-from", "0");
    await page.click("#verify-go");
    expect(await page.textContent("#verify-from-error")).toContain("From must be at least 1");
    expect(await page.textContent("#verify-to-error")).toBe("");
    await page.fill("#verify-from", "100");
    await page.fill("#verify-to", "50");
    await page.click("#verify-go");
    expect(await page.textContent("#verify-to-error")).toContain("To must be above From");
    await page.close();
  });

  it("Verify's delay option lists the delay records: the first are OEIS A006877; large numbers are grouped", async () => {
    const page = await open("?view=verify&from=1&to=2%5E15&vdepth=10&vdelay=1&run=1");
    await summaryOf(page);
    const delays = await page.$$eval("#verify-delays tbody tr", (rows) => rows.map((r) => r.children[0]!.textContent!.replace(/,/g, "")));
    // OEIS A006877 (published entry): 1, 2, 3, 6, 7, 9, 18, 25, 27, 54, 73, 97, 129, 171, 231, 313, 327, 649, 703, 871
    expect(delays.slice(0, 20)).toEqual([
      "1",
      "2",
      "3",
      "6",
      "7",
      "9",
      "18",
      "25",
      "27",
      "54",
      "73",
      "97",
      "129",
      "171",
      "231",
      "313",
      "327",
      "649",
      "703",
      "871",
    ]);
    expect(await page.$$eval("#verify-glide tbody tr", (rows) => rows.at(-1)!.children[0]!.textContent)).toMatch(/^\d{1,3}(,\d{3})*$/);
    await page.close();
  });

  it("the Inspector gives the total stopping time: 27 reaches 1 after 70 steps of T, 111 standard steps (OEIS A006577)", async () => {
    const page = await open("?view=inspect&inspect=27");
    await page.waitForFunction(() => document.getElementById("inspect-card")!.textContent!.includes("total stopping time"));
    expect(await page.textContent("#inspect-card")).toContain("total stopping time (first T^j(n) = 1): 70 (111 standard steps)");
    await page.close();
  });

  it("the tree at 420 px: labels about 12 px on screen; at 1400 px its level table shows every column at depth 30", async () => {
    const page = await open("?view=tree&tn=1&tdepth=8&run=1");
    await page.setViewportSize({ width: 420, height: 900 });
    await page.click("#tree-go");
    await page.waitForSelector("#tree-drawing text");
    const size = await page.$eval("#tree-drawing text", (t) => (t as SVGTextElement).getBoundingClientRect().height);
    expect(size).toBeGreaterThan(8);
    const wide = await open("?view=tree&tn=1&tdepth=30&run=1");
    await wide.setViewportSize({ width: 1400, height: 900 });
    await wide.waitForSelector("#tree-levels tbody tr");
    const [table, box] = await wide.$eval("#tree-levels", (t) => [t.scrollWidth, t.parentElement!.clientWidth]);
    expect(table).toBeLessThanOrEqual(box!);
    await page.close();
    await wide.close();
  });

  it("the page's memory stays flat over 20 runs of the depth-30 class table (12,771,274 rows, 51 MB each)", async () => {
    const page = await open("?depth=30&workers=2");
    const cdp = await page.context().newCDPSession(page);
    const heap = async () => {
      await cdp.send("HeapProfiler.collectGarbage");
      const u = (await cdp.send("Runtime.getHeapUsage")) as { usedSize: number; backingStorageSize?: number };
      return u.usedSize + (u.backingStorageSize ?? 0);
    };
    const sizes: number[] = [];
    for (let i = 0; i < 20; i++) {
      await page.evaluate(() => {
        document.querySelector("[data-run-summary]")!.textContent = "";
      });
      await page.click("#run-start");
      await summaryOf(page, 120_000);
      if (i === 2 || i === 19) sizes.push(await heap());
    }
    // one table (51 MB of residues) is kept for the class table view; a second one kept would show
    expect(sizes[1]! - sizes[0]!, `heap after run 3: ${sizes[0]} bytes, after run 20: ${sizes[1]}`).toBeLessThan(24 << 20);
    await page.close();
  }, 300_000);

  it("no remaining time is promised from shard counts: a depth-32 sieve shows shards and elapsed time only", async () => {
    const page = await open("?depth=32&workers=2");
    const seen: string[] = [];
    await page.exposeFunction("__status", (t: string) => seen.push(t));
    await page.evaluate(() => {
      const s = document.getElementById("run-status")!;
      new MutationObserver(() => (window as unknown as { __status: (t: string) => void }).__status(s.textContent ?? "")).observe(s, {
        childList: true,
        characterData: true,
        subtree: true,
      });
    });
    await page.click("#run-start");
    await summaryOf(page, 120_000);
    expect(seen.some((t) => /shards/.test(t))).toBe(true);
    expect(seen.filter((t) => /left/.test(t))).toEqual([]);
    await page.close();
  });

  it("error text has at least 4.5:1 contrast on the page in both schemes", async () => {
    for (const scheme of ["light", "dark"] as const) {
      const page = await open("?view=verify");
      await page.emulateMedia({ colorScheme: scheme });
      await page.fill("#verify-from", "0");
      await page.click("#verify-go");
      const [fg, bg] = await page.evaluate(() => [
        getComputedStyle(document.getElementById("verify-from-error")!).color,
        getComputedStyle(document.body).backgroundColor,
      ]);
      expect(contrast(fg!, bg!), `${scheme}: ${fg} on ${bg}`).toBeGreaterThanOrEqual(4.5);
      await page.close();
    }
  });
});
