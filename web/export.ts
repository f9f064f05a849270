// Downloads of what a view shows: each file with its manifest (FILE.json, the CLI's manifest:
// outputs/manifest.ts), the formats from src/outputs; here only the buttons and the hand-over.
import type { CollatzMap } from "../src/core/map.js";
import { toExactJson } from "../src/core/json.js";
import { manifest } from "../src/outputs/manifest.js";
import type { CensusResult } from "../src/jobs/census/census.js";
import type { CycleSearchResult } from "../src/jobs/cycles/cycles.js";
import type { SieveResult } from "../src/jobs/sieve/sieve.js";
import type { TreeResult } from "../src/jobs/tree/tree.js";
import { censusCsv, levelsCsv, treeLevelsCsv } from "../src/outputs/screen.js";
import { censusJson, cyclesCsv, cyclesJson, sieveJson, treeJson } from "../src/outputs/summary.js";
import pkg from "../package.json";
import { $, download } from "./dom.js";
import { kernelBuildId, sha256 } from "./engine.js";

export type ExportFormat = "csv" | "json" | "arrow";

const TYPES: Record<ExportFormat, string> = { csv: "text/csv", json: "application/json", arrow: "application/vnd.apache.arrow.file" };

/** One download a view offers: its file (map and parameters in the name), its bytes, its manifest's kind and fields. */
export interface ExportFile {
  readonly format: ExportFormat;
  /** The file's name without its extension, e.g. census-3x+1-16 (the extension is the format's). */
  readonly name: string;
  readonly data: () => string | Uint8Array | Promise<string | Uint8Array>;
  /** The manifest's kind ("glidepath census") and its fields past the common ones (depth, rows...). */
  readonly kind: string;
  readonly map: CollatzMap;
  readonly extra: object;
}

/** A file's name from its parts: map, numbers and words joined by "-" (e.g. verify-3x+1-1-1048576). */
export const fileName = (...parts: (string | number | bigint)[]) => parts.map(String).join("-");

/**
 * Hands a file and its manifest over as two downloads: NAME.EXT and NAME.EXT.json (map, format,
 * bytes, sha256, tool, kernel build, time, and the file's own fields).
 */
export async function exportFile(f: ExportFile): Promise<void> {
  const data = await f.data();
  const bytes = typeof data === "string" ? new TextEncoder().encode(data) : data;
  const file = `${f.name}.${f.format}`;
  const tool = { version: pkg.version, kernelBuild: await kernelBuildId() };
  const m = manifest(f.kind, f.map, f.format, { file, bytes: BigInt(bytes.byteLength), sha256: await sha256(bytes) }, tool, f.extra);
  download(file, [bytes as Uint8Array<ArrayBuffer>], TYPES[f.format]);
  download(`${file}.json`, [`${toExactJson(m, 2)}\n`], "application/json");
}

/**
 * Puts a row of download buttons into the element `id` (replacing those of an earlier result) after
 * `title`: one a format, each named with `what` for screen readers; a failure is said beside them.
 */
export function offerExports(id: string, title: string, what: string, files: readonly ExportFile[]): void {
  const bar = $(id);
  bar.style.cssText = "display:flex;flex-wrap:wrap;gap:6px;align-items:center;margin:6px 0";
  // (no .hint class: in a fitted column a hint takes no width of its own and would wrap word by word)
  const muted = "color:var(--muted);font-size:12px";
  const label = document.createElement("span");
  label.style.cssText = muted;
  label.textContent = `${title}:`;
  const said = document.createElement("span");
  said.style.cssText = muted;
  said.setAttribute("role", "status");
  const buttons = files.map((f) => {
    const b = document.createElement("button");
    b.type = "button";
    b.id = `${id}-${f.format}`;
    b.textContent = f.format === "arrow" ? "Arrow" : f.format.toUpperCase();
    b.setAttribute("aria-label", `Download ${what} as ${b.textContent}, with its manifest`);
    b.addEventListener("click", () => {
      said.textContent = "";
      exportFile(f).then(
        () => {
          said.textContent = `${f.name}.${f.format} and its manifest`;
        },
        (e: unknown) => {
          said.textContent = `The export failed: ${(e as Error).message}`;
        },
      );
    });
    return b;
  });
  bar.replaceChildren(label, ...buttons, said);
}

/**
 * The Sieve view's downloads: the table by depth (CSV; JSON: sieve --json's fields) and, after a
 * census, its tallies (CSV and Arrow: census --out's rows; JSON: census --json), with census --out's manifest.
 */
export function offerRunExports(result: SieveResult | CensusResult, census: CensusResult | null): void {
  const { map, depth } = result;
  const name = fileName(census ? "census" : "sieve", map.name, depth, "levels");
  const levels = { kind: "glidepath levels", map, extra: { depth, rows: result.levels.length } };
  offerExports("run-levels-exports", "Download the table by depth", "the table by depth", [
    { ...levels, format: "csv", name, data: () => levelsCsv(result.levels) },
    { ...levels, format: "json", name, data: () => `${toExactJson(sieveJson(result), 2)}\n` },
  ]);
  const bar = $("run-census-exports");
  if (!census) {
    bar.replaceChildren();
    return;
  }
  const tallies = { kind: "glidepath census", map, name: fileName("census", map.name, depth), extra: { depth } };
  offerExports("run-census-exports", "Download the census tallies", "the census tallies", [
    { ...tallies, format: "csv", data: () => censusCsv(census) },
    { ...tallies, format: "json", data: () => `${toExactJson(censusJson(census), 2)}\n` },
    { ...tallies, format: "arrow", data: async () => (await import("../src/outputs/arrow.js")).censusArrow(census) },
  ]);
}

/** The Cycles view's downloads: CSV (its columns as on screen), JSON (cycles --json), Arrow (cycles --out), with cycles --out's manifest. */
export function offerCyclesExports(r: CycleSearchResult): void {
  const file = {
    kind: "glidepath cycles",
    map: r.map,
    name: fileName("cycles", r.map.name, "period", r.maxPeriod),
    extra: { maxPeriod: r.maxPeriod, rows: r.cycles.length },
  };
  offerExports("cycles-exports", "Download the cycles", "the cycles", [
    { ...file, format: "csv", data: () => cyclesCsv(r) },
    { ...file, format: "json", data: () => `${toExactJson(cyclesJson(r), 2)}\n` },
    { ...file, format: "arrow", data: async () => (await import("../src/outputs/arrow.js")).cyclesArrow(r) },
  ]);
}

/** The Inverse tree view's downloads: its levels as CSV and as JSON (tree --json). */
export function offerTreeExports(r: TreeResult): void {
  const file = {
    kind: "glidepath tree levels",
    map: r.map,
    name: fileName("tree", r.map.name, r.n, "depth", r.depth, ...(r.steps === "standard" ? ["standard"] : []), "levels"),
    extra: { n: r.n, depth: r.depth, steps: r.steps, rows: r.levels.length },
  };
  offerExports("tree-levels-exports", "Download the levels", "the tree's levels", [
    { ...file, format: "csv", data: () => treeLevelsCsv(r) },
    { ...file, format: "json", data: () => `${toExactJson(treeJson(r), 2)}\n` },
  ]);
}
