// The class table: every survivor in a virtualised list (tens of millions of rows: the scroll
// range is scaled so that it stays within what browsers can lay out), search by residue, jump to a
// row, and exports made off the page's thread.
import { group } from "../../src/outputs/format.js";
import type { CollatzMap } from "../../src/core/map.js";
import { classFromResidue, firstDescent, MAX_INSPECT_STEPS } from "../../src/core/padic.js";
import { CSV_ROW_GUARD } from "../../src/outputs/tables.js";
import { tableManifest } from "../../src/outputs/manifest.js";
import { toExactJson } from "../../src/core/json.js";
import { affineText } from "../../src/outputs/card.js";
import { kernelBuildId, sha256, withExportWorker } from "../engine.js";
import pkg from "../../package.json";
import { $, download, parseField } from "../dom.js";
import { parseCount } from "../../src/core/parse.js";

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
/** The first row shown and the keyboard's row: the table's own state (the scroll position follows them). */
let top = 0;
let cursor = 0;
/** The scrollTop this code set last: a scroll event there is ours, any other is the user's. */
let ownScroll = -1;
let openRow: (t: ClassTable, row: number) => void = () => {};

function visibleRows(): number {
  return Math.max(1, Math.floor($("table-list").clientHeight / ROW));
}

function lastTop(): number {
  return Math.max(0, (current?.residues.length ?? 0) - visibleRows());
}

/** The scroll range's pixels per row position (scaled when the full height would be too tall). */
function scrollRange(): { height: number; range: number } {
  const n = current?.residues.length ?? 0;
  const height = Math.min(n * ROW, MAX_SCROLL);
  return { height, range: Math.max(0, height - $("table-list").clientHeight) };
}

/** Shows rows from `row` on; the scroll bar follows (exactly one row per step, whatever the scale). */
function setTop(row: number): void {
  top = Math.max(0, Math.min(lastTop(), row));
  const list = $("table-list");
  const { range } = scrollRange();
  const last = lastTop();
  list.scrollTop = last === 0 ? 0 : Math.round((top / last) * range);
  ownScroll = list.scrollTop;
  render();
}

/** Moves the keyboard's row to `row`, scrolling only as far as needed to show it. */
function moveCursor(row: number): void {
  if (!current) return;
  cursor = Math.max(0, Math.min(current.residues.length - 1, row));
  if (cursor < top) setTop(cursor);
  else if (cursor >= top + visibleRows()) setTop(cursor - visibleRows() + 1);
  else render();
}

/** The user moved the scroll bar (or the page scrolled the list): the rows follow it. */
function onScroll(): void {
  const list = $("table-list");
  if (Math.abs(list.scrollTop - ownScroll) < 1) return;
  const { range } = scrollRange();
  top = range === 0 ? 0 : Math.round((list.scrollTop / range) * lastTop());
  ownScroll = list.scrollTop;
  render();
}

function render(): void {
  const list = $("table-list");
  const rows = list.querySelector<HTMLElement>(".vlist-rows")!;
  if (!current) {
    rows.replaceChildren();
    list.removeAttribute("aria-activedescendant");
    return;
  }
  const { map, depth, residues } = current;
  const end = Math.min(residues.length, top + visibleRows() + 1);
  rows.style.transform = `translateY(${list.scrollTop}px)`;
  const out: HTMLElement[] = [];
  for (let i = top; i < end; i++) {
    const c = classFromResidue(map, BigInt(residues[i]!), depth);
    const descent = c.residue > 0n ? firstDescent(map, c.residue, MAX_INSPECT_STEPS) : null;
    const div = document.createElement("div");
    div.className = `vlist-row${i === hit ? " hit" : ""}${i === cursor ? " cursor" : ""}`;
    div.id = `table-row-${i}`;
    div.dataset.row = String(i);
    div.setAttribute("role", "row");
    div.setAttribute("aria-rowindex", String(i + 2)); // the header is row 1
    if (i === cursor) div.setAttribute("aria-selected", "true");
    const cells = [
      group(i + 1),
      group(c.residue),
      c.word,
      String(c.odd),
      group(c.image),
      descent === null ? "–" : String(descent),
      affineText(map.q, c.odd, c.image),
    ];
    for (const text of cells) {
      const s = document.createElement("span");
      s.setAttribute("role", "gridcell");
      s.textContent = text;
      div.append(s);
    }
    out.push(div);
  }
  rows.replaceChildren(...out);
  if (cursor >= top && cursor < end) list.setAttribute("aria-activedescendant", `table-row-${cursor}`);
  else list.removeAttribute("aria-activedescendant");
}

/** Draws the visible rows again (when the view becomes visible or its size changes). */
export function refreshTable(): void {
  if (current) setTop(top);
}

export function showTable(t: ClassTable | null): void {
  current = t;
  hit = -1;
  top = 0;
  cursor = 0;
  const list = $("table-list");
  const spacer = list.querySelector<HTMLElement>(".vlist-spacer")!;
  const n = t?.residues.length ?? 0;
  spacer.style.height = `${Math.min(n * ROW, MAX_SCROLL)}px`;
  $("table-grid").setAttribute("aria-rowcount", String(n + 1));
  list.scrollTop = 0;
  ownScroll = 0;
  $("table-caption").textContent = t
    ? `${n.toLocaleString("en-US")} surviving classes of ${t.map.name} mod 2^${t.depth}, ascending by residue.`
    : "Run a sieve (survivors mode) to fill the class table.";
  $<HTMLButtonElement>("export-raw").disabled = !t;
  const guarded = n > CSV_ROW_GUARD;
  for (const id of ["export-csv", "export-arrow"]) {
    const b = $<HTMLButtonElement>(id);
    b.disabled = !t || guarded;
    b.title = guarded ? `over the ${CSV_ROW_GUARD.toLocaleString("en-US")}-row guard: export raw` : "";
  }
  const msg = $("export-message");
  msg.className = "message";
  msg.textContent = guarded
    ? `CSV and Arrow are off for ${n.toLocaleString("en-US")} rows (over the ${CSV_ROW_GUARD.toLocaleString("en-US")}-row guard): ` +
      "export raw + manifest, or run a smaller depth."
    : "";
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
    const tool = { version: pkg.version, kernelBuild: await kernelBuildId() };
    const residues = t.residues.slice();
    const bytes =
      format === "raw"
        ? new Uint8Array(t.residues.buffer as ArrayBuffer, t.residues.byteOffset, t.residues.byteLength)
        : ((await withExportWorker((api) =>
            api.exportTable({ q: t.map.q, r: t.map.r, depth: t.depth, format, residues, tool }),
          )) as Uint8Array<ArrayBuffer>);
    // every format with its manifest (map, depth, rows, sha256, tool): a CSV has no place of its own for them
    const file = `${name}.${format === "raw" ? "u32" : format}`;
    const manifest = tableManifest(
      t.map,
      t.depth,
      BigInt(t.residues.length),
      format,
      { file, bytes: BigInt(bytes.byteLength), sha256: await sha256(bytes) },
      tool,
    );
    download(file, [bytes], { raw: "application/octet-stream", csv: "text/csv", arrow: "application/vnd.apache.arrow.file" }[format]);
    download(`${file}.json`, [toExactJson(manifest, 2) + "\n"], "application/json");
    msg.textContent = `Exported ${name} (${format}).`;
  } catch (e) {
    msg.className = "message bad";
    msg.textContent = `Export failed: ${(e as Error).message}`;
  }
}

/** Wires the list; `open` shows the class of a row in the Inspector. */
export function setupTable(open: (t: ClassTable, row: number) => void): void {
  openRow = open;
  const list = $("table-list");
  list.addEventListener("scroll", onScroll, { passive: true });
  list.addEventListener(
    "wheel",
    (e) => {
      if (!current || e.deltaY === 0) return;
      e.preventDefault();
      // a few rows a notch: lines as they come, pixels at about 33 per row (a notch is about 100)
      const rows = e.deltaMode === 1 ? e.deltaY : e.deltaMode === 2 ? e.deltaY * visibleRows() : e.deltaY / 33;
      setTop(top + (rows > 0 ? Math.max(1, Math.round(rows)) : Math.min(-1, Math.round(rows))));
    },
    { passive: false },
  );
  list.addEventListener("keydown", (e) => {
    if (!current) return;
    const page = visibleRows();
    const n = current.residues.length;
    const to: Record<string, number> = {
      ArrowDown: cursor + 1,
      ArrowUp: cursor - 1,
      PageDown: cursor + page,
      PageUp: cursor - page,
      Home: 0,
      End: n - 1,
    };
    if (e.key in to) {
      e.preventDefault();
      moveCursor(to[e.key]!);
    } else if (e.key === "Enter") {
      e.preventDefault();
      openRow(current, cursor);
    }
  });
  list.addEventListener("click", (e) => {
    const row = (e.target as HTMLElement).closest<HTMLElement>(".vlist-row");
    if (!row || !current) return;
    cursor = Number(row.dataset.row);
    render();
    openRow(current, cursor);
  });
  $("table-search").addEventListener("change", () => {
    const v = $<HTMLInputElement>("table-search").value.trim();
    const table = current;
    if (!table) return;
    const a = parseField("table-search", (t) => parseCount(`a residue mod 2^${table.depth}`, t, 0, 2 ** table.depth - 1), v);
    if (a === null) return;
    const i = lowerBound(table.residues, a);
    hit = i < table.residues.length ? i : table.residues.length - 1;
    $("table-search-error").textContent = table.residues[hit] === a ? "" : `${a} is not a survivor; showing the next one`;
    moveCursor(hit);
  });
  $("table-jump").addEventListener("change", () => {
    const v = $<HTMLInputElement>("table-jump").value.trim();
    const table = current;
    if (!table) return;
    const i = parseField("table-jump", (t) => parseCount("the row", t, 1, table.residues.length), v);
    if (i === null) return;
    hit = i - 1;
    moveCursor(hit);
  });
  $("export-raw").addEventListener("click", () => void exportTable("raw"));
  $("export-csv").addEventListener("click", () => void exportTable("csv"));
  $("export-arrow").addEventListener("click", () => void exportTable("arrow"));
  showTable(null);
}
