// Writing results: stdout for the report (a closed pipe ends the process quietly, see main.ts),
// and one confirmation line per output file.
import { setImmediate as tick } from "node:timers/promises";

/** Writes report text to stdout. */
export function print(text: string): void {
  process.stdout.write(text);
}

/**
 * Says what was written where: on stdout after a text report, on stderr beside JSON (so that
 * stdout stays one JSON document).
 */
export function confirmOutput(json: boolean | undefined, what: string, path: string): void {
  const line = `wrote ${what} to ${path} (manifest ${path}.json)\n`;
  if (json) process.stderr.write(line);
  else process.stdout.write(line);
}

/**
 * Lets the event loop run (signals, a closed pipe) during a long synchronous computation: call it
 * often; it yields once about every 20 ms.
 */
export function yielder(): () => Promise<void> {
  let last = performance.now();
  return async () => {
    if (performance.now() - last < 20) return;
    await tick();
    last = performance.now();
  };
}

let interruptNote: (() => string) | null = null;

/** What Ctrl-C should say instead of "no output file was written" (a verification run's checkpoint); null to reset. */
export function setInterruptNote(note: (() => string) | null): void {
  interruptNote = note;
}

/** The line Ctrl-C prints after "interrupted; ". */
export function interruptLine(): string {
  return interruptNote?.() ?? "no output file was written";
}
