// The cycle search view: map and maximum period to the table of every integer cycle.
import { parseMap } from "../../src/core/map.js";
import type { CollatzMap } from "../../src/core/map.js";
import { cycleWidth, MAX_CYCLE_PERIOD, searchCycles } from "../../src/jobs/cycles/cycles.js";
import type { CycleSearchResult } from "../../src/jobs/cycles/cycles.js";
import { RunController } from "../controller.js";
import { $, fieldError, parseField, ResultsPanel } from "../dom.js";
import { offerCyclesExports } from "../export.js";
import { pagePoolPending, withPagePool } from "../engine.js";
import { parseCount } from "../../src/core/parse.js";
import { group } from "../../src/outputs/format.js";
import { verifiedLimit } from "../verified.js";
import { cycleBound } from "../../src/core/cyclebound.js";
import { positiveCycles } from "../../src/jobs/cyclebound.js";
import { cycleBoundLine } from "../../src/outputs/cyclebound.js";

const panel = new ResultsPanel("cycles-results", "cycles-stale", "cycles-form");
const controller = new RunController({
  results: panel,
  start: "cycles-go",
  cancel: "cycles-cancel",
  progress: "cycles-progress",
  status: "cycles-status",
  message: "cycles-message",
});

/** Reads and checks the form; errors appear beside the fields. */
function readCyclesForm(mapText: string, periodText: string): { map: CollatzMap; period: number } | null {
  const map = parseField("cycles-map", parseMap, mapText);
  const period = parseField("cycles-period", (t) => parseCount("period", t, 1, MAX_CYCLE_PERIOD), periodText) ?? 0;
  let ok = period > 0;
  if (ok && map) {
    try {
      cycleWidth(map, period);
      fieldError("cycles-period", "");
    } catch (e) {
      ok = fieldError("cycles-period", (e as Error).message);
    }
  }
  return map && ok ? { map, period } : null;
}

/**
 * What the Verify view's last run from 1 of this map proves about cycle lengths: the least length of
 * a cycle with every element >= X (src/core/cyclebound.ts), the cycles found below X aside; "" when
 * this page has verified no range from 1 of the map.
 */
function boundLine(r: CycleSearchResult): string {
  const v = verifiedLimit(r.map.name);
  if (v === null || v.X < 2n) return "";
  const below = positiveCycles(r).filter((c) => c.min < v.X);
  return ` From the Verify view's run of [1, ${group(v.to)}): ${cycleBoundLine(cycleBound(r.map, v.X), below)}.`;
}

function renderCycles(r: CycleSearchResult): void {
  offerCyclesExports(r);
  panel.shown(`${r.map.name}, period up to ${r.maxPeriod}`);
  controller.say(
    `${r.cycles.length} integer cycles of ${r.map.name} with period <= ${r.maxPeriod} (complete search, ${r.width}-bit, ` +
      `${r.seconds.toFixed(2)} s).${boundLine(r)}`,
  );
  const rows = r.cycles
    .map(
      (c) =>
        `<tr><td>${c.representative > 0n ? "positive" : "negative"}</td><td>${c.min}</td><td>${c.representative}</td><td>` +
        `${c.period}</td><td>${c.odd}</td><td class="elements">` +
        `${c.elements.length <= 40 ? c.elements.join(" ") : `${c.elements.slice(0, 40).join(" ")} …`}</td></tr>`,
    )
    .join("");
  $("cycles-table").innerHTML =
    '<thead><tr><th>sign</th><th>minimum</th><th title="the member of least absolute value, with its sign">member of least |x|</th>' +
    '<th title="in standard steps: the period plus the odd steps">period (steps of T)</th><th>odd steps</th>' +
    `<th class="left">elements</th></tr></thead><tbody>${rows}</tbody>`;
}

/** Runs the search when the form is valid; returns false (errors beside the fields) when it is not. */
export async function runCycles(mapText: string, periodText: string, workers: number): Promise<boolean> {
  const req = readCyclesForm(mapText, periodText);
  if (!req) {
    panel.markStale("the inputs above are not valid");
    return false;
  }
  const waiting = pagePoolPending() > 0 ? "Waiting for the job already running..." : "Starting workers...";
  const out = await controller.run(
    (options) => withPagePool(workers, (pool) => searchCycles(pool, req.map, req.period, options), options.signal),
    waiting,
  );
  if (out.ok) renderCycles(out.value);
  return true;
}

export function cancelCycles(): void {
  controller.cancel();
}
