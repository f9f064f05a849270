// The web app in headless Chromium: click-to-summary times, long tasks during runs, and the class
// table's scrolling frame rate. Figures only (never pass/fail).
import type { Page } from "playwright-core";
import { launch, serveDist, summaryOf } from "../test/browser/harness.js";

async function timedRun(page: Page, query: string): Promise<{ seconds: number; longest: number; longTasks: number }> {
  await page.goto(query);
  await page.evaluate(`window.__long = [];
    new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__long.push(e.duration); }).observe({ type: "longtask" });`);
  const t0 = await page.evaluate(() => performance.now());
  await page.click("#run-start");
  await summaryOf(page, 300_000);
  const t1 = await page.evaluate(() => performance.now());
  await page.waitForTimeout(300); // long-task entries are delivered asynchronously
  const long = await page.evaluate(() => (window as unknown as { __long: number[] }).__long);
  return { seconds: (t1 - t0) / 1000, longest: Math.max(0, ...long), longTasks: long.length };
}

async function scrollFps(page: Page): Promise<number> {
  await page.click("#tab-table");
  // a string, so that no bundler helper leaks into the page
  return page.evaluate(`new Promise((resolve) => {
    const list = document.getElementById("table-list");
    let frames = 0;
    const start = performance.now();
    function tick() {
      frames++;
      list.scrollTop += 2000;
      if (performance.now() - start < 3000) requestAnimationFrame(tick);
      else resolve((frames * 1000) / (performance.now() - start));
    }
    requestAnimationFrame(tick);
  })`) as Promise<number>;
}

export async function webBench(): Promise<string[][]> {
  const server = await serveDist();
  const { browser, done } = await launch();
  const rows: string[][] = [];
  try {
    const page = await browser.newPage();
    const u = server.url;
    await timedRun(page, `${u}?mode=full&depth=20&workers=2`); // warm the caches
    for (const [what, q] of [
      ["census (full mode) depth 30", "?mode=full&depth=30&workers=2"],
      ["survivors depth 32 (class table not kept above 30)", "?depth=32&workers=2"],
      ["survivors depth 30 (with its class table)", "?depth=30&workers=2"],
    ] as const) {
      const r = await timedRun(page, u + q);
      rows.push([
        `browser: ${what}, click to summary`,
        "2",
        r.seconds.toFixed(2),
        `longest task ${r.longest.toFixed(0)} ms (${r.longTasks} over 50 ms)`,
      ]);
    }
    // a link with run=1 opened in a fresh page: from the navigation's start to the summary
    for (let i = 0; i < 2; i++) {
      const fresh = await browser.newPage();
      const t0 = Date.now();
      await fresh.goto(`${u}?mode=full&depth=30&workers=2&run=1`);
      await summaryOf(fresh, 300_000);
      rows.push(["browser: census depth 30, a link with run=1 opened to its summary", "2", ((Date.now() - t0) / 1000).toFixed(2), ""]);
      await fresh.close();
    }
    rows.push([
      "browser: class table at depth 30 (12,771,274 rows), scrolling",
      "-",
      "-",
      `${(await scrollFps(page)).toFixed(0)} frames/s`,
    ]);
    // the headline (GLIDEPATH_BENCH_HEADLINE=1 npm run bench, or bench/headline.ts alone)
    if (process.env.GLIDEPATH_BENCH_HEADLINE === "1") rows.push(await headlineBench());
  } finally {
    await done();
    await server.close();
  }
  return rows;
}

/**
 * Every n below 2^40 verified in one tab from a link with run=1 (the page's default method: class
 * by class to depth 40), to its summary, then its certificate downloaded.
 */
export async function headlineBench(): Promise<string[]> {
  const server = await serveDist();
  const { browser, done } = await launch();
  try {
    const tab = await browser.newPage();
    const t0 = Date.now();
    await tab.goto(`${server.url}?view=verify&vmap=3x%2B1&from=1&to=2%5E40&workers=2&run=1`);
    await summaryOf(tab, 3_600_000);
    const seconds = (Date.now() - t0) / 1000;
    const [download] = await Promise.all([tab.waitForEvent("download"), tab.click("#verify-certificate")]);
    const certificate = (await download.path()) !== null;
    const method = (await tab.textContent("#verify-counts"))?.match(/classes settled bit by bit to depth \d+/)?.[0] ?? "by periods";
    await tab.close();
    return [
      `browser: every n below 2^40 verified in one tab (link to summary; ${method})`,
      "2",
      seconds.toFixed(0),
      `${((2 ** 40 - 1) / seconds / 1e9).toFixed(2)} x 10^9 n/s${certificate ? ", certificate downloaded" : ""}`,
    ];
  } finally {
    await done();
    await server.close();
  }
}
