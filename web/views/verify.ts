// The Verify view: a range of n checked in the page's workers, with its counts, maxima, record
// lists and a certificate to download (the same library and certificate format as the CLI).
import { parseMap } from "../../src/core/map.js";
import { checkRange, parseCount, parseWhole, RangeEndError } from "../../src/core/parse.js";
import type { RangeWords } from "../../src/core/parse.js";
import { verifyJson } from "../../src/jobs/verify/certificate.js";
import type { VerifyResult } from "../../src/jobs/verify/merge.js";
import { classDepthOf, DEFAULT_SIEVE_DEPTH, MAX_VERIFY_SIEVE_DEPTH } from "../../src/jobs/verify/plan.js";
import type { VerifyRequest } from "../../src/jobs/verify/plan.js";
import { cycleStart, verifyClaim } from "../../src/jobs/verify/claim.js";
import { cycleBound } from "../../src/core/cyclebound.js";
import { cycleThrough, runLimit } from "../../src/jobs/cyclebound.js";
import { cycleBoundLine } from "../../src/outputs/cyclebound.js";
import { kernelDepthLimit } from "../../src/core/map.js";
import type { CollatzMap } from "../../src/core/map.js";
import { certificateText, runVerification } from "../../src/jobs/verify/run.js";
import { planOf } from "../../src/jobs/verify/verify.js";
import { group, plural } from "../../src/outputs/format.js";
import { toExactJson } from "../../src/core/json.js";
import pkg from "../../package.json";
import { RunController } from "../controller.js";
import { $, download, fieldError, parseField, ResultsPanel } from "../dom.js";
import { noteVerified } from "../verified.js";
import { drawCutDepths, drawRecords, drawTrajectory } from "./charts.js";
import type { RecordPoint } from "./charts.js";
import { fileName, offerExports } from "../export.js";
import type { ExportFile } from "../export.js";
import { A006884, A060412 } from "../../src/core/published.js";
import { standardPeak } from "../../src/core/orbit.js";
import { iterate, trajectory } from "../../src/core/padic.js";
import { traceBig } from "../../src/jobs/verify/trace.js";
import { cutDepthsCsv, cutDepthsJson, glideRecordsCsv, pathRecordsCsv, recordsJson } from "../../src/outputs/screen.js";
import { kernelBuildId, pagePoolPending, sha256, withPagePool } from "../engine.js";

const panel = new ResultsPanel("verify-result", "verify-stale", "verify-form");
const controller = new RunController({
  results: panel,
  start: "verify-go",
  cancel: "verify-cancel",
  progress: "verify-progress",
  status: "verify-status",
  message: "verify-message",
});
let lastCertificate: string | null = null;
/** The run whose results are on screen (its map and range name the downloads). */
let lastResult: VerifyResult | null = null;

/** The bit length of a positive whole number. */
const bitLength = (x: bigint) => x.toString(2).length;

/**
 * The sieve depth the page runs a range by periods at: the one given, or (none given) one suited to
 * the range, 2^K about a sixteenth of its size (at least 1, at most the CLI's default); never deeper
 * than the bit length of the range's size, where a period would be longer than the range itself and
 * its table of no use (every n of such a range is iterated one by one). With the note beside the field.
 * @example sieveDepthFor(parseMap("5x+1"), 1n, 2000n, null) // { depth: 6, note: "auto: 6 for 1,999 numbers" }
 */
export function sieveDepthFor(map: CollatzMap, from: bigint, to: bigint, given: number | null): { depth: number; note: string } {
  const size = to - from;
  const limit = Math.min(MAX_VERIFY_SIEVE_DEPTH, kernelDepthLimit(map));
  const cap = Math.max(1, bitLength(size));
  if (given === null) {
    const depth = Math.max(1, Math.min(DEFAULT_SIEVE_DEPTH, limit, bitLength(size) - 5));
    return { depth, note: `auto: ${depth} for ${plural(size, "number")}` };
  }
  if (given > cap) return { depth: cap, note: `${given} is deeper than ${plural(size, "number")} can use: ${cap} is run` };
  return { depth: given, note: "" };
}

/** The range's ends in the form's words (the message goes beside the end at fault). */
const RANGE: RangeWords = { from: "From", to: "To", range: "From to To, To not included", toAlone: true, show: group };

/** Map, From and To as the form holds them, or null where one is not valid (no error shown: the run shows them). */
function quietRange(): { map: CollatzMap; from: bigint; to: bigint } | null {
  try {
    const map = parseMap($<HTMLInputElement>("verify-map").value);
    const from = parseWhole("from", $<HTMLInputElement>("verify-from").value);
    const to = parseWhole("to", $<HTMLInputElement>("verify-to").value);
    checkRange(from, to, RANGE);
    return { map, from, to };
  } catch {
    return null;
  }
}

/** Whether the form's range runs class by class (the Method asks for it and the range is [1 or 2^f, 2^N)). */
const runsByClasses = (map: CollatzMap, from: bigint, to: bigint) =>
  $<HTMLSelectElement>("verify-method").value === "classes" && classDepthOf(map, from, to) !== null;

/**
 * The Sieve depth field follows the form: off, with the reason beside it, for a range run class by
 * class (which goes bit by bit to depth N whatever the field says); else the depth that will run.
 */
export function syncVerifyForm(): void {
  const field = $<HTMLInputElement>("verify-depth");
  const note = $("verify-depth-note");
  const range = quietRange();
  if (range && runsByClasses(range.map, range.from, range.to)) {
    field.disabled = true;
    note.textContent = `not used: classes go to depth ${classDepthOf(range.map, range.from, range.to)}`;
    return;
  }
  field.disabled = false;
  const text = field.value.trim();
  const given = /^\d+$/.test(text) ? Number(text) : null;
  note.textContent = range && (text === "" || given !== null) ? sieveDepthFor(range.map, range.from, range.to, given).note : "";
}

/** Reads and checks the form; errors appear beside the fields and nothing runs. */
export function readVerifyForm(): VerifyRequest | null {
  const map = parseField("verify-map", parseMap);
  const from = parseField("verify-from", (t) => parseWhole("from", t));
  const to = parseField("verify-to", (t) => parseWhole("to", t));
  const depthText = $<HTMLInputElement>("verify-depth").value.trim();
  // the range's own checks (core/parse.ts), in the fields' words
  let rangeError: RangeEndError | null = null;
  if (from !== null && to !== null)
    try {
      checkRange(from, to, RANGE);
    } catch (e) {
      if (!(e instanceof RangeEndError)) throw e;
      rangeError = e;
    }
  // a range [1, 2^N) by classes (no sieve depth: the classes go to depth N), unless the periods are chosen
  const byClasses = map !== null && from !== null && to !== null && rangeError === null && runsByClasses(map, from, to);
  // an empty depth: one suited to the range
  const given =
    byClasses || depthText === "" ? null : parseField("verify-depth", (t) => parseCount("sieve depth", t, 1, MAX_VERIFY_SIEVE_DEPTH));
  if (byClasses || depthText === "") fieldError("verify-depth", "");
  if (!map || from === null || to === null || (given === null && !byClasses && depthText !== "")) return null;
  if (rangeError) {
    fieldError(rangeError.end === "from" ? "verify-from" : "verify-to", rangeError.message);
    return null;
  }
  const delay = $<HTMLInputElement>("verify-delay").checked;
  const req: VerifyRequest = byClasses
    ? { map, from, to, delay }
    : { map, from, to, sieveDepth: sieveDepthFor(map, from, to, given).depth, delay, classes: false };
  try {
    planOf(req); // the plan the run uses
  } catch (e) {
    // a message about from alone belongs beside From, one about the depth beside it; the rest (the range, its size) beside To
    const msg = (e as Error).message;
    fieldError(/^from /.test(msg) ? "verify-from" : /^sieve depth /.test(msg) ? "verify-depth" : "verify-to", msg);
    return null;
  }
  return req;
}

function rows(head: string[], body: string[][]): string {
  return `<thead><tr>${head.map((h) => `<th>${h}</th>`).join("")}</tr></thead><tbody>${body.map((r) => `<tr>${r.map((c) => `<td>${c}</td>`).join("")}</tr>`).join("")}</tbody>`;
}

/** The run's claim (src/jobs/verify/claim.ts), as it states it: what is proved, what is not, the assumption, the lists. */
function renderClaim(r: VerifyResult): void {
  const claim = verifyClaim(r);
  $("verify-descent").textContent = claim.descent;
  $("verify-claim").textContent = claim.claim;
  $("verify-claim").classList.toggle("partial", claim.firstUnproved !== null);
  $("verify-not-proved").textContent = claim.notProved ?? "";
  $("verify-not-proved").hidden = claim.notProved === null;
  $("verify-assumption").textContent = claim.assumption;
  const items: HTMLElement[] = [];
  for (const l of claim.lists) {
    const dt = document.createElement("dt");
    dt.textContent = `${l.title}: ${group(l.count)}`;
    const dd = document.createElement("dd");
    const more = l.more > 0n ? `, … and ${group(l.more)} more` : "";
    if (l.title.startsWith("cycle members")) {
      // each member named with its cycle: n = 1 on 1 → 2 → 1
      const ul = document.createElement("ul");
      ul.id = "verify-cycles";
      ul.className = "cycle-list";
      ul.setAttribute("aria-label", "Cycle members and their cycles");
      ul.replaceChildren(
        ...r.cycleMembers.slice(0, l.shown.length).map((m) => {
          const cycle = cycleStart(r.map, m.n);
          const li = document.createElement("li");
          const tail = m.period > cycle.length ? ` → … (period ${m.period})` : "";
          li.textContent = `n = ${group(m.n)} on ${cycle.map(group).join(" → ")}${tail} → ${group(m.n)}`;
          return li;
        }),
      );
      dd.append(ul);
      if (more) dd.append(more.slice(2));
    } else dd.textContent = `${l.shown.join(", ")}${more}`;
    items.push(dt, dd);
  }
  // what a run from 1 proves about cycle lengths (src/core/cyclebound.ts), one line
  const X = runLimit(r);
  if (X !== null) {
    const dt = document.createElement("dt");
    dt.textContent = "cycle lengths";
    const dd = document.createElement("dd");
    dd.id = "verify-cycle-bound";
    const below = r.cycleMembers.filter((m) => m.n < X).map((m) => cycleThrough(r.map, m.n, m.period));
    dd.textContent = cycleBoundLine(cycleBound(r.map, X), below);
    items.push(dt, dd);
  }
  $("verify-lists").replaceChildren(...items);
}

function render(r: VerifyResult): void {
  const c = r.counts;
  panel.shown(`${r.map.name}, [${r.from}, ${r.to})`);
  noteVerified(r);
  renderClaim(r);
  const counts: [string, string][] = [
    ["numbers in the range", group(c.numbers)],
    [
      "method",
      r.method === "classes"
        ? `classes settled bit by bit to depth ${r.sieveDepth}${r.preimage ? ", leaves with a smaller preimage skipped" : ""}`
        : `the depth-${r.sieveDepth} sieve's periods`,
    ],
    ["sieved (descend at their class's depth)", group(c.sieved)],
    ["checked (survivors iterated)", group(c.checked)],
    ["exceptions of the sieve", group(c.exceptions)],
    ...(r.method === "classes" ? ([["reached from a smaller n (skipped)", group(c.preimage)]] as [string, string][]) : []),
    ["cycle members", group(c.cycleMembers)],
    ["enter a cycle of larger numbers", group(c.cycleEntrants)],
    [`unresolved after ${group(r.maxSteps)} step${r.maxSteps === 1 ? "" : "s"}`, group(c.unresolved)],
    ["largest glide (standard steps)", r.maxGlide ? `${r.maxGlide.standardSteps} at n = ${group(r.maxGlide.n)}` : "–"],
    [
      "largest path (highest value: standard steps; under T)",
      r.maxPath ? `${group(standardPeak(r.maxPath.n, r.maxPath.peakT))}; ${group(r.maxPath.peakT)} at n = ${group(r.maxPath.n)}` : "–",
    ],
  ];
  $("verify-counts").innerHTML =
    `<tbody>${counts.map(([k, v]) => `<tr><th scope="row" class="left">${k}</th><td>${v}</td></tr>`).join("")}</tbody>`;
  $("verify-glide").innerHTML = rows(
    ["glide record n", "standard steps", "steps of T"],
    r.glideRecords.map((g) => [group(g.n), String(g.standardSteps), String(g.steps)]),
  );
  $("verify-path").innerHTML = rows(
    ["path record n", "highest value in standard steps", "highest value under T"],
    r.pathRecords.map((p) => [group(p.n), group(standardPeak(p.n, p.peakT)), group(p.peakT)]),
  );
  // the delays (steps to reach 1) when asked for: their records, and the n that do not reach 1
  $("verify-delay-box").hidden = r.delay === null;
  if (r.delay)
    $("verify-delays").innerHTML =
      rows(
        ["delay record n", "standard steps to 1", "steps of T"],
        r.delay.records.map((g) => [group(g.n), String(g.standardSteps), String(g.steps)]),
      ) + (r.delay.unreached > 0n ? `<caption>${group(r.delay.unreached)} n do not reach 1 within the step cap</caption>` : "");
  renderCharts(r);
  $("run-summary").textContent = toExactJson({ verify: verifyJson(r) });
}

/** The base of every file name of a run: verify-MAP-FROM-TO (e.g. verify-3x+1-1-1048576). */
const runName = (r: VerifyResult) => fileName("verify", r.map.name, r.from, r.to);

/**
 * The published records of 3x+1 (OEIS A060412, A006884: their terms below 2^32) that fall in the
 * run's range, with their values computed here exactly (a term of the range is a record of the range
 * too); null for another map.
 */
function publishedIn(r: VerifyResult, kind: "glide" | "path"): RecordPoint[] | null {
  if (r.map.q !== 3 || r.map.r !== 1) return null;
  return (kind === "glide" ? A060412 : A006884)
    .filter((n) => n >= r.from && n < r.to)
    .map((n) => {
      const t = traceBig(r.map, n, r.maxSteps, 0);
      return { n, value: kind === "glide" ? BigInt(t.steps + t.odd) : standardPeak(n, t.path) };
    });
}

/** The orbit of n (until it has gone once round the cycle it reaches, at most 10,000 steps) in the Verify view's chart. */
function drawOrbit(r: VerifyResult, n: bigint): void {
  const steps = trajectory(r.map, n).steps;
  const values = [n];
  for (let j = 0; j < steps; j++) values.push(iterate(r.map, values[j]!, 1));
  drawTrajectory(values, "chart-orbit");
  $<HTMLSelectElement>("verify-orbit-n").value = String(n);
}

// the orbit shown follows its choice, or a click on a row of a record table (its first cell is n)
$("verify-orbit-n").addEventListener("change", () => {
  if (lastResult) drawOrbit(lastResult, BigInt($<HTMLSelectElement>("verify-orbit-n").value));
});
for (const table of ["verify-glide", "verify-path", "verify-delays"])
  $(table).addEventListener("click", (e) => {
    const cell = (e.target as HTMLElement).closest("tr")?.querySelector("td");
    const n = cell?.textContent?.replace(/[^0-9]/g, "");
    if (lastResult && n) drawOrbit(lastResult, BigInt(n));
  });

/** The run's charts (cut depths, records against the published ones, one record's orbit) and its downloads. */
function renderCharts(r: VerifyResult): void {
  lastResult = r;
  const cut = r.counts.sievedByDepth.flatMap((c, j) => (c > 0n ? [[String(j), group(c)]] : []));
  $("verify-cut-depths").innerHTML = cut.length ? rows(["cut depth", "numbers sieved"], cut) : "";
  $("verify-cut-none").hidden = cut.length > 0;
  // no empty bordered box where nothing was sieved: the note says so instead
  $("verify-cut-depths").closest<HTMLElement>(".scroll")!.hidden = cut.length === 0;
  $("chart-cut-depth").closest<HTMLElement>("figure")!.hidden = cut.length === 0;
  drawCutDepths(r.counts.sievedByDepth);
  const pub = (kind: "glide" | "path", name: string) => {
    const points = publishedIn(r, kind);
    return points && { name: `OEIS ${name}`, points };
  };
  drawRecords(
    "chart-glide-records",
    { axis: "glide (standard steps)", unit: "standard steps" },
    r,
    r.glideRecords.map((g) => ({ n: g.n, value: BigInt(g.standardSteps) })),
    pub("glide", "A060412"),
  );
  drawRecords(
    "chart-path-records",
    { axis: "highest value (standard steps)", unit: "at the highest (standard steps)" },
    r,
    r.pathRecords.map((p) => ({ n: p.n, value: standardPeak(p.n, p.peakT) })),
    pub("path", "A006884"),
  );
  // the orbit of a record: the choice lists every glide and path record; the largest glide first
  const choice = $<HTMLSelectElement>("verify-orbit-n");
  const seen = new Map<bigint, string[]>();
  for (const g of r.glideRecords) seen.set(g.n, ["glide"]);
  for (const p of r.pathRecords) seen.set(p.n, [...(seen.get(p.n) ?? []), "path"]);
  choice.replaceChildren(
    ...[...seen]
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
      .map(([n, kinds]) => new Option(`${group(n)} (${kinds.join(" and ")} record)`, String(n))),
  );
  $("verify-orbit").hidden = seen.size === 0;
  const first = r.maxGlide?.n ?? r.maxPath?.n;
  if (first !== undefined) drawOrbit(r, first);
  offerExports("verify-cut-exports", "Download", "the numbers sieved by cut depth", [
    exportOf(r, "csv", "cut-depths", "glidepath verify cut depths", () => cutDepthsCsv(r), cut.length),
    exportOf(r, "json", "cut-depths", "glidepath verify cut depths", () => `${toExactJson(cutDepthsJson(r), 2)}\n`, cut.length),
  ]);
  const lists = [
    ["glide", "glideRecords", r.glideRecords.length, () => glideRecordsCsv(r.glideRecords)],
    ["path", "pathRecords", r.pathRecords.length, () => pathRecordsCsv(r.pathRecords)],
    ["delay", "delayRecords", r.delay?.records.length ?? 0, () => glideRecordsCsv(r.delay?.records ?? [])],
  ] as const;
  for (const [kind, key, count, csv] of lists) {
    if (kind === "delay" && r.delay === null) {
      $("verify-delay-exports").replaceChildren();
      continue;
    }
    offerExports(`verify-${kind}-exports`, `Download the ${kind} records`, `the ${kind} records`, [
      exportOf(r, "csv", `${kind}-records`, `glidepath verify ${kind} records`, csv, count),
      exportOf(r, "json", `${kind}-records`, `glidepath verify ${kind} records`, () => `${toExactJson(recordsJson(r, key), 2)}\n`, count),
    ]);
  }
}

/** A download of the run's: named verify-MAP-FROM-TO-WHAT, its manifest with the range and the rows. */
function exportOf(r: VerifyResult, format: "csv" | "json", what: string, kind: string, data: () => string, rows: number): ExportFile {
  return { format, name: `${runName(r)}-${what}`, data, kind, map: r.map, extra: { from: r.from, to: r.to, rows } };
}

/** Runs the form's verification; returns false (errors beside the fields) when the form is invalid. */
export async function startVerify(workers: number): Promise<boolean> {
  const req = readVerifyForm();
  if (!req) {
    panel.markStale("the inputs above are not valid");
    return false;
  }
  $<HTMLButtonElement>("verify-certificate").disabled = true;
  $("run-summary").textContent = "";
  const started = new Date().toISOString();
  const waiting = pagePoolPending() > 0 ? "Waiting for the job already running..." : "Building the sieve and step tables...";
  const out = await controller.run(
    (options) =>
      withPagePool(
        workers,
        (pool) =>
          runVerification(pool, req, sha256, {
            ...options,
            onPhase: (phase, plan) =>
              controller.phase(
                phase === "tables"
                  ? plan.method === "classes"
                    ? `Building the step tables and the path bounds of depth ${plan.sieveDepth}...`
                    : `Building the depth-${plan.sieveDepth} sieve and step tables...`
                  : // the blocks: the kernel's walk, then in the same worker the exact (BigInt) finish of values
                    // past 128 bits and of the numbers that did not descend; the bar moves as blocks finish
                    `Checking ${plural(req.to - req.from, "number")} in ${plural(plan.blocks.length, "block")} ` +
                      "(the kernel, then exact BigInt arithmetic for values past 128 bits and numbers that do not descend)...",
              ),
          }),
        options.signal,
      ),
    waiting,
    "numbers",
  );
  if (!out.ok) {
    // the results on screen (dimmed) are still the last run's: so is its certificate
    $<HTMLButtonElement>("verify-certificate").disabled = lastCertificate === null;
    return true;
  }
  const { result, hashes, tableSeconds } = out.value;
  render(result);
  // one time for the run: the page's, from the click to the result (tables included), and the rate over it
  const numbers = result.counts.numbers;
  const rate = Number(numbers) / Math.max(out.seconds, 1e-9);
  $("verify-status").textContent =
    `Done in ${out.seconds.toFixed(2)} s: ${plural(numbers, "number")}, ${group(BigInt(Math.round(rate)))} a second` +
    `${tableSeconds > 0 ? ` (building the tables took ${tableSeconds.toFixed(2)} s of it)` : ""}.`;
  const stamp = { version: pkg.version, kernelBuild: await kernelBuildId() };
  lastCertificate = await certificateText(result, hashes, stamp, { started, finished: new Date().toISOString(), workers });
  $<HTMLButtonElement>("verify-certificate").disabled = false;
  return true;
}

export function cancelVerify(): void {
  controller.cancel();
}

/** Hands the last run's certificate over as a download. */
export function downloadCertificate(): void {
  // named after the map and the range, as the README names a certificate (v32.cert.json): verify-3x+1-1-1048576.cert.json
  if (lastCertificate && lastResult) download(`${runName(lastResult)}.cert.json`, [lastCertificate], "application/json");
}

/** Fills From and To from the preset list. */
export function applyPreset(value: string): void {
  if (!value) return;
  const [from, to] = value.split("|");
  $<HTMLInputElement>("verify-from").value = from!;
  $<HTMLInputElement>("verify-to").value = to!;
}
