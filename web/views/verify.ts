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
    ["largest path (highest value under T)", r.maxPath ? `${group(r.maxPath.peakT)} at n = ${group(r.maxPath.n)}` : "–"],
  ];
  $("verify-counts").innerHTML =
    `<tbody>${counts.map(([k, v]) => `<tr><th scope="row" class="left">${k}</th><td>${v}</td></tr>`).join("")}</tbody>`;
  $("verify-glide").innerHTML = rows(
    ["glide record n", "standard steps", "steps of T"],
    r.glideRecords.map((g) => [group(g.n), String(g.standardSteps), String(g.steps)]),
  );
  $("verify-path").innerHTML = rows(
    ["path record n", "highest value under T"],
    r.pathRecords.map((p) => [group(p.n), group(p.peakT)]),
  );
  // the delays (steps to reach 1) when asked for: their records, and the n that do not reach 1
  $("verify-delay-box").hidden = r.delay === null;
  if (r.delay)
    $("verify-delays").innerHTML =
      rows(
        ["delay record n", "standard steps to 1", "steps of T"],
        r.delay.records.map((g) => [group(g.n), String(g.standardSteps), String(g.steps)]),
      ) + (r.delay.unreached > 0n ? `<caption>${group(r.delay.unreached)} n do not reach 1 within the step cap</caption>` : "");
  $("run-summary").textContent = toExactJson({ verify: verifyJson(r) });
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
  if (lastCertificate) download("verification-certificate.json", [lastCertificate], "application/json");
}

/** Fills From and To from the preset list. */
export function applyPreset(value: string): void {
  if (!value) return;
  const [from, to] = value.split("|");
  $<HTMLInputElement>("verify-from").value = from!;
  $<HTMLInputElement>("verify-to").value = to!;
}
