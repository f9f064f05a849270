// The Inverse tree view: N, map, depth and convention to the level table, the nodes per level against
// the heuristic growth, and a drawing of the tree's top levels (one row per depth, nodes ordered by
// value, coloured by residue mod 3 in the scheme's palette, style.css), with zoom; a click or a tap
// near a node opens it in the Inspector. From the keyboard the drawing is one Tab stop: arrow keys
// move along a row and between a node and its parent or children, Enter opens the node.
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
/** A tap or click this many screen pixels from a node's centre still opens it (a 24 px target). */
const TAP_RADIUS = 12;
/** Labels: font size and gap to the node in screen pixels, and the width of a digit (em, a little above the system fonts'). */
const LABEL_PX = 13;
const LABEL_GAP = 8;
const DIGIT_EM = 0.62;

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

/** The drawing's nodes: rows by depth (ascending), each node's place, parent, children and circle. */
interface Drawn {
  readonly rows: bigint[][];
  readonly at: Map<bigint, readonly [x: number, y: number, depth: number, index: number]>;
  readonly parent: Map<bigint, bigint>;
  readonly children: Map<bigint, bigint[]>;
  readonly circle: Map<bigint, SVGCircleElement>;
}
let drawn: Drawn | null = null;
/** The node that holds the drawing's one Tab stop. */
let current: bigint | null = null;

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
  const children = new Map<bigint, bigint[]>();
  for (const e of treeEdges(r.map, r.steps, r.n, depth)) {
    if (!rows[e.depth]) rows[e.depth] = [];
    rows[e.depth]!.push(e.node);
    if (e.parent !== null) {
      parent.set(e.node, e.parent);
      children.set(e.parent, [...(children.get(e.parent) ?? []), e.node]);
    }
  }
  // rows spread over the drawing's own shape (in units where its width is WIDTH); node size from the widest row
  svg.style.height = ""; // the stylesheet's height while the rows are laid out
  const box = svg.getBoundingClientRect();
  const height = box.width > 0 ? (WIDTH * box.height) / box.width : WIDTH / 2;
  const unit = box.width > 0 ? WIDTH / box.width : 1; // user units per screen pixel
  const ROW = Math.min(60, (height - 40) / Math.max(1, depth));
  const radius = Math.max(1.2, Math.min(5, (0.35 * WIDTH) / Math.max(...rows.map((row) => row.length))));
  const at = new Map<bigint, readonly [number, number, number, number]>();
  rows.forEach((row, j) => {
    row.forEach((n, i) => {
      at.set(n, [((i + 0.5) / row.length) * WIDTH, j * ROW + 20, j, i]);
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
  const circle = new Map<bigint, SVGCircleElement>();
  const labelWidth = (n: bigint) => String(n).length * DIGIT_EM * LABEL_PX * unit;
  let right = WIDTH; // the right end of the widest label, in user units
  for (const [n, [x, y, j, i]] of at) {
    const p = parent.get(n);
    if (p !== undefined) {
      const [px, py] = at.get(p)!;
      edges.append(make("line", { class: "edge", x1: x, y1: y, x2: px, y2: py }));
    }
    // one Tab stop for the whole drawing: the root's, until the arrow keys move it (roving tabindex)
    const c = make("circle", {
      class: `node r${((n % 3n) + 3n) % 3n}`,
      cx: x,
      cy: y,
      r: radius,
      "data-n": String(n),
      tabindex: j === 0 ? 0 : -1,
      role: "button",
      "aria-label": `${n}, depth ${j}: open in the Inspector`,
    }) as SVGCircleElement;
    const title = document.createElementNS(ns, "title");
    title.textContent = `${n} (depth ${j}, ${n % 3n} mod 3)`;
    c.append(title);
    nodes.append(c);
    circle.set(n, c);
    // a label (about 12 px on screen whatever the drawing's width) where it ends before the next node of its row
    const row = rows[j]!;
    const room = i + 1 < row.length ? at.get(row[i + 1]!)![0] - x : Number.POSITIVE_INFINITY;
    const end = LABEL_GAP * unit + labelWidth(n);
    if (row.length <= 16 && end + 4 * unit <= room) {
      const t = make("text", { x: x + LABEL_GAP * unit, y: y + 4 * unit, "font-size": LABEL_PX * unit });
      t.textContent = String(n);
      nodes.append(t);
      right = Math.max(right, x + end);
    }
  }
  const ring = make("circle", { class: "focus-ring", r: 0, visibility: "hidden" });
  svg.replaceChildren(edges, nodes, ring);
  drawnMap = r.map;
  drawn = { rows, at, parent, children, circle };
  current = r.n;
  // the whole tree and every label: the last label of a row may end past WIDTH
  whole = { x: -10, y: 0, w: right + 20, h: Math.max(height, depth * ROW + 40) };
  // a shallow tree: the drawing as tall as its rows, not an empty box below them
  const content = ((depth * ROW + 40) * box.width) / whole.w;
  if (box.width > 0 && content < box.height) {
    svg.style.height = `${Math.ceil(content)}px`;
    whole = { ...whole, h: depth * ROW + 40 };
  }
  setView(whole);
  $("tree-drawing-caption").textContent =
    `The tree of ${r.n} to depth ${depth} (${group(count)} nodes): one row per depth, nodes ordered by value, coloured by ` +
    "residue mod 3 (0 vermillion, 1 blue, 2 green)" +
    (depth < r.depth ? `; the drawing stops at depth ${depth} to stay within ${group(DRAW_NODES)} nodes` : "");
}

/** User units per screen pixel at the present zoom (the viewBox is scaled alike in x and y). */
function unitNow(): number {
  const scale = ($("tree-drawing") as unknown as SVGSVGElement).getScreenCTM()?.a ?? 0;
  return scale > 0 ? 1 / scale : 1;
}

/** The focus ring around the keyboard's node, about TAP_RADIUS px on screen; hidden when the focus is elsewhere. */
function placeRing(): void {
  const ring = document.querySelector<SVGCircleElement>("#tree-drawing .focus-ring");
  if (!ring || !drawn || current === null) return;
  const c = drawn.circle.get(current);
  const focused = c !== undefined && document.activeElement === c;
  ring.setAttribute("visibility", focused ? "visible" : "hidden");
  if (!focused) return;
  const [x, y] = drawn.at.get(current)!;
  ring.setAttribute("cx", String(x));
  ring.setAttribute("cy", String(y));
  ring.setAttribute("r", String(Math.max(Number(c.getAttribute("r")) + 2 * unitNow(), (TAP_RADIUS - 4) * unitNow())));
}

/** Moves the drawing's Tab stop and the focus to node `n`, panning the view to it if it is out of sight. */
function focusNode(n: bigint): void {
  if (!drawn) return;
  const c = drawn.circle.get(n);
  if (!c) return;
  if (current !== null) drawn.circle.get(current)?.setAttribute("tabindex", "-1");
  c.setAttribute("tabindex", "0");
  current = n;
  const [x, y] = drawn.at.get(n)!;
  if (x < view.x || x > view.x + view.w || y < view.y || y > view.y + view.h) setView({ ...view, x: x - view.w / 2, y: y - view.h / 2 });
  c.focus();
  placeRing();
}

/** The node an arrow key leads to from `n`: along its row, up to its parent, down to its first child (or the nearest node below). */
function neighbour(n: bigint, key: string): bigint | null {
  if (!drawn) return null;
  const [x, , j, i] = drawn.at.get(n)!;
  const row = drawn.rows[j]!;
  switch (key) {
    case "ArrowLeft":
      return row[i - 1] ?? null;
    case "ArrowRight":
      return row[i + 1] ?? null;
    case "Home":
      return row[0]!;
    case "End":
      return row[row.length - 1]!;
    case "ArrowUp":
      return drawn.parent.get(n) ?? null;
    case "ArrowDown": {
      const own = drawn.children.get(n);
      if (own?.length) return own[0]!;
      const below = drawn.rows[j + 1];
      if (!below) return null;
      let best = below[0]!;
      for (const m of below) if (Math.abs(drawn.at.get(m)![0] - x) < Math.abs(drawn.at.get(best)![0] - x)) best = m;
      return best;
    }
    default:
      return null;
  }
}

/** The node nearest the drawing's point (x, y) within TAP_RADIUS screen pixels, if any. */
function nodeNear(x: number, y: number): bigint | null {
  if (!drawn) return null;
  const reach = TAP_RADIUS * unitNow();
  let best: bigint | null = null;
  let bestD = reach * reach;
  for (const [n, [nx, ny]] of drawn.at) {
    const d = (nx - x) ** 2 + (ny - y) ** 2;
    if (d <= bestD) {
      bestD = d;
      best = n;
    }
  }
  return best;
}

function setView(v: typeof view): void {
  view = v;
  ($("tree-drawing") as unknown as SVGSVGElement).setAttribute("viewBox", `${v.x} ${v.y} ${v.w} ${v.h}`);
  placeRing();
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
  // the page's point in the drawing's units, through the drawing's own transform (the viewBox may not fill the box)
  const toDrawing = (e: { clientX: number; clientY: number }) => {
    const p = new DOMPoint(e.clientX, e.clientY).matrixTransform(svg.getScreenCTM()?.inverse());
    return [p.x, p.y] as const;
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
  // a press on the drawing starts a drag; one that has not moved is a tap or click, which opens the nearest node
  let drag: { x: number; y: number; view: typeof view; moved: boolean } | null = null;
  let lastDrag = { moved: false };
  svg.addEventListener("pointerdown", (e) => {
    drag = { x: e.clientX, y: e.clientY, view, moved: false };
    lastDrag = drag;
    svg.setPointerCapture(e.pointerId);
  });
  svg.addEventListener("pointermove", (e) => {
    if (!drag) return;
    if (Math.hypot(e.clientX - drag.x, e.clientY - drag.y) > 6) drag.moved = true;
    if (!drag.moved) return;
    const unit = (unitNow() * drag.view.w) / view.w; // at the zoom the drag started from
    const dx = (e.clientX - drag.x) * unit;
    const dy = (e.clientY - drag.y) * unit;
    setView({ ...drag.view, x: drag.view.x - dx, y: drag.view.y - dy });
  });
  svg.addEventListener("pointerup", () => {
    drag = null;
  });
  const openAt = (n: bigint | null) => {
    if (n !== null && drawnMap) openNode(n, drawnMap);
  };
  svg.addEventListener("click", (e) => {
    if (lastDrag.moved) return;
    const own = (e.target as Element).getAttribute("data-n");
    openAt(own !== null ? BigInt(own) : nodeNear(...toDrawing(e)));
  });
  svg.addEventListener("keydown", (e) => {
    const own = (e.target as Element).getAttribute("data-n");
    if (own === null) return;
    if (e.key === "Enter" || e.key === " ") {
      e.preventDefault();
      openAt(BigInt(own));
      return;
    }
    const to = neighbour(BigInt(own), e.key);
    if (to === null && !e.key.startsWith("Arrow") && e.key !== "Home" && e.key !== "End") return;
    e.preventDefault(); // arrows move within the drawing, never the page
    if (to !== null) focusNode(to);
  });
  // a node focused by a click or programmatically takes the Tab stop; the ring follows the focus
  svg.addEventListener("focusin", (e) => {
    const own = (e.target as Element).getAttribute("data-n");
    if (own !== null && BigInt(own) !== current) focusNode(BigInt(own));
    else placeRing();
  });
  svg.addEventListener("focusout", () => requestAnimationFrame(placeRing));
  $("tree-zoom-in").addEventListener("click", () => zoom(0.8));
  $("tree-zoom-out").addEventListener("click", () => zoom(1.25));
  $("tree-zoom-reset").addEventListener("click", () => setView(whole));
}
