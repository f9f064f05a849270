// Charts with Apache ECharts (canvas), in the Okabe-Ito palette. Numbers here are for drawing only:
// every count shown as text comes from the exact BigInt results.
import * as echarts from "echarts/core";
import { BarChart, HeatmapChart, LineChart, ScatterChart } from "echarts/charts";
import { GridComponent, LegendComponent, TooltipComponent, VisualMapComponent } from "echarts/components";
import { CanvasRenderer, SVGRenderer } from "echarts/renderers";
import type { Level } from "../../src/core/exact.js";
import { bothConventions } from "../../src/core/orbit.js";
import type { OrbitView } from "../../src/core/orbit.js";
import { group } from "../../src/outputs/format.js";
import { abbreviate } from "../../src/outputs/card.js";
import { download } from "../dom.js";

echarts.use([
  BarChart,
  HeatmapChart,
  LineChart,
  ScatterChart,
  GridComponent,
  LegendComponent,
  TooltipComponent,
  VisualMapComponent,
  CanvasRenderer,
  SVGRenderer,
]);

const PALETTE = ["#0072B2", "#E69F00", "#009E73", "#D55E00", "#CC79A7", "#56B4E9", "#F0E442"];
/** The dark scheme's order: sky blue first (the deep blue has 3.1:1 on the dark panel, sky blue 7:1). */
const PALETTE_DARK = ["#56B4E9", "#E69F00", "#009E73", "#D55E00", "#CC79A7", "#0072B2", "#F0E442"];
/** The palette of the scheme now in use. */
export const palette = () => (dark() ? PALETTE_DARK : PALETTE);
const charts = new Map<string, echarts.ECharts>();
/** Each chart's option builder, run again when the colour scheme changes (colours are read at build time). */
const builders = new Map<string, () => Record<string, unknown>>();
const scheme = matchMedia("(prefers-color-scheme: dark)");
scheme.addEventListener("change", () => {
  for (const [id, build] of builders) draw(id, build);
});

function dark(): boolean {
  return scheme.matches;
}

/** Draws chart `id` from `build`, now and again whenever the colour scheme changes; with its PNG and SVG buttons. */
function draw(id: string, build: () => Record<string, unknown>): void {
  builders.set(id, build);
  document.getElementById(id)!.dataset.scheme = dark() ? "dark" : "light"; // the scheme it was drawn for
  chart(id).setOption(build(), true);
  addTools(id);
}

declare global {
  interface Window {
    /** A chart's option as it is drawn, as JSON (functions left out): what the browser tests read back. */
    glidepathChartOption?: (id: string) => unknown;
  }
}
window.glidepathChartOption = (id) => {
  const c = charts.get(id);
  return c ? JSON.parse(JSON.stringify(c.getOption())) : null;
};

/**
 * A chart's file name: its own name and the parameters of the results it belongs to (the panel's
 * data-params: map, depth or range), e.g. glide-records-3x+1-1-1048576.
 */
export function chartFileName(id: string): string {
  const params = document.getElementById(id)!.closest<HTMLElement>("[data-params]")?.dataset.params ?? "";
  const slug = params
    .replace(/[^A-Za-z0-9+-]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .replace(/-+/g, "-");
  return `${id.replace(/^chart-/, "")}${slug ? `-${slug}` : ""}`;
}

/** The background a saved chart gets: its figure's panel colour, so that it reads as on screen. */
function background(id: string): string {
  const figure = document.getElementById(id)!.closest("figure");
  return figure ? getComputedStyle(figure).backgroundColor : dark() ? "#1b1e21" : "#ffffff";
}

/** The chart as a PNG file (twice the screen's pixels). */
export function chartPng(id: string): Uint8Array {
  const url = chart(id).getDataURL({ type: "png", pixelRatio: 2, backgroundColor: background(id) });
  return Uint8Array.from(atob(url.slice(url.indexOf(",") + 1)), (ch) => ch.charCodeAt(0));
}

/** The chart as an SVG document: the same option drawn again by ECharts's SVG renderer, at the size on screen. */
export function chartSvg(id: string): string {
  const el = document.getElementById(id)!;
  const holder = document.createElement("div");
  const width = Math.max(320, el.clientWidth),
    height = Math.max(200, el.clientHeight);
  const svg = echarts.init(holder, undefined, { renderer: "svg", width, height });
  try {
    svg.setOption({ ...builders.get(id)!(), backgroundColor: background(id) });
    return svg.renderToSVGString();
  } finally {
    svg.dispose();
  }
}

/** The PNG and SVG buttons of a chart, under its caption (made once). */
function addTools(id: string): void {
  const el = document.getElementById(id)!;
  const figure = el.closest("figure");
  if (!figure || figure.querySelector(`[data-chart-tools="${id}"]`)) return;
  const tools = document.createElement("div");
  tools.className = "chart-tools";
  tools.dataset.chartTools = id;
  tools.style.cssText = "display:flex;gap:6px;justify-content:flex-end;margin-top:4px";
  const what = el.getAttribute("aria-label") ?? "the chart";
  for (const format of ["png", "svg"] as const) {
    const b = document.createElement("button");
    b.type = "button";
    b.id = `${id}-${format}`;
    b.textContent = format.toUpperCase();
    b.setAttribute("aria-label", `Download the chart (${what}) as ${format.toUpperCase()}`);
    b.addEventListener("click", () => {
      const name = `${chartFileName(id)}.${format}`;
      if (format === "png") download(name, [chartPng(id) as Uint8Array<ArrayBuffer>], "image/png");
      else download(name, [chartSvg(id)], "image/svg+xml");
    });
    tools.append(b);
  }
  figure.append(tools);
}

function chart(id: string): echarts.ECharts {
  let c = charts.get(id);
  if (!c) {
    c = echarts.init(document.getElementById(id)!, undefined, { renderer: "canvas" });
    charts.set(id, c);
  }
  return c;
}

function base() {
  const fg = dark() ? "#e7e9ea" : "#1d1f21";
  const line = dark() ? "#3a3f44" : "#d6d8da";
  return {
    color: palette(),
    animation: false,
    textStyle: { color: fg },
    grid: { left: 56, right: 16, top: 28, bottom: 32 },
    tooltip: { trigger: "axis" as const, confine: true },
    axisStyle: { axisLine: { lineStyle: { color: line } }, splitLine: { lineStyle: { color: line } }, axisLabel: { color: fg } },
  };
}

function axis(type: "value" | "log" | "category", name: string, extra: object = {}) {
  const b = base().axisStyle;
  return { type, name, nameTextStyle: { color: base().textStyle.color }, ...b, ...extra };
}

/**
 * A depth axis from 0 to `last` whose labels never run together: a step of 1, 2, 5, 10, ... giving at
 * most 8 intervals, and the end labelled only where it falls on a step (depth 32 reads 0, 5, ..., 30
 * rather than 30 and 32 side by side).
 */
function depthAxis(name: string, last: number) {
  const max = Math.max(1, last);
  const step = [1, 2, 5, 10, 20, 25, 50, 100].find((s) => max / s <= 8) ?? 100;
  return axis("value", name, { min: 0, max, interval: step, axisLabel: { ...base().axisStyle.axisLabel, showMaxLabel: max % step === 0 } });
}

/** Survivor density against depth (log axis): the kernel's counts and the exact counter's. */
export function drawDensity(levels: readonly Level[], exact: readonly Level[]): void {
  const d = (l: Level) => [l.depth, Number(l.survivors) / 2 ** l.depth];
  draw("chart-density", () => ({
    ...base(),
    legend: { top: 0, textStyle: { color: base().textStyle.color } },
    xAxis: axis("value", "depth", { min: 0, minInterval: 1 }),
    yAxis: axis("log", "density"),
    series: [
      { name: "kernel", type: "scatter", symbolSize: 7, data: levels.map(d) },
      { name: "exact counter", type: "line", showSymbol: false, lineStyle: { type: "dashed" }, data: exact.map(d) },
    ],
  }));
}

/** Classes stopped at each depth: every depth on an even axis, a bar and a dot per nonzero count (a 1 shows as a dot). */
export function drawStopped(levels: readonly Level[]): void {
  const rows = levels.filter((l) => l.stopped > 0n).map((l) => [l.depth, Number(l.stopped)]);
  const last = levels.length - 1;
  draw("chart-stopped", () => ({
    ...base(),
    tooltip: {
      trigger: "item",
      confine: true,
      formatter: (p: { data: number[] }) => `depth ${p.data[0]}: ${p.data[1]!.toLocaleString("en-US")} stopped`,
    },
    xAxis: depthAxis("depth", last),
    yAxis: axis("log", "classes", { min: 1 }),
    series: [
      { type: "bar", data: rows, barMaxWidth: 14, itemStyle: { color: palette()[1] } },
      { type: "scatter", data: rows, symbolSize: 6, itemStyle: { color: PALETTE[3] } },
    ],
  }));
}

/** The (j, m) table of alive classes as a heat map (colour: log10 of the count). */
export function drawHeat(live: readonly bigint[][]): void {
  const data: [number, number, number, string][] = [];
  live.forEach((row, j) => {
    row.forEach((c, m) => {
      if (c > 0n) data.push([j, m, Math.log10(Number(c)), c.toString()]);
    });
  });
  const max = Math.max(1, ...data.map((x) => x[2]));
  const every = Math.max(1, Math.ceil(live.length / 12)); // at most about 12 labels an axis
  const biggest = data.reduce((s, x) => (BigInt(x[3]) > s ? BigInt(x[3]) : s), 1n);
  draw("chart-heat", () => ({
    ...base(),
    grid: { left: 56, right: 88, top: 30, bottom: 36 },
    tooltip: {
      trigger: "item",
      confine: true,
      formatter: (p: { data: [number, number, number, string] }) =>
        `depth j = ${p.data[0]}, odd steps m = ${p.data[1]}: ${p.data[3]} classes`,
    },
    xAxis: axis("category", "depth j", {
      data: live.map((_, j) => String(j)),
      axisLabel: { interval: every - 1, color: base().textStyle.color },
    }),
    yAxis: axis("category", "odd steps m", {
      data: live.map((_, m) => String(m)),
      axisLabel: { interval: every - 1, color: base().textStyle.color },
    }),
    visualMap: {
      min: 0,
      max,
      dimension: 2,
      calculable: false,
      orient: "vertical",
      right: 4,
      // at the top, so that its lower label stays clear of the x axis's name at every size
      top: 24,
      itemHeight: 110,
      itemWidth: 12,
      text: [biggest.toLocaleString("en-US"), "1 class"],
      textStyle: { color: base().textStyle.color },
      inRange: { color: ["#440154", "#3b528b", "#21918c", "#5ec962", "#fde725"] },
    }, // viridis, ordered in lightness; a log10 colour scale
    // in the dark scheme the darkest cells get a light edge, so that they do not vanish into the page
    series: [
      {
        type: "heatmap",
        data: data.map((x) => [x[0], x[1], x[2], x[3]]),
        itemStyle: dark() ? { borderColor: "#6b7278", borderWidth: 0.5 } : {},
      },
    ],
  }));
}

/** Census: vectors by log2 of their peak coefficient, and the quarter-unit bins of log2(T^K(a)/a). */
export function drawCensus(peaks: { log2: number; count: bigint }[], bins: { bin: number; count: bigint }[]): void {
  draw("chart-peak", () => ({
    ...base(),
    xAxis: axis("value", "log2 peak"),
    yAxis: axis("log", "vectors"),
    tooltip: {
      trigger: "item",
      confine: true,
      formatter: (p: { data: number[] }) => `log2 peak ${p.data[0]!.toFixed(3)}: ${p.data[1]!.toLocaleString("en-US")} vectors`,
    },
    series: [{ type: "scatter", symbolSize: 6, data: peaks.map((p) => [p.log2, Number(p.count)]), itemStyle: { color: PALETTE[2] } }],
  }));
  // every quarter-unit bin from the lowest to the highest, empty ones included, so the axis is even
  const lo = Math.min(...bins.map((b) => b.bin)),
    hi = Math.max(...bins.map((b) => b.bin));
  const byBin = new Map(bins.map((b) => [b.bin, Number(b.count)]));
  const all = bins.length ? Array.from({ length: hi - lo + 1 }, (_, i) => lo + i) : [];
  draw("chart-ratio", () => ({
    ...base(),
    xAxis: axis("category", "log2 ratio", { data: all.map((k) => (k / 4).toFixed(2)) }),
    yAxis: axis("log", "least members", { min: 1 }),
    series: [{ type: "bar", data: all.map((k) => byBin.get(k) ?? null), itemStyle: { color: PALETTE[3] } }],
  }));
}

/** log10 |v| for drawing (exact bit lengths for values past 2^1000). */
function log10(v: bigint): number {
  const a = v < 0n ? -v : v;
  if (a === 0n) return 0;
  if (a < 1n << 1000n) return Math.log10(Number(a));
  // the bit length from the hexadecimal digits (a quarter of the binary string's length)
  const hex = a.toString(16);
  const bits = 4 * (hex.length - 1) + Number.parseInt(hex[0]!, 16).toString(2).length;
  return Math.log10(Number(a >> BigInt(bits - 60))) + (bits - 60) * Math.log10(2);
}

/** A value for a tooltip: its digits up to 60 of them; past that (a 10,000-step orbit of 2^9999 − 1
 * has thousands of values of thousands of digits, whose decimal strings alone take seconds) its
 * power of ten, the exact values being in the card and the exports. */
const BIG_FOR_TOOLTIP = 10n ** 60n;
const tooltipValue = (x: bigint, lg: number) => (x < BIG_FOR_TOOLTIP && x > -BIG_FOR_TOOLTIP ? String(x) : `about 10^${lg.toFixed(2)}`);

/** An orbit's marks in one convention: the glide, the step it reaches 1 and its maximum, where they fall. */
function marks(o: OrbitView): { name: string; value: [number, number, string] }[] {
  const at = (name: string, j: number | null) =>
    j === null ? [] : [{ name, value: [j, log10(o.values[j]!), String(o.values[j])] as [number, number, string] }];
  return [...at("glide", o.glide), ...at("reaches 1", o.one), ...at("maximum", o.maxAt)];
}

/** One convention's marks in words: "glide 59, reaches 1 at step 70, highest 4,616 at step 38". */
function marksText(o: OrbitView): string {
  return [
    o.glide === null ? "no glide within the steps shown" : `glide ${o.glide}`,
    ...(o.one === null || o.one === 0 ? [] : [`reaches 1 at step ${o.one}`]),
    `highest ${abbreviate(group(o.max), 80)} at step ${o.maxAt}`,
  ].join(", ");
}

/**
 * An orbit of T (values[j + 1] = T(values[j])) in both conventions, steps of T and standard steps,
 * log10 of each value against the step, with the glide, the arrival at 1 and the maximum marked in
 * each; the marks in words below the chart (chart id + "-marks").
 */
export function drawTrajectory(values: readonly bigint[], id = "chart-trajectory"): void {
  const o = bothConventions(values);
  const line = (v: OrbitView) =>
    v.values.map((x, j) => {
      const lg = log10(x);
      return [j, lg, tooltipValue(x, lg)];
    });
  const names = ["steps of T", "standard steps"] as const;
  draw(id, () => ({
    ...base(),
    legend: { top: 0, data: [...names], textStyle: { color: base().textStyle.color } },
    tooltip: {
      trigger: "item",
      confine: true,
      formatter: (p: { seriesName: string; name: string; data: { value?: [number, number, string] } | [number, number, string] }) => {
        const d = Array.isArray(p.data) ? p.data : p.data.value!;
        return `${p.seriesName}, step ${d[0]}: ${d[2]}${p.name ? ` (${p.name})` : ""}`;
      },
    },
    grid: { left: 56, right: 24, top: 30, bottom: 44 },
    xAxis: axis("value", "step", { minInterval: 1, nameLocation: "middle", nameGap: 26 }),
    // the name along the axis, clear of the legend at any width
    yAxis: axis("value", "log10 value", { nameLocation: "middle", nameGap: 32 }),
    series: [
      { name: names[0], type: "line", showSymbol: values.length < 400, symbolSize: 3, data: line(o.T) },
      { name: names[1], type: "line", showSymbol: false, lineStyle: { type: "dashed" }, data: line(o.standard) },
      ...[o.T, o.standard].map((v, i) => ({
        name: names[i],
        type: "scatter",
        symbol: i === 0 ? "circle" : "diamond",
        symbolSize: 11,
        z: 5,
        itemStyle: { color: palette()[i], borderColor: dark() ? "#e7e9ea" : "#1d1f21", borderWidth: 1 },
        label: { show: true, position: i === 0 ? "top" : "bottom", formatter: "{b}", color: base().textStyle.color, fontSize: 11 },
        // a label that would cover another is left out (the marks are all said in words below the chart)
        labelLayout: { hideOverlap: true },
        data: marks(v),
      })),
    ],
  }));
  const el = document.getElementById(id)!;
  let note = document.getElementById(`${id}-marks`);
  if (!note) {
    note = document.createElement("p");
    note.id = `${id}-marks`;
    note.className = "hint";
    el.after(note);
  }
  note.textContent = `${abbreviate(group(values[0]!), 80)}: in steps of T, ${marksText(o.T)}; in standard steps (3n + 1 and n/2 each a step), ${marksText(o.standard)}.`;
}

/** A log axis's label: digits up to a thousand, then 1e4, 1e5, ... (the ticks are powers of 10; short enough for a phone). */
const power = (v: number) => (v < 1e4 ? v.toLocaleString("en-US") : `1e${Math.round(Math.log10(v))}`);

/** A record: n and its value (a glide in standard steps, or a highest value in standard steps). */
export interface RecordPoint {
  readonly n: bigint;
  readonly value: bigint;
}

/**
 * A run's records, n against their value on log axes, and the published records that fall in the
 * range (`published`, null where none apply) as rings around them. A range [FROM, TO) with TO < 10·FROM
 * would crowd its records into one line of a log n axis: its n axis is n − FROM, linear, instead.
 */
export function drawRecords(
  id: string,
  what: { axis: string; unit: string },
  range: { from: bigint; to: bigint },
  run: readonly RecordPoint[],
  published: { name: string; points: readonly RecordPoint[] } | null,
): void {
  const narrow = range.to < 10n * range.from;
  const x = (n: bigint) => (narrow ? Number(n - range.from) : Number(n));
  const data = (ps: readonly RecordPoint[]) => ps.map((p) => [x(p.n), Number(p.value), String(p.n), String(p.value)]);
  const label = { color: base().textStyle.color, formatter: power };
  draw(id, () => ({
    ...base(),
    grid: { left: 64, right: 24, top: 30, bottom: narrow ? 44 : 36 },
    legend: { top: 0, textStyle: { color: base().textStyle.color } },
    tooltip: {
      trigger: "item",
      confine: true,
      formatter: (p: { seriesName: string; data: [number, number, string, string] }) =>
        `${p.seriesName}: n = ${group(BigInt(p.data[2]))}, ${group(BigInt(p.data[3]))} ${what.unit}`,
    },
    xAxis: narrow
      ? axis("value", `n − ${group(range.from)}`, { min: 0, nameLocation: "middle", nameGap: 26, axisLabel: label })
      : axis("log", "n", { axisLabel: label }),
    // the name along the axis, clear of the legend at any width; labels past a thousand as powers of 10
    yAxis: axis("log", what.axis, { min: 1, nameLocation: "middle", nameGap: 44, axisLabel: label }),
    series: [
      { name: "this run", type: "scatter", symbolSize: 7, data: data(run), itemStyle: { color: palette()[0] } },
      ...(published
        ? [
            {
              name: published.points.length ? published.name : `${published.name}: none in range`,
              type: "scatter",
              symbol: "circle",
              symbolSize: 15,
              data: data(published.points),
              itemStyle: { color: "transparent", borderColor: palette()[1], borderWidth: 2 },
            },
          ]
        : []),
    ],
  }));
}

/** A verification's sieved numbers by the depth at which their class is cut: a bar and a dot a depth, log axis. */
export function drawCutDepths(sievedByDepth: readonly bigint[]): void {
  const rows = sievedByDepth.flatMap((c, j) => (c > 0n ? [[j, Number(c), String(c)]] : []));
  draw("chart-cut-depth", () => ({
    ...base(),
    tooltip: {
      trigger: "item",
      confine: true,
      formatter: (p: { data: [number, number, string] }) => `cut at depth ${p.data[0]}: ${group(BigInt(p.data[2]))} numbers`,
    },
    xAxis: axis("value", "cut depth", { min: 0, max: Math.max(1, sievedByDepth.length - 1), minInterval: 1 }),
    yAxis: axis("log", "numbers", { min: 1 }),
    series: [
      { type: "bar", data: rows, barMaxWidth: 14, itemStyle: { color: palette()[2] } },
      { type: "scatter", data: rows, symbolSize: 6, itemStyle: { color: PALETTE[3] } },
    ],
  }));
}

export function resizeCharts(): void {
  for (const c of charts.values()) c.resize();
}

/** Nodes per inverse depth on a log axis, with the heuristic growth g^j drawn through the deepest level. */
export function drawTreeLevels(nodes: readonly bigint[], growth: number): void {
  const last = nodes.length - 1;
  const scale = Number(nodes[last]!) / growth ** last;
  draw("chart-tree", () => ({
    ...base(),
    legend: { top: 0, textStyle: { color: base().textStyle.color } },
    tooltip: { trigger: "axis", confine: true },
    xAxis: depthAxis("depth j", last),
    yAxis: axis("log", "nodes", { min: 1 }),
    series: [
      { name: "nodes", type: "scatter", symbolSize: 6, data: nodes.map((n, j) => [j, Number(n)]) },
      {
        name: `heuristic ${growth.toFixed(4)}^j`,
        type: "line",
        showSymbol: false,
        lineStyle: { type: "dashed" },
        data: nodes.map((_, j) => [j, Math.max(1, scale * growth ** j)]),
      },
    ],
  }));
}
