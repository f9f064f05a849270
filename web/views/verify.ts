// The Verify view: a range of n checked in the page's workers, with its counts, maxima, record
// lists and a certificate to download (the same library and certificate format as the CLI).
import { parseMap, step } from "../../src/core/map.js";
import { parseCount, parseWhole } from "../../src/core/parse.js";
import { certificate, tableHashes, verifyJson } from "../../src/jobs/verify/certificate.js";
import type { TableHashes } from "../../src/jobs/verify/certificate.js";
import type { VerifyResult } from "../../src/jobs/verify/merge.js";
import { classDepthOf, MAX_VERIFY_SIEVE_DEPTH, planVerify } from "../../src/jobs/verify/plan.js";
import type { VerifyRequest } from "../../src/jobs/verify/plan.js";
import { verifyTables } from "../../src/jobs/verify/tables.js";
import type { VerifyTableData } from "../../src/jobs/verify/tables.js";
import { runVerify } from "../../src/jobs/verify/verify.js";
import { group } from "../../src/outputs/format.js";
import { toExactJson } from "../../src/core/json.js";
import pkg from "../../package.json";
import { RunController } from "../controller.js";
import { $, download, fieldError, parseField, ResultsPanel } from "../dom.js";
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

/** Reads and checks the form; errors appear beside the fields and nothing runs. */
export function readVerifyForm(): VerifyRequest | null {
  const map = parseField("verify-map", parseMap);
  const from = parseField("verify-from", (t) => parseWhole("from", t));
  const to = parseField("verify-to", (t) => parseWhole("to", t));
  const depth = parseField("verify-depth", (t) => parseCount("sieve depth", t, 1, MAX_VERIFY_SIEVE_DEPTH));
  if (!map || from === null || to === null || depth === null) return null;
  // the range's own checks, in the fields' words
  if (from < 1n) {
    fieldError("verify-from", `From must be at least 1, got ${group(from)}`);
    return null;
  }
  if (to <= from) {
    fieldError("verify-to", `To must be above From (the range is From to To, To not included), got ${group(to)}`);
    return null;
  }
  const delay = ($("verify-delay") as HTMLInputElement).checked;
  // a range [1, 2^N) by classes (no sieve depth: the classes go to depth N), unless the periods are chosen
  const byClasses = ($("verify-method") as HTMLSelectElement).value === "classes" && classDepthOf(map, from, to) !== null;
  const req: VerifyRequest = byClasses ? { map, from, to, delay } : { map, from, to, sieveDepth: depth, delay, classes: false };
  try {
    planVerify(req);
  } catch (e) {
    // a message about from alone belongs beside From; the rest (the range, its size, the depth) beside To
    const msg = (e as Error).message;
    fieldError(/^from /.test(msg) ? "verify-from" : "verify-to", msg);
    return null;
  }
  return req;
}

function rows(head: string[], body: string[][]): string {
  return `<thead><tr>${head.map((h) => `<th>${h}</th>`).join("")}</tr></thead><tbody>${body.map((r) => `<tr>${r.map((c) => `<td>${c}</td>`).join("")}</tr>`).join("")}</tbody>`;
}

function render(r: VerifyResult): void {
  const c = r.counts;
  panel.shown(`${r.map.name}, [${r.from}, ${r.to})`);
  const rate = Number(c.numbers) / Math.max(r.seconds, 1e-9);
  controller.say(
    `Every n in [${r.from}, ${r.to}) of ${r.map.name} reaches a value below n` +
      `${c.cycleMembers + c.cycleEntrants + c.unresolved > 0n ? ", except the cycle members, cycle entrants and unresolved numbers counted below" : ""}. ` +
      // by induction over n: no divergent start and no new cycle in the range, given the numbers below it
      (r.from > 1n
        ? `So no n in the range starts a divergent trajectory or lies on a cycle, other than the cycle members and unresolved numbers below, given that no n below ${group(r.from)} does (the induction assumption of a range that does not start at 1). `
        : "By induction from 1, no n in the range starts a divergent trajectory or lies on a cycle, other than the cycle members and unresolved numbers below. ") +
      `${group(c.numbers)} numbers in ${r.seconds.toFixed(2)} s (${group(BigInt(Math.round(rate)))} a second).`,
  );
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
  // each cycle member named with its cycle: n = 1 on 1 → 2 → 1
  $("verify-cycles").replaceChildren(
    ...r.cycleMembers.map((m) => {
      const cycle = [m.n];
      for (let v = step(r.map, m.n), i = 0; v !== m.n && i < 12; v = step(r.map, v), i++) cycle.push(v);
      const li = document.createElement("li");
      const more = m.period > cycle.length ? ` → … (period ${m.period})` : "";
      li.textContent = `n = ${group(m.n)} on ${cycle.map(group).join(" → ")}${more} → ${group(m.n)}`;
      return li;
    }),
  );
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
  ($("verify-certificate") as HTMLButtonElement).disabled = true;
  $("run-summary").textContent = "";
  const started = new Date().toISOString();
  const waiting = pagePoolPending() > 0 ? "Waiting for the job already running..." : "Building the sieve and step tables...";
  let hashes: TableHashes | null = null;
  const out = await controller.run(
    (options) =>
      withPagePool(
        workers,
        async (pool) => {
          const plan = planVerify(req);
          let tables: VerifyTableData | undefined;
          if (plan.engine === "kernel") {
            tables = await verifyTables(pool, plan, options);
            hashes = await tableHashes(tables, sha256);
          }
          return runVerify(pool, req, { ...options, tables });
        },
        options.signal,
      ),
    waiting,
    "numbers",
  );
  if (!out.ok) {
    // the results on screen (dimmed) are still the last run's: so is its certificate
    ($("verify-certificate") as HTMLButtonElement).disabled = lastCertificate === null;
    return true;
  }
  render(out.value);
  const stamp = { version: pkg.version, kernelBuild: await kernelBuildId() };
  lastCertificate = `${toExactJson(await certificate(out.value, hashes, stamp, { started, finished: new Date().toISOString(), workers }), 2)}\n`;
  ($("verify-certificate") as HTMLButtonElement).disabled = false;
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
  ($("verify-from") as HTMLInputElement).value = from!;
  ($("verify-to") as HTMLInputElement).value = to!;
}
