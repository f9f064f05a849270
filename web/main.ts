// The page: tabs, URL state, and the wiring from controls to views.
import { readState, writeState } from "./state.js";
import type { PageState, View } from "./state.js";
import { cancelRun, readRunForm, startRun } from "./views/run.js";
import { refreshTable, setupTable } from "./views/table.js";
import { runInspect } from "./views/inspect.js";
import { cancelCycles, runCycles } from "./views/cycles.js";
import { applyPreset, cancelVerify, downloadCertificate, startVerify } from "./views/verify.js";
import { resizeCharts } from "./views/charts.js";
import { defaultWorkers } from "./engine.js";
import { $ } from "./dom.js";

const state: PageState = readState();

function update(s: Partial<PageState>): void {
  Object.assign(state, s, { run: false });
  writeState(state);
}

function show(view: View): void {
  for (const tab of document.querySelectorAll<HTMLButtonElement>(".tabs button")) {
    const on = tab.dataset.view === view;
    tab.setAttribute("aria-selected", String(on));
    tab.tabIndex = on ? 0 : -1;
    $(`view-${tab.dataset.view}`).hidden = !on;
  }
  update({ view });
  requestAnimationFrame(() => {
    resizeCharts();
    if (view === "table") refreshTable();
  });
}

function setupTabs(): void {
  const tabs = [...document.querySelectorAll<HTMLButtonElement>(".tabs button")];
  tabs.forEach((tab, i) => {
    tab.addEventListener("click", () => show(tab.dataset.view as View));
    tab.addEventListener("keydown", (e) => {
      const d = e.key === "ArrowRight" ? 1 : e.key === "ArrowLeft" ? -1 : 0;
      if (!d) return;
      const next = tabs[(i + d + tabs.length) % tabs.length]!;
      next.focus();
      show(next.dataset.view as View);
    });
  });
}

function fillForms(): void {
  ($("run-map") as HTMLInputElement).value = state.map;
  ($("run-depth") as HTMLInputElement).value = String(state.depth);
  ($("run-mode") as HTMLSelectElement).value = state.mode;
  ($("run-workers") as HTMLInputElement).value = String(state.workers ?? defaultWorkers());
  ($("inspect-input") as HTMLInputElement).value = state.inspect;
  ($("inspect-map") as HTMLInputElement).value = state.map;
  ($("cycles-map") as HTMLInputElement).value = state.cyclesMap;
  ($("cycles-period") as HTMLInputElement).value = String(state.period);
}

function workers(): number {
  return Math.max(1, Math.min(16, Number(($("run-workers") as HTMLInputElement).value) || defaultWorkers()));
}

function setup(): void {
  const autorun = state.run;
  setupTabs();
  fillForms();
  setupTable();
  $("run-form").addEventListener("submit", (e) => {
    e.preventDefault();
    const req = readRunForm();
    if (req) void startRun(req, update);
  });
  $("run-mode").addEventListener("change", () =>
    update({ mode: ($("run-mode") as HTMLSelectElement).value === "full" ? "full" : "survivors" }),
  );
  $("run-cancel").addEventListener("click", cancelRun);
  $("inspect-form").addEventListener("submit", (e) => {
    e.preventDefault();
    const text = ($("inspect-input") as HTMLInputElement).value;
    if (runInspect(text, ($("inspect-map") as HTMLInputElement).value)) update({ inspect: text.trim() });
  });
  $("cycles-form").addEventListener("submit", (e) => {
    e.preventDefault();
    const mapText = ($("cycles-map") as HTMLInputElement).value;
    const period = ($("cycles-period") as HTMLInputElement).value;
    void runCycles(mapText, period, workers()).then((ok) => ok && update({ cyclesMap: mapText.trim(), period: Number(period) }));
  });
  $("cycles-cancel").addEventListener("click", cancelCycles);
  $("verify-form").addEventListener("submit", (e) => {
    e.preventDefault();
    void startVerify(workers());
  });
  $("verify-cancel").addEventListener("click", cancelVerify);
  $("verify-certificate").addEventListener("click", downloadCertificate);
  $("verify-preset").addEventListener("change", () => applyPreset(($("verify-preset") as HTMLSelectElement).value));
  addEventListener("resize", () => {
    resizeCharts();
    refreshTable();
  });
  show(state.view);
  if (state.view === "inspect") runInspect(state.inspect, state.map);
  if (autorun) {
    const req = readRunForm();
    if (req) void startRun(req, update);
  }
}

setup();
