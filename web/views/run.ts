// The run view: map, depth and mode in; per-depth table, exceptions, charts and the run summary out.
import { parseMap, stoppingOdds } from "../../src/core/map.js";
import type { CollatzMap } from "../../src/core/map.js";
import { exactCounts } from "../../src/core/exact.js";
import { classFromResidue } from "../../src/core/padic.js";
import type { Level } from "../../src/core/exact.js";
import { runSieve } from "../../src/jobs/sieve/sieve.js";
import type { Mode } from "../../src/engine/messages.js";
import type { RunOptions } from "../../src/engine/pool.js";
import type { SieveResult } from "../../src/jobs/sieve/sieve.js";
import { runCensus } from "../../src/jobs/census/census.js";
import type { CensusResult } from "../../src/jobs/census/census.js";
import { passPlan, ResidueSorter } from "../../src/jobs/sieve/sort.js";
import { censusJson, log2Coefficient, sieveJson } from "../../src/outputs/summary.js";
import { toExactJson } from "../../src/core/json.js";
import { A076227 } from "../../src/core/published.js";
import { density, group, ratioText } from "../../src/outputs/format.js";
import { pagePoolPending, withPagePool } from "../engine.js";
import { RunController } from "../controller.js";
import { drawCensus, drawDensity, drawHeat, drawStopped } from "./charts.js";
import { offerRunExports } from "../export.js";
import { showTable } from "./table.js";
import { readWorkers } from "../workers.js";
import { $, fieldError, parseField, ResultsPanel } from "../dom.js";
import { parseCount } from "../../src/core/parse.js";
import { runDepthLimit } from "../../src/jobs/census/census.js";

/** Memory a run may take for its class table (the sorter's bytes per residue; kept in one pass). */
const TABLE_BUDGET = 1.5 * 2 ** 30;
/** Deepest class table the page keeps (residues as u32); by default only up to TABLE_DEFAULT_DEPTH. */
const TABLE_MAX_DEPTH = 32;
const TABLE_DEFAULT_DEPTH = 30;

export interface RunRequest {
  readonly map: CollatzMap;
  readonly depth: number;
  readonly mode: Mode;
  readonly workers: number;
  /** Keep the class table (survivors mode). */
  readonly withTable: boolean;
}

/** The deepest run the library allows for this map and mode (the census also within its own cap). */
export const depthLimit = runDepthLimit;

/** Reads and checks the form; errors appear beside the fields and nothing runs. */
export function readRunForm(): RunRequest | null {
  const map = parseField("run-map", parseMap);
  const mode: Mode = $<HTMLSelectElement>("run-mode").value === "full" ? "full" : "survivors";
  const depth = parseField("run-depth", (t) => parseCount("depth", t, 1, Number.POSITIVE_INFINITY)) ?? 0;
  let ok = depth > 0;
  if (ok && map) {
    const limit = depthLimit(map, mode);
    ok = depth <= limit;
    fieldError(
      "run-depth",
      ok
        ? ""
        : `depth ${depth} is beyond the exact range for ${map.name} in ${mode === "full" ? "census" : "survivors"} mode (at most ${limit})`,
    );
  }
  const keep = $<HTMLInputElement>("run-keep-table").checked;
  const withTable = mode === "survivors" && (depth <= TABLE_DEFAULT_DEPTH || (keep && depth <= TABLE_MAX_DEPTH));
  const workers = readWorkers();
  if (map && ok && workers !== null) return { map, depth, mode, workers, withTable };
  panel.markStale("the inputs above are not valid");
  return null;
}

function renderLevels(map: CollatzMap, levels: readonly Level[]): void {
  const published = map.q === 3 && map.r === 1;
  const odds = stoppingOdds(map.q, levels.length - 1);
  // what each column counts, in which convention, and why "std steps" is blank on some rows
  const caption =
    `<caption>depth j: steps of T. std steps: the stopping time j of the classes stopped at depth j, in standard ` +
    `steps (j + m, each of the m odd steps counted twice); – where no class stops at depth j: a class with m odd ` +
    `steps stops only at the first j with ${map.q}^m &lt; 2^j.</caption>`;
  const head =
    caption +
    `<thead><tr><th>depth</th><th>survivors</th><th>stopped</th><th>density</th>` +
    `<th title="the same stopping time with odd steps counted twice (j + m)">std steps</th>` +
    `${published ? "<th>A076227</th><th>agrees</th>" : ""}</tr></thead>`;
  const body = levels
    .map((l) => {
      const pub = A076227[l.depth];
      const cells = published
        ? pub === undefined
          ? "<td>–</td><td></td>"
          : `<td>${group(pub)}</td><td class="${pub === l.survivors ? "ok" : "bad"}" aria-label="` +
            `${pub === l.survivors ? "agrees" : "differs"}">${pub === l.survivors ? "✓" : "✗"}</td>`
        : "";
      return (
        `<tr><td>${l.depth}</td><td>${group(l.survivors)}</td><td>${group(l.stopped)}</td><td>${density(l.survivors, l.depth)}</td>` +
        (l.stopped > 0n && odds[l.depth] != null
          ? `<td>${l.depth + odds[l.depth]!}</td>`
          : `<td title="no class stops at depth ${l.depth}" aria-label="none: no class stops at this depth">–</td>`) +
        `${cells}</tr>`
      );
    })
    .join("");
  $("run-levels").innerHTML = head + `<tbody>${body}</tbody>`;
}

function renderExceptions(r: Pick<SieveResult, "exceptions" | "exceptionCount">): void {
  const list = r.exceptions.slice(0, 200).map((e) => `n = ${e.n} (class ${e.residue} mod 2^${e.classDepth})`);
  $("run-exceptions").textContent =
    `${group(r.exceptionCount)} positive member` +
    `${r.exceptionCount === 1n ? " that does" : "s that do"} not descend at the stopping depth of its class` +
    (list.length ? `: ${list.join(", ")}${r.exceptionCount > 200n ? ", ..." : ""}` : ".");
}

function renderCensus(c: CensusResult): void {
  const peaks = c.peak.flatMap((row, j) => row.flatMap((n, m) => (n > 0n ? [{ log2: log2Coefficient(c.map.q, m, j), count: n }] : [])));
  drawCensus(peaks, c.ratioBins);
  const K = c.depth;
  const shown = c.differ.listed.slice(0, 20).map((d) => d.n);
  const more = c.differ.count - BigInt(shown.length);
  const m = c.maxRatio;
  $("run-census").innerHTML =
    `<p>Census of all 2^${K} parity vectors: the kernel's alive and dropping classes agree with the exact counter at every ` +
    `(j, m): <strong>${c.agreesWithExactCounter ? "yes" : "no"}</strong>.</p>` +
    `<p>Least members a in [1, 2^${K}) whose first descent (the first step with T^j(a) &lt; a) is not at their class's ` +
    `coefficient stopping time: <strong>${group(c.differ.count)}</strong> (${group(c.differ.early)} descend earlier, ` +
    `${group(c.differ.count - c.differ.early)} not at it)` +
    (shown.length ? `; the smallest: ${shown.join(", ")}${more > 0n ? `, and ${group(more)} more` : ""}` : "") +
    `.</p><p>Largest ratio T^j(a)/a over a in [1, 2^${K}) and j &le; ${K} steps of T: <strong>${ratioText(m.value, m.n)}</strong>, ` +
    `reached by a = ${m.n} at step j = ${m.step} (T^${m.step}(${m.n}) = ${m.value}).</p>`;
}

const panel = new ResultsPanel("run-results", "run-stale", "run-form");

const controller = new RunController({
  start: "run-start",
  cancel: "run-cancel",
  progress: "run-progress",
  status: "run-status",
  message: "run-message",
  results: panel,
});

/** What a run gives the page: the sieve or the census (full mode, with the sieve's fields), the class table (when kept). */
type RunResult =
  | { readonly sieve: SieveResult; readonly census: null; readonly residues: Uint32Array | null }
  | { readonly sieve: null; readonly census: CensusResult; readonly residues: null };

/** Runs the request's jobs on the page's pool (after any job already running there). */
async function executeRun(req: RunRequest, rows: bigint, options: RunOptions): Promise<RunResult> {
  const { map, depth, mode } = req;
  return withPagePool(
    req.workers,
    async (pool) => {
      if (mode === "full") {
        return { sieve: null, census: await runCensus(pool, map, depth, options), residues: null };
      }
      if (!req.withTable) return { sieve: await runSieve(pool, { map, depth, mode }, options), census: null, residues: null };
      const plan = passPlan(depth, rows, TABLE_BUDGET);
      const sorter = new ResidueSorter(depth, plan.bucketBits, 0, 1 << plan.bucketBits);
      const sieve = await runSieve(pool, { map, depth, mode, onLeaves: (c) => sorter.add(c), residuesOnly: true }, options);
      return { sieve, census: null, residues: await collectSorted(sorter, Number(rows)) };
    },
    options.signal,
  );
}

/** Starts a run; resolves when it has finished, failed or been cancelled. */
export async function startRun(req: RunRequest): Promise<void> {
  const { map, depth } = req;
  const exact = exactCounts(map, depth).levels;
  const rows = exact[depth]!.survivors;
  if (req.withTable && passPlan(depth, rows, TABLE_BUDGET).passes > 1) {
    controller.say(
      `This run's class table of ${group(rows)} rows needs more than the ` +
        `${Math.round(TABLE_BUDGET / 2 ** 20)} MiB this page allows; untick the class table or choose a smaller depth.`,
      true,
    );
    return;
  }
  $("run-summary").textContent = "";
  const waiting = pagePoolPending() > 0 ? "Waiting for the job already running..." : "Starting workers...";
  const out = await controller.run((options) => executeRun(req, rows, options), waiting);
  if (out.ok) await renderRun(req, out.value, exact, out.seconds);
}

/** Puts a finished run on the page: headline, table, exceptions, charts (one per task), summary. */
async function renderRun(req: RunRequest, r: RunResult, exact: readonly Level[], seconds: number): Promise<void> {
  const { map, depth, mode } = req;
  const { census, residues } = r;
  const result = r.census ?? r.sieve;
  const levels = result.levels;
  const last = levels[depth]!;
  const published = map.q === 3 && map.r === 1 ? A076227[depth] : undefined;
  $("run-intro").hidden = true;
  panel.shown(`${map.name}, depth ${depth}, ${mode === "full" ? "census" : "survivors"}`);
  // what was walked: the sieve's pruned tree, or the part of the census's full tree its kernel walked
  const walked = census
    ? `all ${group(census.nodes)} parity vectors of length at most ${depth} counted, ${group(census.walked)} of them ` +
      `walked one by one (the rest by lattice paths: subtrees with nothing that depends on the residue)`
    : `${group(result.nodes)} nodes of the pruned tree walked (classes not yet stopped, depths 0 to ${depth})`;
  $("run-headline").innerHTML =
    `Survivors mod 2^${depth}: <strong>${group(last.survivors)}</strong> of ${group(1n << BigInt(depth))} classes ` +
    `<span class="sub">${map.name}: density ${density(last.survivors, depth)}, ` +
    `${walked} in ${seconds.toFixed(2)} s (${req.workers} worker` +
    `${req.workers === 1 ? "" : "s"})` +
    `${published !== undefined ? `; A076227 ${published === last.survivors ? "agrees" : "DIFFERS"}` : ""}</span>`;
  renderLevels(map, levels);
  renderExceptions(result);
  renderGrid(map, depth);
  for (const el of document.querySelectorAll<HTMLElement>(".census-only")) el.hidden = !census;
  for (const draw of [() => drawDensity(levels, exact), () => drawStopped(levels), () => drawHeat(result.live)]) {
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
  if (!residues && mode === "survivors") {
    $("table-caption").textContent =
      depth > TABLE_MAX_DEPTH
        ? `The class table is kept up to depth ${TABLE_MAX_DEPTH}.`
        : `The class table of this run was not kept (depth ${depth} > ${TABLE_DEFAULT_DEPTH}): tick "Class table above depth ` +
          `${TABLE_DEFAULT_DEPTH}" to keep it.`;
  }
  const summary = {
    ...sieveJson(result),
    mode,
    seconds: Number(seconds.toFixed(3)),
    ...(census ? { census: censusJson(census) } : {}),
  };
  $("run-summary").textContent = toExactJson(summary);
  offerRunExports(result, census);
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
  controller.cancel();
}

/** Deepest k for the residue grid (2^k cells). */
const GRID_MAX_DEPTH = 10;
/** Viridis stops for stopping depths 1..k (dark to light), and survivors in the palette's orange. */
const VIRIDIS = ["#440154", "#482878", "#3e4989", "#31688e", "#26828e", "#1f9e89", "#35b779", "#6ece58", "#b5de2b", "#fde725"];
const SURVIVOR = "#E69F00";

/** Every residue a mod 2^k (k = min(depth, 10)), coloured by its class's coefficient stopping time. */
function renderGrid(map: CollatzMap, depth: number): void {
  const k = Math.min(depth, GRID_MAX_DEPTH);
  const grid = $("run-grid");
  grid.style.gridTemplateColumns = `repeat(${2 ** Math.ceil(k / 2)}, 1fr)`;
  const cells: HTMLElement[] = [];
  for (let a = 0; a < 2 ** k; a++) {
    const stop = classFromResidue(map, BigInt(a), k).stoppingTime;
    const cell = document.createElement("span");
    cell.style.background = stop === null ? SURVIVOR : VIRIDIS[Math.round(((stop - 1) / Math.max(1, k - 1)) * (VIRIDIS.length - 1))]!;
    cell.title = stop === null ? `${a} mod 2^${k}: survives to depth ${k}` : `${a} mod 2^${k}: stops at depth ${stop}`;
    cells.push(cell);
  }
  grid.replaceChildren(...cells);
  $("grid-title").textContent = `Residues mod 2^${k} by stopping depth`;
  $("grid-legend").textContent =
    `${2 ** k} cells, a = 0 at the top left, row by row; orange: survivors at depth ${k}; ` +
    `dark to light: classes stopping at depth 1 to ${k}.`;
  // a click or a tap on a cell says its residue (the hover title is not reachable on a touch screen)
  $("grid-picked").textContent = "";
  grid.onclick = (e) => {
    const cell = e.target as HTMLElement;
    if (cell.parentElement === grid) $("grid-picked").textContent = cell.title;
  };
}
