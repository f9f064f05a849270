// The page state in the URL, so that a link reproduces a run: map, depth, mode, view, inspected value.
export type View = "run" | "table" | "inspect" | "cycles" | "verify";

export interface PageState {
  view: View;
  map: string;
  depth: number;
  mode: "survivors" | "full";
  workers: number | null;
  inspect: string;
  cyclesMap: string;
  period: number;
  run: boolean;
}

const VIEWS: readonly View[] = ["run", "table", "inspect", "cycles", "verify"];

function int(v: string | null, fallback: number): number {
  return v !== null && /^\d+$/.test(v) ? Number(v) : fallback;
}

export function readState(search = location.search): PageState {
  const p = new URLSearchParams(search);
  const view = p.get("view");
  return {
    view: VIEWS.includes(view as View) ? (view as View) : "run",
    map: p.get("map") ?? "3x+1",
    depth: int(p.get("depth"), 24),
    mode: p.get("mode") === "full" ? "full" : "survivors",
    workers: p.has("workers") ? int(p.get("workers"), 2) : null,
    inspect: p.get("inspect") ?? "3 mod 16",
    cyclesMap: p.get("cmap") ?? "3x+5",
    period: int(p.get("period"), 24),
    run: p.get("run") === "1",
  };
}

/** Writes the state into the address bar without a reload (run=1 is kept only when asked). */
export function writeState(s: PageState): void {
  const p = new URLSearchParams();
  p.set("view", s.view);
  p.set("map", s.map);
  p.set("depth", String(s.depth));
  p.set("mode", s.mode);
  if (s.workers !== null) p.set("workers", String(s.workers));
  p.set("inspect", s.inspect);
  p.set("cmap", s.cyclesMap);
  p.set("period", String(s.period));
  if (s.run) p.set("run", "1");
  history.replaceState(null, "", `${location.pathname}?${p.toString()}`);
}
