// Charts with Apache ECharts (canvas), in the Okabe-Ito palette. Numbers here are for drawing only:
// every count shown as text comes from the exact BigInt results.
import * as echarts from "echarts/core";
import { BarChart, HeatmapChart, LineChart, ScatterChart } from "echarts/charts";
import { GridComponent, LegendComponent, TooltipComponent, VisualMapComponent } from "echarts/components";
import { CanvasRenderer } from "echarts/renderers";
import type { Level } from "../../src/core/exact.js";

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

/** Draws chart `id` from `build`, now and again whenever the colour scheme changes. */
function draw(id: string, build: () => Record<string, unknown>): void {
  builders.set(id, build);
  document.getElementById(id)!.dataset.scheme = dark() ? "dark" : "light"; // the scheme it was drawn for
  chart(id).setOption(build(), true);
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
    xAxis: axis("value", "depth", { min: 0, max: last, minInterval: 1 }),
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

/** A trajectory: log10 of each value (exact bit lengths for huge values), against the step. */
export function drawTrajectory(values: readonly bigint[]): void {
  const log10 = (v: bigint) => {
    const a = v < 0n ? -v : v;
    if (a === 0n) return 0;
    const bits = a.toString(2).length;
    if (bits <= 1000) return Math.log10(Number(a));
    return Math.log10(Number(a >> BigInt(bits - 60))) + (bits - 60) * Math.log10(2);
  };
  draw("chart-trajectory", () => ({
    ...base(),
    xAxis: axis("value", "step", { minInterval: 1 }),
    yAxis: axis("value", "log10 |T^j(n)|"),
    series: [{ type: "line", showSymbol: values.length < 200, data: values.map((v, i) => [i, log10(v)]) }],
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
    xAxis: axis("value", "depth j", { min: 0, max: last, minInterval: 1 }),
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
