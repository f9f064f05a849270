// One run controller for every view: the Run and Cancel buttons, the progress bar with elapsed and
// remaining time, the cancelled and failed states, and the abort signal handed to the library.
import { CancelledError } from "../src/engine/pool.js";
import type { RunOptions } from "../src/engine/pool.js";
import { group } from "../src/outputs/format.js";
import { $ } from "./dom.js";
import type { ResultsPanel } from "./dom.js";

export interface RunElements {
  readonly start: string;
  readonly cancel: string;
  readonly progress: string;
  readonly status: string;
  readonly message: string;
  /** The results this view shows: dimmed while a new run goes on, and after it is cancelled or fails. */
  readonly results?: ResultsPanel;
}

/** What a finished run gives back: its value, or null when it was cancelled or failed (shown already). */
export type Outcome<T> = { readonly ok: true; readonly value: T; readonly seconds: number } | { readonly ok: false };

/**
 * @example const c = new RunController({ start: "cycles-go", ... }); const out = await c.run((o) => searchCycles(pool, map, K, o));
 */
export class RunController {
  private abort: AbortController | null = null;

  constructor(private readonly el: RunElements) {}

  get running(): boolean {
    return this.abort !== null;
  }

  /** Stops the run in progress (its workers are terminated at once). */
  cancel(): void {
    this.abort?.abort();
  }

  /**
   * While a run goes on: names the phase it is in, with the bar indeterminate (moving, no share)
   * until the next progress report gives it a share again.
   */
  phase(text: string): void {
    $<HTMLProgressElement>(this.el.progress).removeAttribute("value");
    $(this.el.status).textContent = text;
  }

  /** Shows a message under the form (bad: styled as an error). */
  say(text: string, bad = false): void {
    const m = $(this.el.message);
    m.className = bad ? "message bad" : "message";
    m.textContent = text;
  }

  /**
   * Runs `work` with the signal and a progress callback; the buttons, the bar and the status line
   * follow it, and a failure or a cancel is shown in words rather than thrown.
   */
  async run<T>(work: (options: RunOptions) => Promise<T>, waiting = "Starting workers...", unit = "shards"): Promise<Outcome<T>> {
    const abort = new AbortController();
    this.abort = abort;
    const started = performance.now();
    const progress = $<HTMLProgressElement>(this.el.progress);
    const status = $(this.el.status);
    $<HTMLButtonElement>(this.el.start).disabled = true;
    $<HTMLButtonElement>(this.el.cancel).disabled = false;
    progress.value = 0;
    status.textContent = waiting;
    this.say("");
    this.el.results?.markStale("a new run is in progress");
    const onProgress = (done: number, total: number) => {
      const elapsed = (performance.now() - started) / 1000;
      progress.value = done / total;
      // an estimate only where the units are equal work (numbers); shards differ in size, so their
      // count would promise a finish it cannot keep
      const remaining = unit !== "shards" && done > 0 && elapsed >= 2 ? (elapsed * (total - done)) / done : Number.NaN;
      const rate = unit === "shards" ? "" : `, ${group(Math.round(done / Math.max(elapsed, 1e-3)))} ${unit}/s`;
      status.textContent =
        `${group(done)} of ${group(total)} ${unit}${rate}, ${elapsed.toFixed(1)} s elapsed` +
        `${Number.isFinite(remaining) ? `, about ${remaining.toFixed(1)} s left` : ""}`;
    };
    try {
      const value = await work({ signal: abort.signal, onProgress });
      const seconds = (performance.now() - started) / 1000;
      progress.value = 1;
      status.textContent = `Done in ${seconds.toFixed(2)} s.`;
      return { ok: true, value, seconds };
    } catch (e) {
      progress.value = 0;
      if (e instanceof CancelledError) {
        status.textContent = "Cancelled.";
        this.el.results?.markStale("the new run was cancelled");
      } else {
        status.textContent = "Failed.";
        this.say(`The run stopped: ${(e as Error).message}`, true);
        this.el.results?.markStale("the new run failed");
      }
      return { ok: false };
    } finally {
      if (this.abort === abort) this.abort = null;
      $<HTMLButtonElement>(this.el.start).disabled = false;
      $<HTMLButtonElement>(this.el.cancel).disabled = true;
    }
  }
}
