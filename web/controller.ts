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

/** Seconds of work, and the share of the total, behind an estimate before it is stated. */
const ESTIMATE_SECONDS = 3;
const ESTIMATE_SHARE = 0.02;
/** The rates of the two halves of that work may differ by this share of the larger at most. */
const ESTIMATE_SPREAD = 0.25;

/**
 * The time a run has left, stated only once it is honest: measured from the first unit done (the
 * setup before it, such as building tables, says nothing about the rate), after ESTIMATE_SECONDS and
 * ESTIMATE_SHARE of the work, and while the rates of the first and second half of the work measured
 * agree within ESTIMATE_SPREAD; otherwise null. The rate of the second half decides (a run's first
 * blocks are small and slow). Times in seconds, from any fixed origin.
 * @example new Estimate().left(0.5, 10, 1000) // null: too early to say
 */
export class Estimate {
  private readonly seen: { readonly t: number; readonly done: number }[] = [];

  left(t: number, done: number, total: number): number | null {
    if (done <= 0 || done >= total) return null;
    const seen = this.seen;
    seen.push({ t, done });
    const first = seen[0]!;
    const span = t - first.t;
    if (span < ESTIMATE_SECONDS || (done - first.done) / total < ESTIMATE_SHARE) return null;
    // the report nearest the middle of the span splits it into two halves with a rate each
    const mid = seen.reduce((a, b) => (Math.abs(b.t - (first.t + span / 2)) < Math.abs(a.t - (first.t + span / 2)) ? b : a));
    if (mid === first || mid.t === t) return null;
    const early = (mid.done - first.done) / (mid.t - first.t);
    const late = (done - mid.done) / (t - mid.t);
    if (Math.abs(early - late) > ESTIMATE_SPREAD * Math.max(early, late)) return null;
    return (total - done) / late;
  }
}

/** A time left in words, rounded to what an estimate can promise. @example timeLeft(770) // "about 13 min" */
export function timeLeft(seconds: number): string {
  if (seconds < 10) return "a few seconds";
  if (seconds < 60) return `about ${Math.round(seconds / 10) * 10} s`;
  if (seconds < 3600) return `about ${Math.max(1, Math.round(seconds / 60))} min`;
  if (seconds < 48 * 3600) {
    const tens = Math.round(seconds / 600); // ten-minute units
    const h = Math.floor(tens / 6),
      m = (tens % 6) * 10;
    return `about ${h} h${m ? ` ${m} min` : ""}`;
  }
  return `about ${Math.round(seconds / 86400)} days`;
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
    const estimate = new Estimate();
    const onProgress = (done: number, total: number) => {
      const elapsed = (performance.now() - started) / 1000;
      progress.value = done / total;
      // an estimate only where the units are equal work (numbers); shards differ in size, so their
      // count would promise a finish it cannot keep
      const remaining = unit === "shards" ? null : estimate.left(elapsed, done, total);
      const rate = unit === "shards" ? "" : `, ${group(Math.round(done / Math.max(elapsed, 1e-3)))} ${unit}/s`;
      status.textContent =
        `${group(done)} of ${group(total)} ${unit}${rate}, ${elapsed.toFixed(1)} s elapsed` +
        `${remaining === null ? "" : `, ${timeLeft(remaining)} left`}`;
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
