// glidepath class: the class card for a parity word, a number or a residue;
// glidepath periodic: the 2-adic point of an (eventually) periodic parity vector.
import { UsageError } from "../errors.js";
import { toExactJson } from "../json.js";
import { inspect, parseInspectInput } from "../inspect.js";
import { abbreviate as short, cardText } from "../card.js";
import { cycleRepresentative, MAX_INSPECT_STEPS, parsePeriodicWord, periodicPoint, twoAdicDigits } from "../padic.js";
import { intOption, mapOption, parseOptions } from "./args.js";

export const CLASS_USAGE = "glidepath class [--map 3x+1] <n | a mod 2^k | w:WORD> [--steps L] [--json]";
export const PERIODIC_USAGE = "glidepath periodic [--map 3x+1] <w | u(w)> [--digits P] [--json]";

function positional(argv: string[], options: Parameters<typeof parseOptions>[1]): { o: ReturnType<typeof parseOptions>; rest: string[] } {
  // Inputs may be negative numbers or several words ("3 mod 16"): everything that is not an option is the input.
  const flags: string[] = [];
  const rest: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (a === "--") {
      rest.push(...argv.slice(i + 1));
      break;
    }
    if (a.startsWith("--")) {
      flags.push(a);
      const spec = options[a.slice(2).split("=")[0]!];
      if (spec?.type === "string" && !a.includes("=") && i + 1 < argv.length) flags.push(argv[++i]!);
    } else rest.push(a);
  }
  return { o: parseOptions(flags, options), rest };
}

export function classCommand(argv: string[]): void {
  const { o, rest } = positional(argv, { map: { type: "string" }, steps: { type: "string" }, json: { type: "boolean" } });
  const map = mapOption(o.map);
  if (rest.length === 0) throw new UsageError(`give an input: ${CLASS_USAGE}`);
  const steps = intOption("steps", o.steps, 1, MAX_INSPECT_STEPS, MAX_INSPECT_STEPS);
  const card = inspect(map, parseInspectInput(rest.join(" ")), steps);
  if (o.json) process.stdout.write(toExactJson({ map: map.name, ...card }) + "\n");
  else process.stdout.write(cardText(map, card) + "\n");
}

export function periodicCommand(argv: string[]): void {
  const { o, rest } = positional(argv, { map: { type: "string" }, digits: { type: "string" }, json: { type: "boolean" } });
  const map = mapOption(o.map);
  if (rest.length !== 1) throw new UsageError(`give one parity word: ${PERIODIC_USAGE}`);
  const digits = intOption("digits", o.digits, 1, 100_000, 64);
  const { pre, word } = parsePeriodicWord(rest[0]!);
  const p = periodicPoint(map, pre, word);
  const expansion = twoAdicDigits(p.num, p.den, digits);
  if (o.json) {
    process.stdout.write(toExactJson({ map: map.name, pre, word, numerator: p.num, denominator: p.den, digits: expansion, integer: p.integer, cycle: p.cycle }) + "\n");
    return;
  }
  const vec = `${pre}(${word})`;
  const lines = [`parity vector ${vec} repeated forever under ${map.name}`];
  lines.push(`  2-adic point: ${p.den === 1n ? String(p.num) : `${p.num}/${p.den}`}`);
  lines.push(`  2-adic digits (least significant first, ${digits}): ${short(expansion)}`);
  if (p.integer !== null && p.cycle) {
    const where = pre.length > 0 ? `reaches after ${pre.length} steps` : "lies on";
    lines.push(`  an integer: it ${where} the cycle of ${cycleRepresentative(p.cycle)} (least |x|), period ${p.cycle.length}: ${short(p.cycle.join(" -> "), 400)}`);
  } else {
    lines.push("  not an integer: no integer has this parity vector");
  }
  lines.push("");
  process.stdout.write(lines.join("\n"));
}
