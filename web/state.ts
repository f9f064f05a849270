// The page state in the address bar, so that a link reproduces what its sender saw: the view, every
// view's own inputs (each under its own key), and run=1 to run the view's job on load, kept while the
// view shows the results of those inputs (a link copied after a run makes its results again). The
// defaults are the form's own values in index.html: a key missing from the URL leaves its field as it is.
export type View = "run" | "table" | "inspect" | "cycles" | "verify" | "tree";

const VIEWS: readonly View[] = ["run", "table", "inspect", "cycles", "verify", "tree"];

/** The worker count, shared by every view's job (its field is in the run view). */
const WORKERS = ["workers", "run-workers"] as const;

/** URL key -> form element id, per view (the class table shows the run view's run). */
const FIELDS: Record<View, readonly (readonly [key: string, id: string])[]> = {
  run: [
    ["map", "run-map"],
    ["depth", "run-depth"],
    ["mode", "run-mode"],
    ["table", "run-keep-table"],
  ],
  table: [],
  inspect: [
    ["inspect", "inspect-input"],
    ["imap", "inspect-map"],
  ],
  cycles: [
    ["cmap", "cycles-map"],
    ["period", "cycles-period"],
  ],
  verify: [
    ["vmap", "verify-map"],
    ["from", "verify-from"],
    ["to", "verify-to"],
    ["vdepth", "verify-depth"],
    ["vdelay", "verify-delay"],
    ["vmethod", "verify-method"],
  ],
  tree: [
    ["tn", "tree-n"],
    ["tmap", "tree-map"],
    ["tdepth", "tree-depth"],
    ["tsteps", "tree-steps"],
  ],
};

export interface PageState {
  readonly view: View;
  /** Run the view's job on load. */
  readonly run: boolean;
  /** Select fields the address named a value they do not offer: (field id, the value), left as they were. */
  readonly refused: readonly (readonly [id: string, value: string])[];
}

type Field = HTMLInputElement | HTMLSelectElement;
const field = (id: string) => document.getElementById(id) as Field;

function readField(id: string): string {
  const el = field(id);
  return el instanceof HTMLInputElement && el.type === "checkbox" ? (el.checked ? "1" : "0") : el.value.trim();
}

/** Writes a field; false (and the field left as it was) for a value a select does not offer. */
function writeField(id: string, value: string): boolean {
  const el = field(id);
  if (el instanceof HTMLSelectElement && ![...el.options].some((o) => o.value === value)) return false;
  if (el instanceof HTMLInputElement && el.type === "checkbox") el.checked = value === "1";
  else el.value = value;
  return true;
}

/** Reads the address bar: fills every view's fields from it and returns the view, the run flag and refused values. */
export function loadState(search = location.search): PageState {
  const p = new URLSearchParams(search);
  const refused: [string, string][] = [];
  for (const [key, id] of [WORKERS, ...Object.values(FIELDS).flat()])
    if (p.has(key) && !writeField(id, p.get(key)!)) refused.push([id, p.get(key)!]);
  const view = p.get("view");
  return { view: VIEWS.includes(view as View) ? (view as View) : "run", run: p.get("run") === "1", refused };
}

/**
 * Writes the view and the fields of `fieldsOf` (as the form now holds them) into the address bar,
 * without a reload, keeping its #fragment. `entry`: "replace" the current history entry, or "push" a
 * new one (a view switched to, a run). `ran`: the view shows (or is making) the results of the fields
 * in the address; the address then holds run=1, so that a reload, a copied link and Back or Forward
 * into the entry (of this page load or another) make those results again.
 */
export function saveState(view: View, fieldsOf: readonly View[] = [], entry: "replace" | "push" = "replace", ran = false): void {
  const p = new URLSearchParams(location.search);
  p.set("view", view);
  if (ran) p.set("run", "1");
  else p.delete("run");
  for (const [key, id] of fieldsOf.length ? [WORKERS, ...fieldsOf.flatMap((v) => FIELDS[v])] : []) p.set(key, readField(id));
  const url = `${location.pathname}?${p.toString()}${location.hash}`;
  // an entry that differs from this one in run=1 alone (a run of the fields just edited) replaces it
  const was = new URLSearchParams(location.search);
  was.delete("run");
  p.delete("run");
  if (entry === "push" && p.toString() !== was.toString()) history.pushState({ ran }, "", url);
  else history.replaceState({ ran }, "", url);
}
