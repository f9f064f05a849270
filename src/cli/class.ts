// glidepath class: the class card for a parity word, a number or a residue.
import type { Command } from "commander";
import { MAX_INSPECT_STEPS } from "../core/padic.js";
import { inspect, parseInspectInput } from "../jobs/inspect.js";
import { cardText } from "../outputs/card.js";
import { toExactJson } from "../core/json.js";
import { classJson } from "../outputs/summary.js";
import { intOption, jobCommand, mapOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print } from "./print.js";

interface ClassOptions extends RawOptions {
  readonly steps?: string;
}

export function classCommand(program: Command): Command {
  return jobCommand(
    program,
    "class",
    "the class card: residue, parity word, affine form T^k(a + 2^k x) = q^m x + b, stopping times, 2-adic digits; " +
      "for a number, its trajectory",
    { workers: false },
  )
    .argument("<input...>", "a number (27, -5), a residue (3 mod 16, 3 mod 2^4) or a parity word (w:1100)")
    .option("--steps <L>", `most steps to follow a trajectory: 1 to ${MAX_INSPECT_STEPS}`)
    .action((input: string[], o: ClassOptions) => {
      const map = mapOption(o.map);
      const steps = intOption("steps", o.steps, 1, MAX_INSPECT_STEPS, MAX_INSPECT_STEPS);
      const card = inspect(map, parseInspectInput(input.join(" ")), steps);
      print(o.json ? `${toExactJson(classJson(map, card))}\n` : `${cardText(map, card)}\n`);
    });
}
