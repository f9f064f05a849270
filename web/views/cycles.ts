// The cycle search view: map and maximum period to the table of every integer cycle.
import { parseMap } from "../../src/core/map.js";
import { searchCycles, MAX_CYCLE_PERIOD, cycleWidth } from "../../src/jobs/cycles/cycles.js";
import { CancelledError } from "../../src/engine/pool.js";
import { getPool } from "../engine.js";
import { $, fieldError } from "../dom.js";

let controller: AbortController | null = null;

export async function runCycles(mapText: string, periodText: string, workers: number): Promise<boolean> {
  let map;
  try {
    map = parseMap(mapText.trim());
    fieldError("cycles-map", "");
  } catch (e) {
    fieldError("cycles-map", (e as Error).message);
  }
  const K = Number(periodText);
  let ok = /^\d+$/.test(periodText.trim()) && K >= 1 && K <= MAX_CYCLE_PERIOD;
  if (!ok) fieldError("cycles-period", `a whole number from 1 to ${MAX_CYCLE_PERIOD}`);
  else if (map) {
    try {
      cycleWidth(map, K);
      fieldError("cycles-period", "");
    } catch (e) {
      ok = fieldError("cycles-period", (e as Error).message);
    }
  }
  if (!map || !ok) return false;
  controller = new AbortController();
  const progress = $("cycles-progress") as HTMLProgressElement;
  const status = $("cycles-status");
  ($("cycles-go") as HTMLButtonElement).disabled = true;
  ($("cycles-cancel") as HTMLButtonElement).disabled = false;
  const started = performance.now();
  try {
    const r = await searchCycles(await getPool(workers), map, K, {
      signal: controller.signal,
      onProgress: (d, t) => {
        progress.value = d / t;
        status.textContent = `${d} of ${t} shards, ${((performance.now() - started) / 1000).toFixed(1)} s`;
      },
    });
    $("cycles-message").textContent = `${r.cycles.length} integer cycles of ${map.name} with period <= ${K} (complete search, ${r.width}-bit, ${r.seconds.toFixed(2)} s).`;
    const rows = r.cycles
      .map((c) => `<tr><td>${c.representative > 0n ? "positive" : "negative"}</td><td>${c.min}</td><td>${c.representative}</td><td>${c.period}</td><td>${c.odd}</td><td class="left">${c.elements.length <= 40 ? c.elements.join(" ") : `${c.elements.slice(0, 40).join(" ")} …`}</td></tr>`)
      .join("");
    $("cycles-table").innerHTML = `<thead><tr><th>sign</th><th>minimum</th><th>least |x|</th><th>period</th><th>odd steps</th><th class="left">elements</th></tr></thead><tbody>${rows}</tbody>`;
    progress.value = 1;
    status.textContent = "Done.";
  } catch (e) {
    status.textContent = e instanceof CancelledError ? "Cancelled." : "Failed.";
    if (!(e instanceof CancelledError)) $("cycles-message").textContent = `The search stopped: ${(e as Error).message}`;
  } finally {
    controller = null;
    ($("cycles-go") as HTMLButtonElement).disabled = false;
    ($("cycles-cancel") as HTMLButtonElement).disabled = true;
  }
  return true;
}

export function cancelCycles(): void {
  controller?.abort();
}
