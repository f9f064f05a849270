// Serves the built app (dist/) on a loopback port and drives Debian's Chromium with playwright-core.
import { createServer } from "node:http";
import type { Server } from "node:http";
import { readFile } from "node:fs/promises";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { extname, join, normalize } from "node:path";
import { tmpdir } from "node:os";
import { chromium } from "playwright-core";
import type { BrowserContext, Download, Page } from "playwright-core";

/** The built app: dist/, or the folder GLIDEPATH_DIST names (a build of its own, `vite build --outDir`). */
const DIST = process.env.GLIDEPATH_DIST ?? new URL("../../dist/", import.meta.url).pathname;
const TYPES: Record<string, string> = {
  ".html": "text/html; charset=utf-8",
  ".js": "text/javascript",
  ".css": "text/css",
  ".wasm": "application/wasm",
  ".json": "application/json",
  ".png": "image/png",
};

export async function serveDist(): Promise<{ url: string; close: () => Promise<void> }> {
  const server: Server = createServer((req, res) => {
    const path = normalize(decodeURIComponent((req.url ?? "/").split("?")[0]!)).replace(/^(\.\.[/\\])+/, "");
    const file = join(DIST, path.endsWith("/") ? `${path}index.html` : path);
    readFile(file).then(
      (body) => {
        res.writeHead(200, { "content-type": TYPES[extname(file)] ?? "application/octet-stream" });
        res.end(body);
      },
      () => {
        res.writeHead(404);
        res.end("not found");
      },
    );
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  const port = (server.address() as { port: number }).port;
  return { url: `http://127.0.0.1:${port}/`, close: () => new Promise((r) => server.close(() => r())) };
}

/** Debian's Chromium (or the binary CHROMIUM names). */
export const CHROMIUM = process.env.CHROMIUM ?? "/usr/bin/chromium";

/** Debian's Chromium with a fresh profile (playwright-core passes it as --user-data-dir). */
export async function launch(): Promise<{ browser: BrowserContext; done: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), "glidepath-chromium-"));
  const browser = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    acceptDownloads: true,
    viewport: { width: 1366, height: 900 },
    args: [
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--no-first-run",
      "--disable-quic",
    ],
  });
  return {
    browser,
    done: async () => {
      await browser.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** A new page at `url`; a dialog or an uncaught page error fails the test. */
export async function openPage(browser: BrowserContext, url: string): Promise<Page> {
  const page = await browser.newPage();
  page.on("dialog", () => {
    throw new Error("the page opened a dialog");
  });
  page.on("pageerror", (e) => {
    throw e;
  });
  await page.goto(url);
  return page;
}

/** Waits for the run summary and returns it as text. */
export async function summaryOf(page: Page, timeout = 120_000): Promise<string> {
  await page.waitForFunction(() => (document.querySelector("[data-run-summary]")?.textContent ?? "") !== "", undefined, { timeout });
  return (await page.textContent("[data-run-summary]"))!;
}

/** The files a click hands over (waits up to 10 s for `count` of them): their suggested names and bytes. */
export async function downloads(page: Page, selector: string, count: number): Promise<{ name: string; bytes: Buffer }[]> {
  const got: Download[] = [];
  const take = (d: Download) => got.push(d);
  page.on("download", take);
  await page.click(selector);
  for (let i = 0; i < 200 && got.length < count; i++) await page.waitForTimeout(50);
  page.off("download", take);
  return Promise.all(got.map(async (d) => ({ name: d.suggestedFilename(), bytes: readFileSync((await d.path())!) })));
}
