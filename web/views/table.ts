// The class table: every survivor in a virtualised list (tens of millions of rows: the scroll
// range is scaled so that it stays within what browsers can lay out), search by residue, jump to a
// row, and exports made off the page's thread.
import type { CollatzMap } from "../../src/core/map.js";
import { classFromResidue } from "../../src/core/padic.js";
import { CSV_ROW_GUARD } from "../../src/outputs/tables.js";
import { tableManifest } from "../../src/outputs/manifest.js";
import { toExactJson } from "../../src/outputs/json.js";
import { affineText } from "../../src/outputs/card.js";
import { kernelBuildId, sha256, withExportWorker } from "../engine.js";
import pkg from "../../package.json";
import { $, download, fieldError } from "../dom.js";

const ROW = 24;
const MAX_SCROLL = 8_000_000; // px: far below browsers' element-height limits

export interface ClassTable {
  readonly map: CollatzMap;
  readonly depth: number;
  /** Survivors mod 2^depth, ascending. */
  readonly residues: Uint32Array;
}

let current: ClassTable | null = null;
let hit = -1;

function visibleRows(): number {
  return Math.ceil($("table-list").clientHeight / ROW) + 1;
}

/** First row shown for the current scroll position (scaled when the full height would be too tall). */
function firstRow(): number {
  const list = $("table-list");
  if (!current) return 0;
  const n = current.residues.length;
  const full = n * ROW;
  if (full <= MAX_SCROLL) return Math.floor(list.scrollTop / ROW);
  const range = MAX_SCROLL - list.clientHeight;
  return Math.min(n - 1, Math.floor((list.scrollTop / Math.max(1, range)) * Math.max(0, n - visibleRows() + 1)));
}

function scrollToRow(i: number): void {
  const list = $("table-list");
  if (!current) return;
  const n = current.residues.length;
  const full = n * ROW;
  list.scrollTop = full <= MAX_SCROLL ? i * ROW : (i / Math.max(1, n - visibleRows() + 1)) * (MAX_SCROLL - list.clientHeight);
  render();
}

function render(): void {
  const rows = $("table-list").querySelector<HTMLElement>(".vlist-rows")!;
  if (!current) {
    rows.replaceChildren();
    return;
  }
  const { map, depth, residues } = current;
  const start = firstRow();
  const end = Math.min(residues.length, start + visibleRows());
  const list = $("table-list");
  rows.style.transform = `translateY(${list.scrollTop}px)`;
  const out: HTMLElement[] = [];
  for (let i = start; i < end; i++) {
    const c = classFromResidue(map, BigInt(residues[i]!), depth);
    const div = document.createElement("div");
    div.className = i === hit ? "vlist-row hit" : "vlist-row";
    div.setAttribute("role", "row");
    div.setAttribute("aria-rowindex", String(i + 1));
    for (const text of [String(i + 1), String(c.residue), String(c.odd), String(c.image), affineText(map.q, c.odd, c.image)]) {
      const s = document.createElement("span");
      s.setAttribute("role", "gridcell");
      s.textContent = text;
      div.append(s);
    }
    out.push(div);
  }
  rows.replaceChildren(...out);
}

/** Draws the visible rows again (when the view becomes visible or its size changes). */
export function refreshTable(): void {
  render();
}

export function showTable(t: ClassTable | null): void {
  current = t;
  hit = -1;
  const list = $("table-list");
  const spacer = list.querySelector<HTMLElement>(".vlist-spacer")!;
  const n = t?.residues.length ?? 0;
  spacer.style.height = `${Math.min(n * ROW, MAX_SCROLL)}px`;
  list.setAttribute("aria-rowcount", String(n));
  list.scrollTop = 0;
  $("table-caption").textContent = t
    ? `${n.toLocaleString("en-US")} surviving classes of ${t.map.name} mod 2^${t.depth}, ascending by residue.`
    : "Run a sieve (survivors mode) to fill the class table.";
  for (const id of ["export-raw", "export-csv", "export-arrow"]) ($(id) as HTMLButtonElement).disabled = !t;
  render();
}

function lowerBound(xs: Uint32Array, v: number): number {
  let lo = 0,
    hi = xs.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (xs[mid]! < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

async function exportTable(format: "raw" | "csv" | "arrow"): Promise<void> {
  const t = current;
  const msg = $("export-message");
  if (!t) return;
  const name = `survivors-${t.map.name}-${t.depth}`;
  if (format !== "raw" && t.residues.length > CSV_ROW_GUARD) {
    msg.textContent =
      `${t.residues.length.toLocaleString("en-US")} rows is over the ` +
      `${CSV_ROW_GUARD.toLocaleString("en-US")}-row guard for ${format.toUpperCase()}: export raw instead.`;
    msg.className = "message bad";
    return;
  }
  msg.className = "message";
  msg.textContent = `Preparing the ${format} export...`;
  try {
    if (format === "raw") {
      const bytes = new Uint8Array(t.residues.buffer as ArrayBuffer, t.residues.byteOffset, t.residues.byteLength);
      const manifest = tableManifest(
        t.map,
        t.depth,
        BigInt(t.residues.length),
        "raw",
        { file: `${name}.u32`, bytes: BigInt(bytes.byteLength), sha256: await sha256(bytes) },
        { version: pkg.version, kernelBuild: await kernelBuildId() },
      );
      download(`${name}.u32`, [bytes], "application/octet-stream");
      download(`${name}.u32.json`, [toExactJson(manifest, 2) + "\n"], "application/json");
    } else {
      const residues = t.residues.slice();
      const bytes = await withExportWorker((api) => api.exportTable({ q: t.map.q, r: t.map.r, depth: t.depth, format, residues }));
      download(
        `${name}.${format === "csv" ? "csv" : "arrow"}`,
        [bytes as Uint8Array<ArrayBuffer>],
        format === "csv" ? "text/csv" : "application/vnd.apache.arrow.file",
      );
    }
    msg.textContent = `Exported ${name} (${format}).`;
  } catch (e) {
    msg.className = "message bad";
    msg.textContent = `Export failed: ${(e as Error).message}`;
  }
}

export function setupTable(): void {
  const list = $("table-list");
  list.addEventListener("scroll", () => requestAnimationFrame(render), { passive: true });
  list.addEventListener("keydown", (e) => {
    const step = { ArrowDown: 1, ArrowUp: -1, PageDown: visibleRows(), PageUp: -visibleRows() }[e.key];
    if (step && current) {
      e.preventDefault();
      scrollToRow(Math.max(0, Math.min(current.residues.length - 1, firstRow() + step)));
    }
  });
  $("table-search").addEventListener("change", () => {
    const v = ($("table-search") as HTMLInputElement).value.trim();
    if (!current) return;
    if (!/^\d+$/.test(v)) return fieldError("table-search", "a residue is a whole number");
    const a = Number(v);
    if (a >= 2 ** current.depth) return fieldError("table-search", `a residue mod 2^${current.depth} is below ${2 ** current.depth}`);
    fieldError("table-search", "");
    const i = lowerBound(current.residues, a);
    hit = i < current.residues.length ? i : current.residues.length - 1;
    $("table-search-error").textContent = current.residues[hit] === a ? "" : `${a} is not a survivor; showing the next one`;
    scrollToRow(hit);
  });
  $("table-jump").addEventListener("change", () => {
    const v = ($("table-jump") as HTMLInputElement).value.trim();
    if (!current) return;
    const i = Number(v);
    if (!/^\d+$/.test(v) || i < 1 || i > current.residues.length)
      return fieldError("table-jump", `a row from 1 to ${current.residues.length}`);
    fieldError("table-jump", "");
    hit = i - 1;
    scrollToRow(hit);
  });
  $("export-raw").addEventListener("click", () => void exportTable("raw"));
  $("export-csv").addEventListener("click", () => void exportTable("csv"));
  $("export-arrow").addEventListener("click", () => void exportTable("arrow"));
  showTable(null);
}
