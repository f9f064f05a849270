// A progress bar on stderr, only when stderr is a terminal and the work outlasts about a second.
import { SingleBar, Presets } from "cli-progress";

export interface Progress {
  update(done: number, total: number): void;
  stop(): void;
}

const QUIET: Progress = { update() {}, stop() {} };

/** @example const p = progressBar("sieve"); p.update(3, 10); p.stop(); */
export function progressBar(label: string, delayMs = 1000): Progress {
  if (!process.stderr.isTTY) return QUIET;
  const started = Date.now();
  let bar: SingleBar | null = null;
  return {
    update(done, total) {
      if (!bar) {
        if (Date.now() - started < delayMs) return;
        bar = new SingleBar(
          {
            stream: process.stderr,
            format: `${label} [{bar}] {percentage}% | {value}/{total} shards | eta {eta_formatted}`,
            hideCursor: true,
            clearOnComplete: true,
          },
          Presets.shades_classic,
        );
        bar.start(total, done);
      }
      bar.setTotal(total);
      bar.update(done);
    },
    stop() {
      bar?.stop();
    },
  };
}
