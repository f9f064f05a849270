// glidepath periodic: the 2-adic point of an (eventually) periodic parity vector, and its cycle.
import type { Command } from "commander";
import { cycleRepresentative, parsePeriodicWord, periodicPoint, twoAdicDigits } from "../core/padic.js";
import { abbreviate } from "../outputs/card.js";
import { toExactJson } from "../core/json.js";
import { periodicJson } from "../outputs/summary.js";
import { intOption, jobCommand, mapOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print } from "./print.js";

interface PeriodicOptions extends RawOptions {
  readonly digits?: string;
}

export function periodicCommand(program: Command): Command {
  return jobCommand(
    program,
    "periodic",
    "the 2-adic point whose parity vector is w (or u then w) repeated forever, and its cycle when it is an integer",
    { workers: false },
  )
    .argument("<word>", "w, (w) or u(w), with digits 0 and 1, first step first")
    .option("--digits <P>", "2-adic digits to print: 1 to 100000", "64")
    .action((text: string, o: PeriodicOptions) => {
      const map = mapOption(o.map);
      const digits = intOption("digits", o.digits, 1, 100_000);
      const { pre, word } = parsePeriodicWord(text);
      const p = periodicPoint(map, pre, word);
      const expansion = twoAdicDigits(p.num, p.den, digits);
      if (o.json) return print(`${toExactJson(periodicJson(map, p, expansion))}\n`);
      const lines = [`parity vector ${pre}(${word}) repeated forever under ${map.name}`];
      lines.push(`  2-adic point: ${p.den === 1n ? String(p.num) : `${p.num}/${p.den}`}`);
      lines.push(`  2-adic digits (least significant first, ${digits}): ${abbreviate(expansion)}`);
      if (p.integer !== null && p.cycle) {
        const where = pre.length > 0 ? `reaches after ${pre.length} steps` : "lies on";
        lines.push(
          `  an integer: it ${where} the cycle of ${cycleRepresentative(p.cycle)} (least |x|), period ${p.cycle.length}: ` +
            `${abbreviate(p.cycle.join(" -> "), 400)}`,
        );
      } else {
        lines.push("  not an integer: no integer has this parity vector");
      }
      print(`${lines.join("\n")}\n`);
    });
}
