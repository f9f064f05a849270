// The run view: map, depth and mode in; per-depth table, exceptions, charts and the run summary out.
import { parseMap, checkKernelDepth, kernelDepthLimit } from "../../src/core/map.js";
import type { CollatzMap } from "../../src/core/map.js";
import { exactCounts } from "../../src/core/exact.js";
import type { Level } from "../../src/core/exact.js";
import { runSieve } from "../../src/jobs/sieve/sieve.js";
import type { SieveResult } from "../../src/jobs/sieve/sieve.js";
import { runCensus } from "../../src/jobs/census/census.js";
import type { CensusResult } from "../../src/jobs/census/census.js";
import { CancelledError } from "../../src/engine/pool.js";
import { ResidueSorter } from "../../src/outputs/tables.js";
import { censusJson, log2Coefficient, sieveJson } from "../../src/outputs/summary.js";
import { toExactJson } from "../../src/outputs/json.js";
import { A076227 } from "../../src/core/published.js";
import { group } from "../../src/outputs/format.js";
import { getPool } from "../engine.js";
import { drawCensus, drawDensity, drawHeat, drawStopped } from "./charts.js";
import { showTable } from "./table.js";
import type { PageState } from "../state.js";
import { $, fieldError } from "../dom.js";

/** Memory a run may take for its class table (4 bytes a residue, twice while sorting). */
const TABLE_BUDGET = 1.5 * 2 ** 30;

export interface RunRequest {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly mode: "survivors" | "full";
  readonly workers: number;
}

/** Reads and checks the form; errors appear beside the fields and nothing runs. */
export function readRunForm(): RunRequest | null {
  let map: CollatzMap | null = null;
  try {
    map = parseMap(($("run-map") as HTMLInputElement).value.trim());
    fieldError("run-map", "");
  } catch (e) {
    fieldError("run-map", (e as Error).message);
  }
  const mode = ($("run-mode") as HTMLSelectElement).value === "full" ? "full" : "survivors";
  const text = ($("run-depth") as HTMLInputElement).value.trim();
  const max = mode === "full" ? 30 : 32;
  const depth = Number(text);
  let ok = /^\d+$/.test(text) && depth >= 1 && depth <= max;
  if (!ok) fieldError("run-depth", `depth must be a whole number from 1 to ${max} in ${mode === "full" ? "census" : "survivors"} mode`);
  else if (map) {
    const limit = mode === "full" ? kernelDepthLimit(map, "i64") : kernelDepthLimit(map);
    ok = depth <= limit;
    fieldError("run-depth", ok ? "" : `depth ${depth} is beyond the exact 64-bit range for ${map.name} (at most ${limit})`);
  }
  const workers = Math.max(1, Math.min(16, Number(($("run-workers") as HTMLInputElement).value) || 1));
  return map && ok ? { map, depth, mode, workers } : null;
}

function renderLevels(map: CollatzMap, levels: readonly Level[]): void {
  const published = map.q === 3 && map.r === 1;
  const head = `<thead><tr><th>depth</th><th>survivors</th><th>stopped</th><th>density</th>${published ? "<th>A076227</th><th>agrees</th>" : ""}</tr></thead>`;
  const body = levels
    .map((l) => {
      const pub = A076227[l.depth];
      const cells = published
        ? pub === undefined
          ? "<td>–</td><td></td>"
          : `<td>${group(pub)}</td><td class="${pub === l.survivors ? "ok" : "bad"}" aria-label="${pub === l.survivors ? "agrees" : "differs"}">${pub === l.survivors ? "✓" : "✗"}</td>`
        : "";
      const density = (Number(l.survivors) / 2 ** l.depth).toPrecision(6);
      return `<tr><td>${l.depth}</td><td>${group(l.survivors)}</td><td>${group(l.stopped)}</td><td>${density}</td>${cells}</tr>`;
    })
    .join("");
  $("run-levels").innerHTML = head + `<tbody>${body}</tbody>`;
}

function renderExceptions(r: SieveResult): void {
  const list = r.exceptions.slice(0, 200).map((e) => `n = ${e.n} (class ${e.residue} mod 2^${e.classDepth})`);
  $("run-exceptions").textContent =
    `${group(r.exceptionCount)} positive member${r.exceptionCount === 1n ? " that does" : "s that do"} not descend at the stopping depth of its class` +
    (list.length ? `: ${list.join(", ")}${r.exceptionCount > 200n ? ", ..." : ""}` : ".");
}

function renderCensus(c: CensusResult): void {
  const peaks = c.peak.flatMap((row, j) => row.flatMap((n, m) => (n > 0n ? [{ log2: log2Coefficient(c.map.q, m, j), count: n }] : [])));
  drawCensus(peaks, c.ratioBins);
  $("run-census").innerHTML =
    `<p>Census of all 2^${c.depth} vectors: alive and dropping classes agree with the exact counter at every (j, m): <strong>${c.agreesWithExactCounter ? "yes" : "no"}</strong>. ` +
    `Least members whose first descent differs from the coefficient stopping time: <strong>${group(c.differ.count)}</strong>` +
    (c.differ.listed.length ? ` (${c.differ.listed.slice(0, 20).map((d) => d.n).join(", ")}${c.differ.listed.length > 20 ? ", ..." : ""})` : "") +
    `. Largest T^j(a)/a: T^${c.maxRatio.step}(${c.maxRatio.n}) = ${c.maxRatio.value}.</p>`;
}

let controller: AbortController | null = null;

/** Starts a run; resolves when it has finished, failed or been cancelled. */
export async function startRun(req: RunRequest, onState: (s: Partial<PageState>) => void): Promise<void> {
  const { map, depth, mode } = req;
  const exact = exactCounts(map, depth).levels;
  const tableRows = exact[depth]!.survivors;
  const withTable = mode === "survivors" && (depth <= 30 || ($("run-keep-table") as HTMLInputElement).checked);
  const bytes = Number(tableRows) * 8;
  const message = $("run-message");
  message.className = "message";
  if (withTable && bytes > TABLE_BUDGET) {
    message.className = "message bad";
    message.textContent = `This run's class table needs about ${Math.round(bytes / 2 ** 20)} MiB, more than the ${Math.round(TABLE_BUDGET / 2 ** 20)} MiB this page allows; choose a smaller depth.`;
    return;
  }
  checkKernelDepth(map, depth);
  onState({ map: map.name, depth, mode, workers: req.workers });
  controller = new AbortController();
  const started = performance.now();
  const progress = $("run-progress") as HTMLProgressElement;
  const status = $("run-status");
  ($("run-start") as HTMLButtonElement).disabled = true;
  ($("run-cancel") as HTMLButtonElement).disabled = false;
  progress.value = 0;
  status.textContent = "Starting workers...";
  message.textContent = "";
  $("run-summary").textContent = "";
  const onProgress = (done: number, total: number) => {
    const elapsed = (performance.now() - started) / 1000;
    progress.value = done / total;
    const remaining = done > 0 ? (elapsed * (total - done)) / done : NaN;
    status.textContent = `${done} of ${total} shards, ${elapsed.toFixed(1)} s elapsed${Number.isFinite(remaining) ? `, about ${remaining.toFixed(1)} s left` : ""}`;
  };
  try {
    const pool = await getPool(req.workers);
    const options = { signal: controller.signal, onProgress };
    let sieve: SieveResult;
    let census: CensusResult | null = null;
    let residues: Uint32Array | null = null;
    if (mode === "full") {
      census = await runCensus(pool, map, depth, options);
      sieve = await runSieve(pool, { map, depth, mode: "survivors" }, { signal: controller.signal });
    } else {
      const sorter = new ResidueSorter(depth, Math.min(depth, 10), 0, 1 << Math.min(depth, 10));
      sieve = await runSieve(pool, { map, depth, mode: "survivors", ...(withTable ? { onLeaves: (c) => sorter.add(c), residuesOnly: true } : {}) }, options);
      if (withTable) residues = await collectSorted(sorter, Number(tableRows));
    }
    const seconds = (performance.now() - started) / 1000;
    const levels = census ? census.levels : sieve.levels;
    const last = levels[depth]!;
    $("run-headline").innerHTML =
      `Survivors mod 2^${depth}: <strong>${group(last.survivors)}</strong> of ${group(1n << BigInt(depth))} classes ` +
      `<span class="sub">${map.name}: density ${(Number(last.survivors) / 2 ** depth).toPrecision(6)}, ` +
      `${group(census ? census.nodes : sieve.nodes)} nodes in ${seconds.toFixed(2)} s (${req.workers} worker${req.workers === 1 ? "" : "s"})` +
      `${map.q === 3 && map.r === 1 && A076227[depth] !== undefined ? `; A076227 ${A076227[depth] === last.survivors ? "agrees" : "DIFFERS"}` : ""}</span>`;
    renderLevels(map, levels);
    renderExceptions(sieve);
    // one chart per task, so that no single task keeps the page busy for long
    for (const el of document.querySelectorAll<HTMLElement>(".census-only")) el.hidden = !census;
    for (const draw of [() => drawDensity(levels, exact), () => drawStopped(levels), () => drawHeat(census ? census.live : sieve.live)]) {
      await yieldToPage();
      draw();
    }
    $("run-census").innerHTML = "";
    if (census) {
      await yieldToPage();
      renderCensus(census);
    }
    await yieldToPage();
    showTable(residues ? { map, depth, residues } : null);
    if (!residues && mode === "survivors") $("table-caption").textContent = `The class table of this run was not kept (depth ${depth} > 30): tick "Class table above depth 30" to keep it.`;
    const summary = { ...sieveJson(sieve), mode, seconds: Number(seconds.toFixed(3)), ...(census ? { nodes: census.nodes, census: censusJson(census) } : {}) };
    $("run-summary").textContent = toExactJson(summary);
    progress.value = 1;
    status.textContent = `Done in ${seconds.toFixed(2)} s.`;
  } catch (e) {
    progress.value = 0;
    if (e instanceof CancelledError) {
      status.textContent = "Cancelled.";
    } else {
      status.textContent = "Failed.";
      message.className = "message bad";
      message.textContent = `The run stopped: ${(e as Error).message}`;
    }
  } finally {
    controller = null;
    ($("run-start") as HTMLButtonElement).disabled = false;
    ($("run-cancel") as HTMLButtonElement).disabled = true;
  }
}

function yieldToPage(): Promise<void> {
  return new Promise((r) => setTimeout(r, 0));
}

/** Drains the sorter bucket by bucket, yielding to the page so no task runs long. */
async function collectSorted(sorter: ResidueSorter, rows: number): Promise<Uint32Array> {
  const out = new Uint32Array(rows);
  let at = 0;
  let t = performance.now();
  for (const part of sorter.sorted()) {
    out.set(part, at);
    at += part.length;
    if (performance.now() - t > 20) {
      await yieldToPage();
      t = performance.now();
    }
  }
  if (at !== rows) throw new Error(`internal error: ${at} residues collected, the exact counter says ${rows}`);
  return out;
}

export function cancelRun(): void {
  controller?.abort();
}
