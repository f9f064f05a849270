import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { parseExactJson } from "../../src/core/json.js";
import { downloads, summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();

/** One standard step of 3x+1 (n/2, 3n + 1) and one step of T (n/2, (3n + 1)/2). */
const std = (n: bigint) => (n % 2n === 0n ? n / 2n : 3n * n + 1n);
const T = (n: bigint) => (n % 2n === 0n ? n / 2n : (3n * n + 1n) / 2n);

/** The glide records (standard steps) and path records (highest standard value, up to 1) of 3x+1 below `to`, by brute force. */
function records(to: bigint) {
  const glides: [bigint, bigint][] = [];
  const paths: [bigint, bigint][] = [[1n, 1n]];
  const top: bigint[] = [0n, 1n];
  let bestGlide = 0n,
    bestPath = 1n;
  for (let n = 2n; n < to; n++) {
    let v = n,
      max = n,
      steps = 0n;
    while (v >= n) {
      v = std(v);
      steps++;
      if (v > max) max = v;
    }
    const h = max > top[Number(v)]! ? max : top[Number(v)]!;
    top.push(h);
    if (steps > bestGlide) {
      bestGlide = steps;
      glides.push([n, steps]);
    }
    if (h > bestPath) {
      bestPath = h;
      paths.push([n, h]);
    }
  }
  return { glides, paths };
}

/**
 * n's orbit under T and in standard steps as the page draws it: until it has entered the cycle 1 -> 2
 * (at 2) and gone once round it, so T's ends 2, 1, 2 and the standard one 2, 1, 4, 2 (n >= 3).
 */
function orbit(n: bigint) {
  const t = [n];
  while (t.at(-1) !== 1n) t.push(T(t.at(-1)!));
  t.push(2n);
  const s = [n];
  while (s.at(-1) !== 1n) s.push(std(s.at(-1)!));
  s.push(4n, 2n);
  const marks = (v: bigint[]) => {
    const glide = v.findIndex((x, j) => j > 0 && x < n);
    const max = v.reduce((m, x) => (x > m ? x : m), n);
    return { glide, one: v.indexOf(1n), max, maxAt: v.indexOf(max) };
  };
  return { t, s, T: marks(t), S: marks(s) };
}

type Option = { series: { name?: string; data: unknown[] }[] };
const optionOf = (page: Page, id: string) =>
  page.evaluate(
    (id) => (window as Window & { glidepathChartOption?: (id: string) => unknown }).glidepathChartOption?.(id),
    id,
  ) as Promise<Option>;
/** A series' exact values: the third and fourth data dimensions hold them as digits. */
const exact = (data: unknown[]) => (data as [number, number, string, string][]).map((d) => [BigInt(d[2]), BigInt(d[3])]);

describe.skipIf(!hasChromium)("charts: the points drawn are the brute force's and the run's", () => {
  it("Verify 3x+1 over [1, 2^20): records against n with OEIS A060412 and A006884 as rings, the cut depths, a record's orbit", async () => {
    const to = 1n << 20n;
    const b = records(to);
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E20&run=1");
    const s = parseExactJson(await summaryOf(page)) as { verify: { counts: { sievedByDepth: { depth: bigint; count: bigint }[] } } };
    const glide = await optionOf(page, "chart-glide-records");
    expect(exact(glide.series[0]!.data)).toEqual(b.glides);
    // the published terms below 2^20 are the brute force's records (OEIS A060412, A006884: the list in src/core/published.ts)
    expect(glide.series[1]!.name).toMatch(/^OEIS A060412/);
    expect(exact(glide.series[1]!.data)).toEqual(b.glides);
    const path = await optionOf(page, "chart-path-records");
    expect(exact(path.series[0]!.data)).toEqual(b.paths);
    expect(path.series[1]!.name).toMatch(/^OEIS A006884/);
    expect(exact(path.series[1]!.data)).toEqual(b.paths);
    // the cut depths: the run's own counts (its JSON), one bar a depth with a count
    const cut = await optionOf(page, "chart-cut-depth");
    const own = s.verify.counts.sievedByDepth.map((c) => [c.depth, c.count]);
    expect((cut.series[0]!.data as [number, number, string][]).map((d) => [BigInt(d[0]), BigInt(d[2])])).toEqual(own);
    // the orbit shown first: the largest glide record's, in both conventions with its marks
    const last = b.glides.at(-1)![0];
    expect(await page.inputValue("#verify-orbit-n")).toBe(String(last));
    await expectOrbit(page, "chart-orbit", last);
    // another record chosen: 27's orbit (glide 96, 111 standard steps to 1, highest 9232: common practice)
    await page.selectOption("#verify-orbit-n", "27");
    await expectOrbit(page, "chart-orbit", 27n);
    const o = orbit(27n);
    expect([o.T.glide, o.T.one, o.T.max, o.S.glide, o.S.one, o.S.max]).toEqual([59, 70, 4616n, 96, 111, 9232n]);
    expect(await page.textContent("#chart-orbit-marks")).toBe(
      `27: in steps of T, glide 59, reaches 1 at step 70, highest 4,616 at step ${o.T.maxAt}; ` +
        `in standard steps (3n + 1 and n/2 each a step), glide 96, reaches 1 at step 111, highest 9,232 at step ${o.S.maxAt}.`,
    );
    // a click on a row of the path records: 255's orbit
    await page.click("#verify-path tbody tr:nth-child(7)");
    await expectOrbit(page, "chart-orbit", 255n);
    await page.close();
  });

  it("another map has no published records to mark: 5x+1's records are drawn alone", async () => {
    const page = await open("?view=verify&vmap=5x%2B1&from=1&to=60&run=1");
    const s = parseExactJson(await summaryOf(page)) as { verify: { glideRecords: { n: bigint; standardSteps: bigint }[] } };
    const glide = await optionOf(page, "chart-glide-records");
    expect(glide.series).toHaveLength(1);
    expect(exact(glide.series[0]!.data)).toEqual(s.verify.glideRecords.map((g) => [g.n, g.standardSteps]));
    await page.close();
  });

  it("a range above 1 marks only the published records inside it: 3x+1 over [1000, 5000)", async () => {
    const page = await open("?view=verify&vmap=3x%2B1&from=1000&to=5000&run=1");
    const s = parseExactJson(await summaryOf(page)) as { verify: { pathRecords: { n: bigint }[] } };
    const path = await optionOf(page, "chart-path-records");
    // OEIS A006884's terms in [1000, 5000) (the brute force's path records below 5000, from 1000 on), each a record of the range too
    const inside = records(5000n).paths.filter(([n]) => n >= 1000n);
    expect(inside.map(([n]) => n)).toEqual([1819n, 4255n, 4591n]);
    expect(exact(path.series[1]!.data)).toEqual(inside);
    for (const [n] of inside) expect(s.verify.pathRecords.map((p) => p.n)).toContain(n);
    // no glide record of 3x+1 falls in [1000, 5000) (703, then 10087)
    expect((await optionOf(page, "chart-glide-records")).series[1]!.data).toEqual([]);
    await page.close();
  });

  it("the Inspector's trajectory of 27 in both conventions, and every chart's PNG and SVG named after its results", async () => {
    const page = await open("?view=inspect&inspect=27&imap=3x%2B1");
    await page.waitForSelector("#chart-trajectory-marks");
    await expectOrbit(page, "chart-trajectory", 27n);
    const [png] = await downloads(page, "#chart-trajectory-png", 1);
    expect(png!.name).toBe("trajectory-27-under-3x+1.png");
    expect([...png!.bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]); // the PNG signature (PNG spec)
    const [svg] = await downloads(page, "#chart-trajectory-svg", 1);
    expect(svg!.name).toBe("trajectory-27-under-3x+1.svg");
    const text = svg!.bytes.toString("utf8");
    expect(text).toMatch(/^<svg [^>]*xmlns="http:\/\/www.w3.org\/2000\/svg"/);
    expect(text).toContain("standard steps"); // the legend, drawn as text
    await page.close();
    const verify = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E12&run=1");
    await summaryOf(verify);
    for (const id of ["chart-glide-records", "chart-path-records", "chart-cut-depth", "chart-orbit"]) {
      const [file] = await downloads(verify, `#${id}-svg`, 1);
      expect(file!.name).toBe(`${id.replace("chart-", "")}-3x+1-1-4096.svg`);
      expect(file!.bytes.toString("utf8")).toMatch(/^<svg /);
    }
    const [cert] = await downloads(verify, "#verify-certificate", 1);
    expect(cert!.name).toBe("verify-3x+1-1-4096.cert.json");
    await verify.close();
  });
});

describe.skipIf(!hasChromium)("charts: a 10,000-step orbit of a 3,010-digit number", () => {
  it("2^9999 - 1 in the Inspector: its tooltips give the power of ten past 60 digits, its note the leading digits and their count", async () => {
    // log10(2^9999 - 1) = 9999 log10(2) = 3009.99... (common practice); decimal strings of thousands of such values
    // would hold the page for seconds
    const page = await open("?view=inspect&inspect=2%5E9999-1&imap=3x%2B1&run=1");
    await page.waitForSelector("#chart-trajectory-marks", { timeout: 120_000 });
    const opt = await optionOf(page, "chart-trajectory");
    const first = (opt.series[0]!.data as [number, number, string][])[0]!;
    expect(first[0]).toBe(0);
    expect(first[2]).toBe("about 10^3010.00");
    expect(await page.textContent("#chart-trajectory-marks")).toMatch(
      /^9,975,315,584,403,791,[0-9,]*\.\.\. \(4,?013 in all\): in steps of T,/,
    );
    await page.close();
  }, 180_000);
});

/** The chart `id` draws n's orbit under T and in standard steps, with the glide, the arrival at 1 and the maximum marked in each. */
async function expectOrbit(page: Page, id: string, n: bigint): Promise<void> {
  const o = orbit(n);
  const opt = await optionOf(page, id);
  const values = (k: number) => (opt.series[k]!.data as [number, number, string][]).map((d) => BigInt(d[2]));
  expect(values(0)).toEqual(o.t);
  expect(values(1)).toEqual(o.s);
  for (const [k, m] of [
    [2, o.T],
    [3, o.S],
  ] as const) {
    const marks = (opt.series[k]!.data as { name: string; value: [number, number, string] }[]).map((d) => [
      d.name,
      d.value[0],
      BigInt(d.value[2]),
    ]);
    expect(marks).toEqual([
      ["glide", m.glide, (k === 2 ? o.t : o.s)[m.glide]],
      ["reaches 1", m.one, 1n],
      ["maximum", m.maxAt, m.max],
    ]);
  }
}
