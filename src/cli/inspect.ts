// glidepath class: the class card for a parity word, a number or a residue;
// glidepath periodic: the 2-adic point of an (eventually) periodic parity vector.
import { UsageError } from "../errors.js";
import { toExactJson } from "../json.js";
import type { CollatzMap } from "../map.js";
import { inspect, parseInspectInput } from "../inspect.js";
import type { ClassCard, NumberCard } from "../inspect.js";
import { cycleRepresentative, digitsOf, MAX_INSPECT_STEPS, parsePeriodicWord, periodicPoint, twoAdicDigits } from "../padic.js";
import type { ClassForm } from "../padic.js";
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

function affine(f: ClassForm): string {
  const q = BigInt(f.map.q) ** BigInt(f.odd);
  const b = f.image < 0n ? ` - ${-f.image}` : ` + ${f.image}`;
  return `T^${f.k}(${f.residue} + 2^${f.k}·x) = ${f.map.q}^${f.odd}·x${b}` + (f.k <= 64 ? `   (${q}·x${b})` : "");
}

function short(s: string, n = 200): string {
  return s.length <= n ? s : `${s.slice(0, n)}... (${s.length} in all)`;
}

function stopLine(f: ClassForm): string {
  return f.stoppingTime === null
    ? `coefficient stays >= 1 for all ${f.k} steps: no coefficient stopping time within the word`
    : `coefficient stopping time ${f.stoppingTime} (${f.stoppingTime + f.stoppingOdd!} standard steps): ${f.map.q}^${f.stoppingOdd} < 2^${f.stoppingTime}`;
}

function classText(c: ClassCard): string {
  const f = c.form;
  const lm = c.leastMember;
  return [
    `class ${short(String(f.residue), 80)} mod 2^${f.k} of ${f.map.name}`,
    `  parity word (first step first): ${short(f.word)}`,
    `  affine form: ${short(affine(f), 400)}`,
    `  odd steps m = ${f.odd}, ${f.k - f.odd} halvings; ${f.k + f.odd} standard steps`,
    `  ${stopLine(f)}`,
    `  least member ${short(String(lm.n), 80)}: ` +
      (lm.n === 0n ? "0 is not positive" : lm.descent === null ? `does not descend within ${f.k} steps` : `first descends at step ${lm.descent}`) +
      (lm.imageAtStop !== null && lm.n > 0n ? `; at the stopping time T^${f.stoppingTime}(${short(String(lm.n), 40)}) = ${short(String(lm.imageAtStop), 40)} (${lm.imageAtStop < lm.n ? "descends" : "does not descend: an exception of the sieve"})` : ""),
    `  2-adic digits of the residue (least significant first): ${short(digitsOf(f.residue, f.k))}`,
    "",
  ].join("\n");
}

function numberText(map: CollatzMap, c: NumberCard): string {
  const t = c.trajectory;
  const lines = [`n = ${short(String(c.n), 80)} under ${map.name}`];
  lines.push(`  parity vector (${t.steps} steps${t.cycle ? ", to the cycle and once round it" : ""}): ${short(t.word)}`);
  lines.push(`  stopping time (first T^j(n) < n): ${t.descent === null ? `none within ${t.steps} steps` : `${t.descent} (${t.descent + [...t.word.slice(0, t.descent)].filter((x) => x === "1").length} standard steps)`}`);
  if (c.form) lines.push(`  ${stopLine(c.form)}`);
  lines.push(`  largest value ${short(String(t.max), 80)} at step ${t.maxAt}`);
  lines.push(t.cycle ? `  enters the cycle of ${t.cycle.min} (least |x|) (period ${t.cycle.period}, ${t.cycle.odd} odd) at step ${t.cycle.entry}` : `  no cycle reached within ${t.steps} steps`);
  lines.push(`  2-adic digits (least significant first): ${short(digitsOf(c.n < 0n ? (1n << 64n) + c.n : c.n, Math.max(1, c.n < 0n ? 64 : c.n.toString(2).length)))}${c.n < 0n ? " ..." : ""}`, "");
  return lines.join("\n");
}

export function classCommand(argv: string[]): void {
  const { o, rest } = positional(argv, { map: { type: "string" }, steps: { type: "string" }, json: { type: "boolean" } });
  const map = mapOption(o.map);
  if (rest.length === 0) throw new UsageError(`give an input: ${CLASS_USAGE}`);
  const steps = intOption("steps", o.steps, 1, MAX_INSPECT_STEPS, MAX_INSPECT_STEPS);
  const card = inspect(map, parseInspectInput(rest.join(" ")), steps);
  if (o.json) process.stdout.write(toExactJson({ map: map.name, ...card }) + "\n");
  else process.stdout.write(card.kind === "class" ? classText(card.card) : numberText(map, card.card));
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
