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
const charts = new Map<string, echarts.ECharts>();

function dark(): boolean {
  return matchMedia("(prefers-color-scheme: dark)").matches;
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
    color: PALETTE,
    animation: false,
    textStyle: { color: fg },
    grid: { left: 56, right: 16, top: 28, bottom: 32 },
    tooltip: { trigger: "axis" as const },
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
  chart("chart-density").setOption(
    {
      ...base(),
      legend: { top: 0, textStyle: { color: base().textStyle.color } },
      xAxis: axis("value", "depth", { min: 0 }),
      yAxis: axis("log", "density"),
      series: [
        { name: "kernel", type: "scatter", symbolSize: 7, data: levels.map(d) },
        { name: "exact counter", type: "line", showSymbol: false, lineStyle: { type: "dashed" }, data: exact.map(d) },
      ],
    },
    true,
  );
}

export function drawStopped(levels: readonly Level[]): void {
  const rows = levels.filter((l) => l.stopped > 0n);
  chart("chart-stopped").setOption(
    {
      ...base(),
      xAxis: axis("category", "depth", { data: rows.map((l) => String(l.depth)) }),
      yAxis: axis("log", "classes"),
      series: [{ type: "bar", data: rows.map((l) => Number(l.stopped)), itemStyle: { color: PALETTE[1] } }],
    },
    true,
  );
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
  chart("chart-heat").setOption(
    {
      ...base(),
      tooltip: {
        trigger: "item",
        formatter: (p: { data: [number, number, number, string] }) => `j = ${p.data[0]}, m = ${p.data[1]}: ${p.data[3]}`,
      },
      xAxis: axis("category", "depth j", { data: live.map((_, j) => String(j)) }),
      yAxis: axis("category", "odd steps m", { data: live.map((_, m) => String(m)) }),
      visualMap: {
        min: 0,
        max,
        dimension: 2,
        calculable: false,
        orient: "horizontal",
        right: 0,
        top: 0,
        itemHeight: 80,
        text: ["log10", ""],
        textStyle: { color: base().textStyle.color },
        inRange: { color: ["#440154", "#3b528b", "#21918c", "#5ec962", "#fde725"] },
      }, // viridis: ordered in lightness, readable in both schemes
      series: [{ type: "heatmap", data: data.map((x) => [x[0], x[1], x[2], x[3]]) }],
    },
    true,
  );
}

/** Census: vectors by log2 of their peak coefficient, and the quarter-unit bins of log2(T^K(a)/a). */
export function drawCensus(peaks: { log2: number; count: bigint }[], bins: { bin: number; count: bigint }[]): void {
  chart("chart-peak").setOption(
    {
      ...base(),
      xAxis: axis("value", "log2 peak"),
      yAxis: axis("log", "vectors"),
      tooltip: { trigger: "item" },
      series: [{ type: "scatter", symbolSize: 6, data: peaks.map((p) => [p.log2, Number(p.count)]), itemStyle: { color: PALETTE[2] } }],
    },
    true,
  );
  // every quarter-unit bin from the lowest to the highest, empty ones included, so the axis is even
  const lo = Math.min(...bins.map((b) => b.bin)),
    hi = Math.max(...bins.map((b) => b.bin));
  const byBin = new Map(bins.map((b) => [b.bin, Number(b.count)]));
  const all = bins.length ? Array.from({ length: hi - lo + 1 }, (_, i) => lo + i) : [];
  chart("chart-ratio").setOption(
    {
      ...base(),
      xAxis: axis("category", "log2 ratio", { data: all.map((k) => (k / 4).toFixed(2)) }),
      yAxis: axis("log", "least members"),
      series: [{ type: "bar", data: all.map((k) => byBin.get(k) ?? null), itemStyle: { color: PALETTE[3] } }],
    },
    true,
  );
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
  chart("chart-trajectory").setOption(
    {
      ...base(),
      xAxis: axis("value", "step"),
      yAxis: axis("value", "log10 |T^j(n)|"),
      series: [{ type: "line", showSymbol: values.length < 200, data: values.map((v, i) => [i, log10(v)]) }],
    },
    true,
  );
}

export function resizeCharts(): void {
  for (const c of charts.values()) c.resize();
}
