// glidepath counts: the exact counter (BigInt dynamic programming, no kernel), any depth to 10,000.
// Rows are written as the counter makes them, so memory does not grow with the depth (the (j, m)
// table at depth 10,000 is tens of gigabytes of text); the event loop runs between rows, so Ctrl-C
// and a closed pipe end it at once.
import type { Command } from "commander";
import { exactRows, MAX_EXACT_DEPTH } from "../core/exact.js";
import type { ExactRow } from "../core/exact.js";
import type { CollatzMap } from "../core/map.js";
import { toExactJson } from "../core/json.js";
import { countsHeadJson, countsOddJson, levelJson } from "../outputs/summary.js";
import { intOption, jobCommand, mapOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print, yielder } from "./print.js";
import { progressBar } from "../node/progress.js";
import { levelHeader, levelLine, levelWidths } from "./report.js";

interface CountsOptions extends RawOptions {
  readonly byOdd?: boolean;
}

export function countsCommand(program: Command): Command {
  return jobCommand(
    program,
    "counts",
    `survivor and stopped counts by exact dynamic programming (BigInt), any depth up to ${MAX_EXACT_DEPTH.toLocaleString("en-US")}`,
    { workers: false },
  )
    .option("--depth <K>", `depth: 0 to ${MAX_EXACT_DEPTH}`)
    .option("--by-odd", "add the table by (depth, odd steps m): classes alive and stopping at (j, m)")
    .action((o: CountsOptions) => counts(o));
}

/** One pass of the counter, each row handed to `each`, with progress and yields between rows. */
async function pass(map: CollatzMap, depth: number, label: string, each: (row: ExactRow) => void): Promise<void> {
  const bar = progressBar(label);
  const pause = yielder();
  try {
    for (const row of exactRows(map, depth)) {
      each(row);
      if ((row.depth & 15) === 0) bar.update(row.depth, depth);
      await pause();
    }
  } finally {
    bar.stop();
  }
}

async function counts(o: CountsOptions): Promise<void> {
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 0, MAX_EXACT_DEPTH);
  const started = performance.now();
  const w = levelWidths(depth, 1n << BigInt(depth));
  if (o.json) print(`${toExactJson(countsHeadJson(map, depth)).slice(0, -1)},"levels":[`);
  else print(`exact counts for ${map.name} to depth ${depth} (lattice-path dynamic programming)\n\n${levelHeader(w)}\n`);
  await pass(map, depth, `counts ${map.name} to depth ${depth}`, (row) => {
    if (o.json) print(`${row.depth > 0 ? "," : ""}${toExactJson(levelJson(row))}`);
    else print(`${levelLine(w, row, row.stoppedOdd)}\n`);
  });
  if (o.byOdd) {
    // a second pass: the (j, m) rows follow the levels (the counter is cheap next to the writing)
    let first = true;
    print(o.json ? `],"byOdd":[` : "\nby odd steps m: depth j, m, classes alive at (j, m), classes stopping at (j, m)\n");
    await pass(map, depth, `counts by odd steps to depth ${depth}`, (row) => {
      const parts: string[] = [];
      row.live.forEach((live, i) => {
        const m = row.mLow + i;
        const stopped = m === row.stoppedOdd ? row.stopped : 0n;
        if (live === 0n && stopped === 0n) return;
        if (o.json) parts.push(toExactJson(countsOddJson(row.depth, m, live, stopped)));
        else parts.push(`  j=${row.depth} m=${m} live=${live}${stopped ? ` stopped=${stopped}` : ""}\n`);
      });
      if (parts.length === 0) return;
      print(o.json ? `${first ? "" : ","}${parts.join(",")}` : parts.join(""));
      first = false;
    });
  }
  const seconds = (performance.now() - started) / 1000;
  print(o.json ? `],"seconds":${Number(seconds.toFixed(3))}}\n` : `\ncomputed in ${seconds.toFixed(2)} s\n`);
}
