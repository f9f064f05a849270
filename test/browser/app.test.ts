// End to end in Debian's Chromium: the built app (dist/) served on loopback, driven by playwright-core.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { parseExactJson } from "../../src/core/json.js";
import { parseCsv } from "../../src/outputs/tables.js";
import { parseMap } from "../../src/core/map.js";
import { A076227 } from "../../src/core/published.js";
import { coefficientStop, T } from "../helpers.js";
import { summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();

type Summary = {
  map: string;
  depth: bigint;
  levels: { depth: bigint; survivors: bigint; stopped: bigint }[];
  exceptions: { n: bigint }[];
  census?: { agreesWithExactCounter: boolean };
};
const summary = async (page: Page) => parseExactJson(await summaryOf(page)) as Summary;
/** The summary without its timings (they differ from run to run). */
const stable = (s: Summary): unknown =>
  JSON.parse(JSON.stringify(s, (k, v: unknown) => (k === "seconds" ? 0 : typeof v === "bigint" ? v.toString() : v)));

describe.skipIf(!hasChromium)("web app", () => {
  it("runs a depth-20 sieve whose table agrees with OEIS A076227 (published entry)", async () => {
    const page = await open();
    await page.fill("#run-depth", "20");
    await page.click("#run-start");
    const s = await summary(page);
    expect(s.levels.map((l) => l.survivors)).toEqual(A076227.slice(0, 21));
    expect(s.exceptions.map((e) => e.n)).toEqual([1n]);
    const cells = await page.$$eval("#run-levels tbody tr", (rows) => rows.map((r) => r.children[1]!.textContent!.replace(/,/g, "")));
    expect(cells.map(BigInt)).toEqual(A076227.slice(0, 21));
    expect(await page.$$eval("#run-levels td.ok", (x) => x.length)).toBe(21);
    await page.close();
  });

  it("cancels a depth-32 run, stays usable, and runs again", async () => {
    const page = await open();
    await page.fill("#run-depth", "32");
    await page.click("#run-start");
    await page.waitForFunction(() => (document.querySelector("#run-progress") as HTMLProgressElement).value > 0, undefined, {
      timeout: 30_000,
    });
    await page.click("#run-cancel");
    await page.waitForFunction(() => document.querySelector("#run-status")!.textContent === "Cancelled.", undefined, { timeout: 2_000 });
    expect(await page.isEnabled("#run-start")).toBe(true);
    expect(await page.textContent("[data-run-summary]")).toBe("");
    await page.fill("#run-depth", "18");
    await page.click("#run-start");
    expect((await summary(page)).levels[18]!.survivors).toBe(A076227[18]);
    await page.close();
  });

  it("a worker-count change and a cycle search during a run wait their turn: the run completes, then the search", async () => {
    const page = await open("?mode=full&depth=29");
    await page.click("#run-start");
    await page.waitForFunction(() => (document.querySelector("#run-progress") as HTMLProgressElement).value > 0, undefined, {
      timeout: 30_000,
    });
    await page.fill("#run-workers", "1");
    await page.click("#tab-cycles");
    await page.fill("#cycles-map", "3x+1");
    await page.fill("#cycles-period", "16");
    await page.click("#cycles-go");
    const s = await summary(page);
    expect(s.census?.agreesWithExactCounter).toBe(true);
    expect(s.levels[29]!.survivors).toBe(A076227[29]);
    await page.waitForFunction(
      () => /integer cycles of 3x\+1/.test(document.querySelector("#cycles-message")!.textContent ?? ""),
      undefined,
      { timeout: 60_000 },
    );
    // 3x+1 to period 16: the cycles of 1, -1, -5 and -17 (common practice)
    const reps = await page.$$eval("#cycles-table tbody tr", (rows) => rows.map((r) => r.children[2]!.textContent));
    expect(reps).toEqual(["1", "-1", "-5", "-17"]);
    expect(await page.textContent("#run-status")).toMatch(/^Done in/);
    await page.close();
  });

  it("verifies 1 to 2^20 in the Verify view: OEIS A060412's glide records, and a certificate to download", async () => {
    const page = await open("?view=verify");
    await page.fill("#verify-from", "1");
    await page.fill("#verify-to", "2^20");
    // (the Sieve depth field is off while the range goes class by class)
    await page.click("#verify-go");
    const s = parseExactJson(await summaryOf(page)) as { verify: { glideRecords: { n: bigint }[]; counts: { numbers: bigint } } };
    // OEIS A060412 below 2^20
    expect(s.verify.glideRecords.map((g) => g.n)).toEqual([
      2n,
      3n,
      7n,
      27n,
      703n,
      10087n,
      35655n,
      270271n,
      362343n,
      381727n,
      626331n,
      1027431n,
    ]);
    expect(s.verify.counts.numbers).toBe((1n << 20n) - 1n);
    const [download] = await Promise.all([page.waitForEvent("download"), page.click("#verify-certificate")]);
    const cert = parseExactJson(readFileSync((await download.path())!, "utf8")) as {
      kind: string;
      from: bigint;
      method: string;
      tables: { sieve: { rows: bigint } };
    };
    expect(cert.kind).toBe("glidepath verification certificate");
    // 1 to 2^20 goes class by class to depth 20, no sieve table; by the sieve's periods, the depth-12 table
    expect([cert.method, cert.tables.sieve.rows]).toEqual(["classes", 0n]);
    await page.selectOption("#verify-method", "periods");
    await page.fill("#verify-depth", "12");
    await page.click("#verify-go");
    const s2 = parseExactJson(await summaryOf(page)) as { verify: { glideRecords: { n: bigint }[] } };
    expect(s2.verify.glideRecords).toEqual(s.verify.glideRecords);
    const [download2] = await Promise.all([page.waitForEvent("download"), page.click("#verify-certificate")]);
    const cert2 = parseExactJson(readFileSync((await download2.path())!, "utf8")) as typeof cert;
    expect([cert2.method, cert2.tables.sieve.rows]).toEqual(["periods", A076227[12]]);
    await page.fill("#verify-to", "0");
    await page.click("#verify-go");
    expect(await page.textContent("#verify-to-error")).toMatch(/must be above/);
    await page.close();
  });

  it("exports the class table as CSV: each row's (m, b) is the class's affine form (BigInt check)", async () => {
    const page = await open("?depth=12&run=1");
    await summaryOf(page);
    await page.click("#tab-table");
    const [download] = await Promise.all([page.waitForEvent("download"), page.click("#export-csv")]);
    const rows = parseCsv(readFileSync((await download.path())!, "utf8"));
    const map = parseMap("3x+1");
    const survivors: bigint[] = [];
    for (let a = 0n; a < 4096n; a++) if (coefficientStop(map, a, 12) === null) survivors.push(a);
    expect(rows.map((r) => r.residue)).toEqual(survivors);
    for (const r of rows) {
      let v = r.residue + 4096n * 7n;
      for (let i = 0; i < 12; i++) v = T(3n, 1n, v);
      expect(v).toBe(3n ** BigInt(r.odd) * 7n + r.image);
    }
    await page.close();
  });

  it("exports raw residues with a manifest whose sha256 and kernel build match (u32, sorted)", async () => {
    const { createHash } = await import("node:crypto");
    const page = await open("?depth=14&run=1");
    await summaryOf(page);
    await page.click("#tab-table");
    const downloads: import("playwright-core").Download[] = [];
    page.on("download", (d) => downloads.push(d));
    await page.click("#export-raw");
    for (let i = 0; i < 50 && downloads.length < 2; i++) await page.waitForTimeout(100);
    const byName = new Map(
      await Promise.all(downloads.map(async (d) => [d.suggestedFilename(), readFileSync((await d.path())!)] as const)),
    );
    const data = byName.get("survivors-3x+1-14.u32")!;
    const manifest = parseExactJson(byName.get("survivors-3x+1-14.u32.json")!.toString("utf8")) as {
      sha256: string;
      rows: bigint;
      tool: { kernelBuild: string };
    };
    expect(manifest.sha256).toBe(createHash("sha256").update(data).digest("hex"));
    const wasm = readFileSync(new URL("../../build/release.wasm", import.meta.url));
    expect(manifest.tool.kernelBuild).toBe(createHash("sha256").update(wasm).digest("hex").slice(0, 16));
    const residues = Array.from(new Uint32Array(data.buffer, data.byteOffset, data.byteLength / 4));
    expect(BigInt(residues.length)).toBe(A076227[14]);
    expect(residues.every((x, i) => i === 0 || residues[i - 1]! < x)).toBe(true);
    await page.close();
  });

  it("inspects 3 mod 16: coefficient stopping time 4, 6 standard steps (common practice)", async () => {
    const page = await open("?view=inspect");
    await page.fill("#inspect-input", "3 mod 16");
    await page.click("#inspect-go");
    const card = await page.textContent("#inspect-card");
    expect(card).toContain("coefficient stopping time 4 (6 standard steps)");
    expect(card).toContain("T^4(3 + 2^4·x) = 3^2·x + 2");
    await page.close();
  });

  it("a shared URL reproduces the run: same summary, census tallies in full mode", async () => {
    const page = await open();
    await page.selectOption("#run-mode", "full");
    await page.fill("#run-depth", "16");
    await page.click("#run-start");
    const first = await summary(page);
    expect(first.census?.agreesWithExactCounter).toBe(true);
    const url = page.url();
    expect(url).toContain("mode=full");
    const again = await open(new URL(url).search + "&run=1");
    expect(stable(await summary(again))).toEqual(stable(first));
    await page.close();
    await again.close();
  });

  it("refuses bad input beside the field, without a run or a dialog", async () => {
    const page = await open();
    await page.fill("#run-map", "4x+1");
    await page.click("#run-start");
    expect(await page.textContent("#run-map-error")).toMatch(/q must be odd/);
    await page.fill("#run-map", "3x+1");
    await page.fill("#run-depth", "41");
    await page.click("#run-start");
    expect(await page.textContent("#run-depth-error")).toMatch(/beyond the exact range for 3x\+1 in survivors mode \(at most 40\)/);
    await page.selectOption("#run-mode", "full");
    await page.fill("#run-depth", "33");
    await page.click("#run-start");
    expect(await page.textContent("#run-depth-error")).toMatch(/in census mode \(at most 32\)/);
    await page.click("#tab-inspect");
    await page.fill("#inspect-input", "w:1021");
    await page.click("#inspect-go");
    expect(await page.textContent("#inspect-input-error")).toMatch(/only 0 and 1/);
    expect(await page.textContent("[data-run-summary]")).toBe("");
    await page.close();
  });

  it("labels every control and works from the keyboard", async () => {
    const page = await open();
    const unlabeled = await page.$$eval("input, select", (els) =>
      els.filter((e) => (e as HTMLInputElement).labels?.length === 0 && !e.getAttribute("aria-label")).map((e) => e.id),
    );
    expect(unlabeled).toEqual([]);
    const nameless = await page.$$eval("button", (els) =>
      els.filter((b) => !(b.textContent ?? "").trim() && !b.getAttribute("aria-label")).map((b) => b.id),
    );
    expect(nameless).toEqual([]);
    await page.focus("#run-depth");
    await page.fill("#run-depth", "10");
    await page.keyboard.press("Enter");
    expect((await summary(page)).levels[10]!.survivors).toBe(A076227[10]);
    await page.focus("#tab-run");
    await page.keyboard.press("ArrowRight");
    expect(await page.getAttribute("#tab-table", "aria-selected")).toBe("true");
    await page.close();
  });
});
