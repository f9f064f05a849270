// The Inverse tree view: N, map, depth and convention to the level table, the nodes per level against
// the heuristic growth, and a drawing of the tree's top levels (one row per depth, nodes ordered by
// value, coloured by residue mod 3), with zoom; a click on a node opens it in the Inspector.
import { parseMap } from "../../src/core/map.js";
import type { CollatzMap } from "../../src/core/map.js";
import { checkTree, heuristicGrowth, MAX_TREE_DEPTH, runTree, treeEdges } from "../../src/jobs/tree/tree.js";
import type { StepConvention, TreeParams, TreeResult } from "../../src/jobs/tree/tree.js";
import { parseCount, parseWhole } from "../../src/core/parse.js";
import { group } from "../../src/outputs/format.js";
import { toExactJson } from "../../src/core/json.js";
import { growth, treeJson } from "../../src/outputs/summary.js";
import { RunController } from "../controller.js";
import { $, fieldError, parseField, ResultsPanel } from "../dom.js";
import { pagePoolPending, withPagePool } from "../engine.js";
import { drawTreeLevels } from "./charts.js";
import { offerTreeExports } from "../export.js";

/** The drawing shows depths up to this, and stops at the depth where it would pass DRAW_NODES. */
const DRAW_DEPTH = 20;
const DRAW_NODES = 3000;
const WIDTH = 1000;
/** Okabe-Ito colours for residues 0, 1, 2 mod 3. */
const BY_RESIDUE = ["#D55E00", "#0072B2", "#009E73"];
/** The dark scheme's node colours: lighter, each at least 4.5:1 on the dark panel. */
const BY_RESIDUE_DARK = ["#FF8C42", "#56B4E9", "#3FCF9F"];

const panel = new ResultsPanel("tree-results", "tree-stale", "tree-form");
const controller = new RunController({
  start: "tree-go",
  cancel: "tree-cancel",
  progress: "tree-progress",
  status: "tree-status",
  message: "tree-message",
  results: panel,
});
let openNode: (n: bigint, map: CollatzMap) => void = () => {};
/** The map of the tree on screen: a node opens under it, whatever the Map field holds now. */
let drawnMap: CollatzMap | null = null;
let view = { x: 0, y: 0, w: WIDTH, h: 400 };
let whole = { ...view };

/** Reads and checks the form; errors appear beside the fields and nothing runs. */
function readTreeForm(): TreeParams | null {
  const map = parseField("tree-map", parseMap);
  const n = parseField("tree-n", (t) => parseWhole("N", t));
  const depth = parseField("tree-depth", (t) => parseCount("depth", t, 0, MAX_TREE_DEPTH));
  const steps: StepConvention = $<HTMLSelectElement>("tree-steps").value === "standard" ? "standard" : "T";
  if (!map || n === null || depth === null) return null;
  const params = { map, n, depth, steps, below: null };
  try {
    checkTree(params);
  } catch (e) {
    fieldError("tree-n", (e as Error).message);
    return null;
  }
  return params;
}

function renderLevels(r: TreeResult): void {
  const g = heuristicGrowth(r.map.q, r.steps);
  const head = ["depth", "nodes", "growth", "odd pred", "≡ 0 mod q", "least", "largest", `below ${r.n}`];
  const body = r.levels
    .map(
      (l, j) =>
        `<tr><td>${l.depth}</td><td>${group(l.nodes)}</td><td>${j === 0 ? "" : (growth(l.nodes, r.levels[j - 1]!.nodes)?.toFixed(4) ?? "")}</td>` +
        `<td>${group(l.withOdd)}</td><td>${group(l.zeroModQ)}</td><td>${l.min === null ? "" : group(l.min)}</td><td>${l.max === null ? "" : group(l.max)}</td><td>${group(l.belowN)}</td></tr>`,
    )
    .join("");
  // the note above the table's box, where it wraps at any width (a caption is as wide as its table)
  $("tree-levels-note").textContent = `Heuristic growth ${g.toFixed(4)} a level; ${group(r.total)} predecessors within depth ${r.depth}.`;
  $("tree-levels").innerHTML = `<thead><tr>${head.map((h) => `<th>${h}</th>`).join("")}</tr></thead><tbody>${body}</tbody>`;
  drawTreeLevels(
    r.levels.map((l) => l.nodes),
    g,
  );
}

/** The top of the tree: rows by depth, nodes by value, edges to the parent. */
function renderDrawing(r: TreeResult): void {
  const svg = $("tree-drawing") as unknown as SVGSVGElement;
  let depth = 0;
  let count = 0;
  for (const l of r.levels.slice(0, DRAW_DEPTH + 1)) {
    if (count + Number(l.nodes) > DRAW_NODES) break;
    count += Number(l.nodes);
    depth = l.depth;
  }
  const rows: bigint[][] = [];
  const parent = new Map<bigint, bigint>();
  for (const e of treeEdges(r.map, r.steps, r.n, depth)) {
    if (!rows[e.depth]) rows[e.depth] = [];
    rows[e.depth]!.push(e.node);
    if (e.parent !== null) parent.set(e.node, e.parent);
  }
  // rows spread over the drawing's own shape (in units where its width is WIDTH); node size from the widest row
  const box = svg.getBoundingClientRect();
  const height = box.width > 0 ? (WIDTH * box.height) / box.width : WIDTH / 2;
  const unit = box.width > 0 ? WIDTH / box.width : 1; // user units per screen pixel
  const ROW = Math.min(60, (height - 40) / Math.max(1, depth));
  const radius = Math.max(1.2, Math.min(5, (0.35 * WIDTH) / Math.max(...rows.map((row) => row.length))));
  const at = new Map<bigint, [x: number, y: number, depth: number]>();
  rows.forEach((row, j) => {
    row.forEach((n, i) => {
      at.set(n, [((i + 0.5) / row.length) * WIDTH, j * ROW + 20, j]);
    });
  });
  const ns = "http://www.w3.org/2000/svg";
  const make = (tag: string, attrs: Record<string, string | number>) => {
    const el = document.createElementNS(ns, tag);
    for (const [k, v] of Object.entries(attrs)) el.setAttribute(k, String(v));
    return el;
  };
  const edges = make("g", {});
  const nodes = make("g", {});
  for (const [n, [x, y, j]] of at) {
    const p = parent.get(n);
    if (p !== undefined) {
      const [px, py] = at.get(p)!;
      edges.append(make("line", { class: "edge", x1: x, y1: y, x2: px, y2: py }));
    }
    const c = make("circle", {
      class: "node",
      cx: x,
      cy: y,
      r: radius,
      fill: (matchMedia("(prefers-color-scheme: dark)").matches ? BY_RESIDUE_DARK : BY_RESIDUE)[Number(n % 3n)]!,
      "data-n": String(n),
      tabindex: 0,
      role: "button",
      "aria-label": `${n}, depth ${j}: open in the Inspector`,
    });
    const title = document.createElementNS(ns, "title");
    title.textContent = `${n} (depth ${j}, ${n % 3n} mod 3)`;
    c.append(title);
    nodes.append(c);
    if (rows[j]!.length <= 16) {
      // labels of about 12 px on screen whatever the drawing's width (the viewBox scales user units)
      const t = make("text", { x: x + 8 * unit, y: y + 4 * unit, "font-size": 13 * unit });
      t.textContent = String(n);
      nodes.append(t);
    }
  }
  svg.replaceChildren(edges, nodes);
  drawnMap = r.map;
  whole = { x: -10, y: 0, w: WIDTH + 20, h: Math.max(height, depth * ROW + 40) };
  setView(whole);
  $("tree-drawing-caption").textContent =
    `The tree of ${r.n} to depth ${depth} (${group(count)} nodes): one row per depth, nodes ordered by value, coloured by ` +
    "residue mod 3 (0 vermillion, 1 blue, 2 green)" +
    (depth < r.depth ? `; the drawing stops at depth ${depth} to stay within ${group(DRAW_NODES)} nodes` : "");
}

function setView(v: typeof view): void {
  view = v;
  ($("tree-drawing") as unknown as SVGSVGElement).setAttribute("viewBox", `${v.x} ${v.y} ${v.w} ${v.h}`);
}

/** Zooms by `factor` about the drawing's point (cx, cy). */
function zoom(factor: number, cx = view.x + view.w / 2, cy = view.y + view.h / 2): void {
  const w = Math.min(whole.w * 2, Math.max(20, view.w * factor));
  const h = (view.h * w) / view.w;
  setView({ x: cx - ((cx - view.x) * w) / view.w, y: cy - ((cy - view.y) * h) / view.h, w, h });
}

/** Runs the form's tree; returns false (errors beside the fields, old results marked stale) when it is not valid. */
export async function startTree(workers: number): Promise<boolean> {
  const params = readTreeForm();
  if (!params) {
    panel.markStale("the inputs above are not valid");
    return false;
  }
  $("run-summary").textContent = "";
  const waiting = pagePoolPending() > 0 ? "Waiting for the job already running..." : "Starting workers...";
  const out = await controller.run((options) => withPagePool(workers, (pool) => runTree(pool, params, options), options.signal), waiting);
  if (!out.ok) return true;
  const r = out.value;
  panel.shown(`${r.n} under ${r.map.name}, depth ${r.depth}, ${r.steps === "T" ? "steps of T" : "standard steps"}`);
  controller.say(
    `${group(r.total)} predecessors of ${r.n} within depth ${r.depth} (${r.engine === "kernel" ? "kernel" : "BigInt"}, ${r.seconds.toFixed(2)} s).`,
  );
  renderLevels(r);
  renderDrawing(r);
  $("run-summary").textContent = toExactJson({ tree: treeJson(r) });
  offerTreeExports(r);
  return true;
}

export function cancelTree(): void {
  controller.cancel();
}

/** Wires the drawing: wheel zoom, drag, the buttons, and clicks on nodes (`open`). */
export function setupTree(open: (n: bigint, map: CollatzMap) => void): void {
  openNode = open;
  const svg = $("tree-drawing") as unknown as SVGSVGElement;
  const toDrawing = (e: { clientX: number; clientY: number }) => {
    const box = svg.getBoundingClientRect();
    return [view.x + ((e.clientX - box.left) / box.width) * view.w, view.y + ((e.clientY - box.top) / box.height) * view.h] as const;
  };
  svg.addEventListener(
    "wheel",
    (e) => {
      e.preventDefault();
      const [cx, cy] = toDrawing(e);
      zoom(e.deltaY > 0 ? 1.25 : 0.8, cx, cy);
    },
    { passive: false },
  );
  let drag: { x: number; y: number; view: typeof view } | null = null;
  svg.addEventListener("pointerdown", (e) => {
    if ((e.target as Element).classList.contains("node")) return;
    drag = { x: e.clientX, y: e.clientY, view };
    svg.setPointerCapture(e.pointerId);
  });
  svg.addEventListener("pointermove", (e) => {
    if (!drag) return;
    const box = svg.getBoundingClientRect();
    const dx = ((e.clientX - drag.x) / box.width) * drag.view.w;
    const dy = ((e.clientY - drag.y) / box.height) * drag.view.h;
    setView({ ...drag.view, x: drag.view.x - dx, y: drag.view.y - dy });
  });
  svg.addEventListener("pointerup", () => {
    drag = null;
  });
  const openAt = (target: EventTarget | null) => {
    const n = (target as Element | null)?.getAttribute("data-n");
    if (n !== null && n !== undefined && drawnMap) openNode(BigInt(n), drawnMap);
  };
  svg.addEventListener("click", (e) => openAt(e.target));
  svg.addEventListener("keydown", (e) => {
    if (e.key !== "Enter" && e.key !== " ") return;
    e.preventDefault();
    openAt(e.target);
  });
  $("tree-zoom-in").addEventListener("click", () => zoom(0.8));
  $("tree-zoom-out").addEventListener("click", () => zoom(1.25));
  $("tree-zoom-reset").addEventListener("click", () => setView(whole));
}
