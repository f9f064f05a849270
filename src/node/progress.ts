// A progress bar on stderr, only when stderr is a terminal and the work outlasts about a second.
import { SingleBar, Presets } from "cli-progress";
import { group } from "../outputs/format.js";

export interface Progress {
  update(done: number, total: number): void;
  stop(): void;
}

const QUIET: Progress = { update() {}, stop() {} };

/** @example const p = progressBar("sieve"); p.update(3, 10); p.stop(); */
export function progressBar(label: string, unit = "shards", delayMs = 1000): Progress {
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
            format: `${label} [{bar}] {percentage}% | {value}/{total} ${unit} | {rate}/s | eta {eta_formatted}`,
            formatValue: (v, _o, type) => (type === "value" || type === "total" ? group(Math.round(v)) : String(v)),
            hideCursor: true,
            clearOnComplete: true,
          },
          Presets.shades_classic,
        );
        bar.start(total, done, { rate: "0" });
      }
      const seconds = Math.max(1e-3, (Date.now() - started) / 1000);
      bar.setTotal(total);
      bar.update(done, { rate: group(Math.round(done / seconds)) });
    },
    stop() {
      bar?.stop();
    },
  };
}
