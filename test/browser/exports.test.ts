// The downloads of what each view shows, in Debian's Chromium: every file read back (a CSV reader
// written here, JSON.parse with exact integers, apache-arrow for Arrow), compared with the screen,
// the run's own JSON and a BigInt brute force; each with the CLI's manifest (sha256 checked here)
// and named after its map and parameters.
import { createHash } from "node:crypto";
import { tableFromIPC } from "apache-arrow";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { parseExactJson } from "../../src/core/json.js";
import { downloads, summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();

interface File {
  readonly name: string;
  readonly bytes: Buffer;
}

/** The files a click hands over (a data file and its manifest). */
async function downloadsOf(page: Page, selector: string, count = 2): Promise<File[]> {
  const got = await downloads(page, selector, count);
  expect(got).toHaveLength(count);
  return got;
}

/**
 * A CSV reader (RFC 4180: fields split at commas, quoted fields with doubled quotes, CRLF or LF):
 * the header and the rows as records, every row as long as the header.
 */
function readCsv(text: string): Record<string, string>[] {
  const rows: string[][] = [];
  let row: string[] = [],
    field = "",
    quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ",") {
      row.push(field);
      field = "";
    } else if (c === "\n" || c === "\r") {
      if (c === "\r" && text[i + 1] === "\n") i++;
      row.push(field);
      rows.push(row);
      row = [];
      field = "";
    } else field += c;
  }
  if (field !== "" || row.length) rows.push([...row, field]);
  const [head, ...body] = rows;
  for (const r of body) expect(r.length).toBe(head!.length);
  return body.map((r) => Object.fromEntries(head!.map((h, i) => [h, r[i]!])));
}

/**
 * The data file `name` and its manifest NAME.json among `files`: the manifest's common fields as the
 * CLI writes them (src/outputs/manifest.ts), its size and sha256 those of the file; returns both.
 */
function withManifest(files: File[], name: string, kind: string, map: string, format: string) {
  expect(files.map((f) => f.name).sort()).toEqual([name, `${name}.json`]);
  const data = files.find((f) => f.name === name)!;
  const m = parseExactJson(files.find((f) => f.name === `${name}.json`)!.bytes.toString("utf8")) as Record<string, unknown>;
  expect(Object.keys(m).slice(0, 10)).toEqual(["kind", "map", "q", "r", "format", "data", "bytes", "sha256", "tool", "created"]);
  expect([m.kind, m.map, m.format, m.data, m.bytes]).toEqual([kind, map, format, name, BigInt(data.bytes.length)]);
  expect(m.sha256).toBe(createHash("sha256").update(data.bytes).digest("hex"));
  expect((m.tool as { name: string }).name).toBe("glidepath");
  return { data, manifest: m };
}

/** A table on screen as records by its header (digits without their group commas). */
async function screenTable(page: Page, id: string): Promise<Record<string, string>[]> {
  return page.$eval(`#${id}`, (t) => {
    const head = [...t.querySelectorAll("thead th")].map((h) => h.textContent!.trim());
    return [...t.querySelectorAll("tbody tr")].map((r) =>
      Object.fromEntries([...r.querySelectorAll("td")].map((c, i) => [head[i]!, c.textContent!.trim().replace(/(\d),(?=\d)/g, "$1")])),
    );
  });
}

/** C(j, m) for j <= n, by Pascal's rule in BigInt. */
function binomials(n: number): bigint[][] {
  const c: bigint[][] = [[1n]];
  for (let j = 1; j <= n; j++) c.push(Array.from({ length: j + 1 }, (_, m) => (c[j - 1]![m - 1] ?? 0n) + (c[j - 1]![m] ?? 0n)));
  return c;
}

const text = (f: File) => f.bytes.toString("utf8");

describe.skipIf(!hasChromium)("exports of what is on screen: files, manifests, names", () => {
  it("the Sieve view's table by depth as CSV and JSON (sieve --json's fields), equal to the table on screen", async () => {
    const page = await open("?depth=12&run=1");
    const s = parseExactJson(await summaryOf(page)) as { levels: { depth: bigint; survivors: bigint; stopped: bigint }[] };
    const screen = await screenTable(page, "run-levels");
    const csv = withManifest(
      await downloadsOf(page, "#run-levels-exports-csv"),
      "sieve-3x+1-12-levels.csv",
      "glidepath levels",
      "3x+1",
      "csv",
    );
    const rows = readCsv(text(csv.data));
    expect(rows.map((r) => [r.depth, r.survivors, r.stopped])).toEqual(screen.map((r) => [r.depth, r.survivors, r.stopped]));
    expect(csv.manifest.depth).toBe(12n);
    expect(csv.manifest.rows).toBe(13n);
    const json = withManifest(
      await downloadsOf(page, "#run-levels-exports-json"),
      "sieve-3x+1-12-levels.json",
      "glidepath levels",
      "3x+1",
      "json",
    );
    expect((parseExactJson(text(json.data)) as typeof s).levels).toEqual(s.levels);
    // no census, no census downloads
    expect(await page.$$("#run-census-exports button")).toHaveLength(0);
    await page.close();
  });

  it("the census tallies as CSV, JSON (census --json) and Arrow (census --out's rows and manifest): C(j, m) vectors, the survivors", async () => {
    const page = await open("?mode=full&depth=10&run=1");
    const s = parseExactJson(await summaryOf(page)) as { census: unknown; levels: { survivors: bigint }[] };
    const name = "census-3x+1-10";
    const csv = withManifest(await downloadsOf(page, "#run-census-exports-csv"), `${name}.csv`, "glidepath census", "3x+1", "csv");
    expect(csv.manifest.depth).toBe(10n);
    const rows = readCsv(text(csv.data));
    // every parity vector of length j with m odd steps is counted once: C(j, m) (common practice)
    const c = binomials(10);
    const vectors = rows.filter((r) => r.tally === "vectors").map((r) => [Number(r.depth), Number(r.odd_steps), BigInt(r.count!)]);
    expect(vectors).toEqual(c.flatMap((row, j) => row.map((n, m) => [j, m, n])));
    // the classes alive at depth 10, by m, add up to the survivors on screen
    const live = rows.filter((r) => r.tally === "live" && r.depth === "10").reduce((t, r) => t + BigInt(r.count!), 0n);
    const screen = await screenTable(page, "run-levels");
    expect(String(live)).toBe(screen.find((r) => r.depth === "10")!.survivors);
    expect(live).toBe(s.levels[10]!.survivors);
    const arrow = withManifest(await downloadsOf(page, "#run-census-exports-arrow"), `${name}.arrow`, "glidepath census", "3x+1", "arrow");
    const table = tableFromIPC(arrow.data.bytes);
    expect(table.schema.fields.map((f) => f.name)).toEqual(["tally", "depth", "odd_steps", "bin", "count"]);
    expect(table.toArray().map((r) => Object.values(r.toJSON()).map(String))).toEqual(rows.map((r) => Object.values(r)));
    const json = withManifest(await downloadsOf(page, "#run-census-exports-json"), `${name}.json`, "glidepath census", "3x+1", "json");
    expect(parseExactJson(text(json.data))).toEqual(s.census);
    await page.close();
  });

  it("the cycles as CSV, JSON and Arrow (cycles --out's manifest), equal to the table on screen", async () => {
    const page = await open("?view=cycles&cmap=3x%2B5&period=12");
    await page.click("#cycles-go");
    await page.waitForSelector("#cycles-exports-csv");
    const screen = await screenTable(page, "cycles-table");
    const name = "cycles-3x+5-period-12";
    const csv = withManifest(await downloadsOf(page, "#cycles-exports-csv"), `${name}.csv`, "glidepath cycles", "3x+5", "csv");
    const rows = readCsv(text(csv.data));
    // the screen's columns by the start of their headings (sign, minimum, ..., period (steps of T), odd steps, elements)
    const col = (r: Record<string, string>, start: string) => Object.entries(r).find(([h]) => h.startsWith(start))![1];
    expect(rows.map((r) => [r.sign, r.minimum, r.period, r.odd_steps])).toEqual(
      screen.map((r) => [col(r, "sign"), col(r, "minimum"), col(r, "period"), col(r, "odd steps")]),
    );
    expect([csv.manifest.maxPeriod, csv.manifest.rows]).toEqual([12n, BigInt(screen.length)]);
    // 3x+5's positive cycles up to period 12 have least elements 1, 5, 19, 23 (common practice; the Cycles view's list)
    expect(rows.filter((r) => r.sign === "positive").map((r) => r.minimum)).toEqual(["1", "5", "19", "23"]);
    const arrow = withManifest(await downloadsOf(page, "#cycles-exports-arrow"), `${name}.arrow`, "glidepath cycles", "3x+5", "arrow");
    const t = tableFromIPC(arrow.data.bytes);
    expect(t.getChild("min")!.toArray()).toEqual(rows.map((r) => r.minimum));
    expect(
      t
        .getChild("elements")!
        .toArray()
        .map((e: { toArray: () => string[] }) => e.toArray().join(" ")),
    ).toEqual(rows.map((r) => r.elements));
    const json = withManifest(await downloadsOf(page, "#cycles-exports-json"), `${name}.json`, "glidepath cycles", "3x+5", "json");
    expect((parseExactJson(text(json.data)) as { cycles: { min: bigint }[] }).cycles.map((c) => String(c.min))).toEqual(
      rows.map((r) => r.minimum),
    );
    await page.close();
  });

  it("the inverse tree's levels as CSV and JSON (tree --json), equal to the table on screen and to a BigInt count of predecessors", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=12&run=1");
    const s = parseExactJson(await summaryOf(page)) as { tree: { levels: { nodes: bigint }[] } };
    const screen = await screenTable(page, "tree-levels");
    const name = "tree-3x+1-1-depth-12-levels";
    const csv = withManifest(await downloadsOf(page, "#tree-levels-exports-csv"), `${name}.csv`, "glidepath tree levels", "3x+1", "csv");
    const rows = readCsv(text(csv.data));
    expect(rows.map((r) => [r.depth, r.nodes])).toEqual(screen.map((r) => [r.depth, r.nodes]));
    // the n that reach 1 first after exactly j steps of T, by a BigInt search over n <= 2^12: a node of depth j is at
    // most 2^j (each inverse step at most doubles: 2y, or (2y - 1)/3 < 2y), so the search holds every node to depth 12
    const T = (n: bigint) => (n % 2n === 0n ? n / 2n : (3n * n + 1n) / 2n);
    const counts = Array.from({ length: 13 }, () => 0n);
    for (let n = 1n; n <= 1n << 12n; n++) {
      let v = n,
        j = 0;
      while (v !== 1n && j <= 12) {
        v = T(v);
        j++;
      }
      if (v === 1n && j <= 12) counts[j]!++;
    }
    expect(rows.map((r) => BigInt(r.nodes!))).toEqual(counts);
    const json = withManifest(
      await downloadsOf(page, "#tree-levels-exports-json"),
      `${name}.json`,
      "glidepath tree levels",
      "3x+1",
      "json",
    );
    expect((parseExactJson(text(json.data)) as typeof s.tree).levels).toEqual(s.tree.levels);
    await page.close();
  });

  it("Verify's record lists and cut depths as CSV and JSON, equal to the screen, the run's JSON and a brute force of the highest values", async () => {
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E16&run=1");
    const s = parseExactJson(await summaryOf(page)) as {
      verify: {
        glideRecords: { n: bigint; standardSteps: bigint; steps: bigint }[];
        pathRecords: { n: bigint; peakT: bigint }[];
        counts: { sievedByDepth: { depth: bigint; count: bigint }[] };
      };
    };
    const base = "verify-3x+1-1-65536";
    const glide = withManifest(
      await downloadsOf(page, "#verify-glide-exports-csv"),
      `${base}-glide-records.csv`,
      "glidepath verify glide records",
      "3x+1",
      "csv",
    );
    const g = readCsv(text(glide.data));
    expect([glide.manifest.from, glide.manifest.to, glide.manifest.rows]).toEqual([1n, 65536n, BigInt(g.length)]);
    expect(g.map((r) => r.n)).toEqual((await screenTable(page, "verify-glide")).map((r) => Object.values(r)[0]));
    expect(g.map((r) => [BigInt(r.n!), BigInt(r.standard_steps!), BigInt(r.steps_of_T!)])).toEqual(
      s.verify.glideRecords.map((x) => [x.n, x.standardSteps, x.steps]),
    );
    const path = withManifest(
      await downloadsOf(page, "#verify-path-exports-csv"),
      `${base}-path-records.csv`,
      "glidepath verify path records",
      "3x+1",
      "csv",
    );
    const p = readCsv(text(path.data));
    expect(p.map((r) => r.n)).toEqual((await screenTable(page, "verify-path")).map((r) => Object.values(r)[0]));
    for (const r of p) {
      // the highest value of n's standard trajectory (3n + 1 and n/2), by iteration here
      const n = BigInt(r.n!);
      let v = n,
        max = n;
      while (v !== 1n) {
        v = v % 2n === 0n ? v / 2n : 3n * v + 1n;
        if (v > max) max = v;
      }
      expect([r.n, BigInt(r.highest_standard!)]).toEqual([r.n, max]);
    }
    expect(p.map((r) => BigInt(r.highest_T!))).toEqual(s.verify.pathRecords.map((x) => x.peakT));
    const json = withManifest(
      await downloadsOf(page, "#verify-glide-exports-json"),
      `${base}-glide-records.json`,
      "glidepath verify glide records",
      "3x+1",
      "json",
    );
    expect((parseExactJson(text(json.data)) as typeof s.verify).glideRecords).toEqual(s.verify.glideRecords);
    const cut = withManifest(
      await downloadsOf(page, "#verify-cut-exports-csv"),
      `${base}-cut-depths.csv`,
      "glidepath verify cut depths",
      "3x+1",
      "csv",
    );
    expect(readCsv(text(cut.data)).map((r) => [BigInt(r.depth!), BigInt(r.sieved!)])).toEqual(
      s.verify.counts.sievedByDepth.map((c) => [c.depth, c.count]),
    );
    expect(await page.$$("#verify-delay-exports button")).toHaveLength(0); // no delays asked for
    await page.close();
  });

  it("Verify's delay records, when asked for, as CSV: the n below 2^10 whose steps to 1 beat every smaller n's (brute force)", async () => {
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E10&vdelay=1&run=1");
    await summaryOf(page);
    const csv = withManifest(
      await downloadsOf(page, "#verify-delay-exports-csv"),
      "verify-3x+1-1-1024-delay-records.csv",
      "glidepath verify delay records",
      "3x+1",
      "csv",
    );
    const brute: [bigint, bigint][] = [];
    let best = -1n;
    for (let n = 1n; n < 1024n; n++) {
      let steps = 0n;
      for (let v = n; v !== 1n; v = v % 2n === 0n ? v / 2n : 3n * v + 1n) steps++;
      if (steps > best) {
        best = steps;
        brute.push([n, steps]);
      }
    }
    expect(readCsv(text(csv.data)).map((r) => [BigInt(r.n!), BigInt(r.standard_steps!)])).toEqual(brute);
    await page.close();
  });
});
