// What every browser test file shares: Debian's Chromium (skipped with one line where it is
// missing, failing under CI), dist/ served on loopback for the file's tests, and pages opened on it.
import { afterAll, beforeAll } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { CHROMIUM, launch, openPage, serveDist } from "./harness.js";
import { requireProgram } from "../system.js";

export const hasChromium = requireProgram("Chromium", CHROMIUM, "apt-get install -y chromium, or set CHROMIUM to its path");

/** Starts the server and the browser before the file's tests and stops them after; `open(query)` opens a page. */
export function browserSuite(): { open: (query?: string) => Promise<Page>; browser: () => BrowserContext } {
  let server: Awaited<ReturnType<typeof serveDist>>;
  let browser: BrowserContext;
  let done: () => Promise<void>;
  beforeAll(async () => {
    if (!hasChromium) return;
    server = await serveDist();
    ({ browser, done } = await launch());
  }, 60_000);
  afterAll(async () => {
    await done?.();
    await server?.close();
  });
  return { open: (query = "") => openPage(browser, server.url + query), browser: () => browser };
}
