// The page: tabs, URL state, and the wiring from controls to views.
import { loadState, saveState } from "./state.js";
import type { View } from "./state.js";
import { cancelRun, readRunForm, startRun } from "./views/run.js";
import { refreshTable, setupTable } from "./views/table.js";
import { runInspect } from "./views/inspect.js";
import { cancelCycles, exportCycles, runCycles } from "./views/cycles.js";
import { applyPreset, cancelVerify, downloadCertificate, startVerify } from "./views/verify.js";
import { resizeCharts } from "./views/charts.js";
import { defaultWorkers } from "./engine.js";
import { readWorkers } from "./workers.js";
import { cancelTree, setupTree, startTree } from "./views/tree.js";
import { $, fieldError } from "./dom.js";

let current: View = "run";

function show(view: View): void {
  for (const tab of document.querySelectorAll<HTMLButtonElement>(".tabs button")) {
    const on = tab.dataset.view === view;
    tab.setAttribute("aria-selected", String(on));
    tab.tabIndex = on ? 0 : -1;
    $(`view-${tab.dataset.view}`).hidden = !on;
  }
  current = view;
  saveState(view);
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

/** The run view's job (the class table shows its run). */
function run(): void {
  const req = readRunForm();
  if (!req) return;
  saveState(current, ["run"]);
  void startRun(req);
}

function inspectNow(): void {
  if (runInspect(($("inspect-input") as HTMLInputElement).value, ($("inspect-map") as HTMLInputElement).value))
    saveState(current, ["inspect"]);
}

function cycles(): void {
  const workers = readWorkers("cycles-message");
  if (workers === null) return;
  void runCycles(($("cycles-map") as HTMLInputElement).value, ($("cycles-period") as HTMLInputElement).value, workers).then(
    (ok) => ok && saveState(current, ["cycles"]),
  );
}

function verify(): void {
  const workers = readWorkers("verify-message");
  if (workers === null) return;
  void startVerify(workers).then((ok) => ok && saveState(current, ["verify"]));
}

function tree(): void {
  const workers = readWorkers("tree-message");
  if (workers === null) return;
  void startTree(workers).then((ok) => ok && saveState(current, ["tree"]));
}

/** Each view's job, as its button and run=1 start it. */
const JOBS: Record<View, () => void> = { run, table: run, inspect: inspectNow, cycles, verify, tree };

function setup(): void {
  ($("run-workers") as HTMLInputElement).value = String(defaultWorkers());
  const state = loadState();
  setupTabs();
  setupTable((t, row) => {
    ($("inspect-input") as HTMLInputElement).value = `${t.residues[row]} mod 2^${t.depth}`;
    ($("inspect-map") as HTMLInputElement).value = t.map.name;
    show("inspect");
    inspectNow();
  });
  // each form: its job on submit; the address bar follows its fields as they change
  for (const [form, view, job] of [
    ["run-form", "run", run],
    ["inspect-form", "inspect", inspectNow],
    ["cycles-form", "cycles", cycles],
    ["verify-form", "verify", verify],
    ["tree-form", "tree", tree],
  ] as const) {
    $(form).addEventListener("submit", (e) => {
      e.preventDefault();
      job();
    });
    $(form).addEventListener("change", () => saveState(current, [view]));
    // a field being corrected loses its old error (the next run checks it again)
    $(form).addEventListener("input", (e) => {
      const id = (e.target as HTMLElement).id;
      if (document.getElementById(`${id}-error`)) fieldError(id, "");
    });
  }
  $("run-cancel").addEventListener("click", cancelRun);
  $("cycles-cancel").addEventListener("click", cancelCycles);
  $("cycles-export").addEventListener("click", exportCycles);
  $("tree-cancel").addEventListener("click", cancelTree);
  setupTree((n, map) => {
    ($("inspect-input") as HTMLInputElement).value = String(n);
    ($("inspect-map") as HTMLInputElement).value = map.name;
    show("inspect");
    inspectNow();
  });
  $("verify-cancel").addEventListener("click", cancelVerify);
  $("verify-certificate").addEventListener("click", downloadCertificate);
  $("verify-preset").addEventListener("change", () => applyPreset(($("verify-preset") as HTMLSelectElement).value));
  document.querySelector('a[href="#glossary"]')?.addEventListener("click", () => {
    ($("glossary") as HTMLDetailsElement).open = true;
  });
  addEventListener("resize", () => {
    resizeCharts();
    refreshTable();
  });
  show(state.view);
  if (state.run || state.view === "inspect") JOBS[state.view]();
}

setup();
