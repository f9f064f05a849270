// The page: tabs, URL state, and the wiring from controls to views.
import { loadState, saveState } from "./state.js";
import type { View } from "./state.js";
import { cancelRun, readRunForm, startRun } from "./views/run.js";
import { refreshTable, setupTable } from "./views/table.js";
import { runInspect } from "./views/inspect.js";
import { cancelCycles, runCycles } from "./views/cycles.js";
import { applyPreset, cancelVerify, downloadCertificate, startVerify, syncVerifyForm } from "./views/verify.js";
import { resizeCharts } from "./views/charts.js";
import { defaultWorkers } from "./engine.js";
import { readWorkers } from "./workers.js";
import { cancelTree, setupTree, startTree } from "./views/tree.js";
import { $, fieldError, panelOf } from "./dom.js";
import { setupGlossary } from "./views/glossary.js";

let current: View = "run";
/** Set while Back or Forward restores an entry: what runs then replaces that entry, never adds one. */
let restoring = false;
const entry = () => (restoring ? "replace" : "push");

/** The form whose results a view shows (the class table shows the run view's run). */
const FORM_OF: Record<View, string> = {
  run: "run-form",
  table: "run-form",
  inspect: "inspect-form",
  cycles: "cycles-form",
  verify: "verify-form",
  tree: "tree-form",
};

/** Whether the view shows results made from the fields its form now holds (its address then keeps run=1). */
const resultsShown = (view: View) => panelOf(FORM_OF[view])?.current() === true;

/**
 * Shows a view; `record`: a new history entry (a tab chosen), else the current entry is rewritten.
 * `ran`: its job is about to run (a link's run=1); else the address keeps run=1 when the view shows
 * the results of its fields.
 */
function show(view: View, record = false, ran = resultsShown(view)): void {
  for (const tab of document.querySelectorAll<HTMLButtonElement>(".tabs button")) {
    const on = tab.dataset.view === view;
    tab.setAttribute("aria-selected", String(on));
    tab.tabIndex = on ? 0 : -1;
    $(`view-${tab.dataset.view}`).hidden = !on;
  }
  const switched = view !== current;
  current = view;
  saveState(view, [], record && switched ? entry() : "replace", ran);
  requestAnimationFrame(() => {
    resizeCharts();
    if (view === "table") refreshTable();
  });
}

function setupTabs(): void {
  const tabs = [...document.querySelectorAll<HTMLButtonElement>(".tabs button")];
  tabs.forEach((tab, i) => {
    tab.addEventListener("click", () => show(tab.dataset.view as View, true));
    tab.addEventListener("keydown", (e) => {
      const d = e.key === "ArrowRight" ? 1 : e.key === "ArrowLeft" ? -1 : 0;
      const to = e.key === "Home" ? 0 : e.key === "End" ? tabs.length - 1 : d ? (i + d + tabs.length) % tabs.length : -1;
      if (to < 0) return;
      e.preventDefault();
      const next = tabs[to]!;
      next.focus();
      show(next.dataset.view as View, true);
    });
  });
}

/** The run view's job (the class table shows its run). */
function run(): void {
  const req = readRunForm();
  if (!req) return;
  saveState(current, ["run"], entry(), true);
  void startRun(req);
}

function inspectNow(how: "replace" | "push" = entry()): void {
  if (runInspect($<HTMLInputElement>("inspect-input").value, $<HTMLInputElement>("inspect-map").value))
    saveState(current, ["inspect"], how, true);
}

/**
 * Records a job of `fields`'s form in the history once it has succeeded: the view and the kind of
 * entry are those of its start (a tab chosen meanwhile, or a Back that has ended, changes neither).
 */
function recordRun(fields: View, done: Promise<boolean>): void {
  const view = current;
  const how = entry();
  void done.then((ok) => ok && saveState(view, [fields], how, true));
}

function cycles(): void {
  const workers = readWorkers("cycles-message");
  if (workers === null) return;
  recordRun("cycles", runCycles($<HTMLInputElement>("cycles-map").value, $<HTMLInputElement>("cycles-period").value, workers));
}

function verify(): void {
  const workers = readWorkers("verify-message");
  if (workers === null) return;
  recordRun("verify", startVerify(workers));
}

function tree(): void {
  const workers = readWorkers("tree-message");
  if (workers === null) return;
  recordRun("tree", startTree(workers));
}

/**
 * Opens a number or class in the Inspector under its own map, the focus on the Inspector's heading:
 * one history entry (the view and its card), so that one Back returns to the table or the tree.
 */
function openInInspector(input: string, mapName: string): void {
  $<HTMLInputElement>("inspect-input").value = input;
  $<HTMLInputElement>("inspect-map").value = mapName;
  show("inspect", true);
  inspectNow("replace");
  $("inspect-heading").focus();
}

/** Each view's job, as its button and run=1 start it. */
const JOBS: Record<View, () => void> = { run, table: run, inspect: inspectNow, cycles, verify, tree };

/**
 * The address bar's state applied: fields, view, refused select values; then its job when asked for,
 * unless the view already shows the results of these fields (Back from the Inspector to the table).
 */
function apply(run: boolean): void {
  const state = loadState();
  syncVerifyForm();
  for (const [id, value] of state.refused) fieldError(id, `the link asks for "${value}", which this field does not offer`);
  for (const form of FORMS) panelOf(form[0])?.follow();
  const job = (run || state.view === "inspect") && state.refused.length === 0 && !resultsShown(state.view);
  show(state.view, false, job || resultsShown(state.view));
  if (job) JOBS[state.view]();
}

/** Each form: its id, its view, its job. */
const FORMS = [
  ["run-form", "run", run],
  ["inspect-form", "inspect", inspectNow],
  ["cycles-form", "cycles", cycles],
  ["verify-form", "verify", verify],
  ["tree-form", "tree", tree],
] as const;

function setup(): void {
  $<HTMLInputElement>("run-workers").value = String(defaultWorkers());
  setupTabs();
  setupTable((t, row) => openInInspector(`${t.residues[row]} mod 2^${t.depth}`, t.map.name));
  // each form: its job on submit; the address bar follows its fields as they change
  for (const [form, view, job] of FORMS) {
    $(form).addEventListener("submit", (e) => {
      e.preventDefault();
      job();
    });
    $(form).addEventListener("change", () => {
      // a run's entry keeps the fields that made its results: an edit after it is an entry of its own,
      // with run=1 only while the results on screen are still those of its fields
      panelOf(form)?.follow();
      saveState(current, [view], (history.state as { ran?: boolean } | null)?.ran === true ? "push" : "replace", resultsShown(current));
    });
    // a field being corrected loses its old error (the next run checks it again); results made from
    // other inputs are dimmed at once
    $(form).addEventListener("input", (e) => {
      const id = (e.target as HTMLElement).id;
      if (document.getElementById(`${id}-error`)) fieldError(id, "");
      panelOf(form)?.follow();
    });
  }
  $("run-cancel").addEventListener("click", cancelRun);
  $("cycles-cancel").addEventListener("click", cancelCycles);
  $("tree-cancel").addEventListener("click", cancelTree);
  setupTree((n, map) => openInInspector(String(n), map.name));
  $("verify-cancel").addEventListener("click", cancelVerify);
  $("verify-certificate").addEventListener("click", downloadCertificate);
  // the Sieve depth field says what depth runs, or that the method does not use it
  $("verify-form").addEventListener("input", syncVerifyForm);
  $("verify-form").addEventListener("change", syncVerifyForm);
  $("verify-preset").addEventListener("change", () => {
    applyPreset($<HTMLSelectElement>("verify-preset").value);
    syncVerifyForm();
    panelOf("verify-form")?.follow();
  });
  setupGlossary();
  addEventListener("resize", () => {
    resizeCharts();
    refreshTable();
  });
  // Back and Forward: the entry's view and fields, and a run's results made again; the load itself
  // rewrites its entry rather than adding one
  const restore = (ran: boolean) => {
    restoring = true;
    try {
      apply(ran || new URLSearchParams(location.search).get("run") === "1");
    } finally {
      restoring = false;
    }
  };
  addEventListener("popstate", (e) => restore((e.state as { ran?: boolean } | null)?.ran === true));
  restore(false);
}

setup();
