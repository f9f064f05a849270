// The text of a class card (CLI `glidepath class` and the web inspector show the same lines).
import type { CollatzMap } from "../core/map.js";
import type { Card, ClassCard, NumberCard } from "../jobs/inspect.js";
import { digitsOf, parityWord } from "../core/padic.js";
import type { ClassForm } from "../core/padic.js";
import { bitLength } from "../core/arith.js";
import { plural } from "./format.js";

/** The right side q^m·x + b of a class's affine form. @example affineText(3, 2, 2n) // "3^2·x + 2" */
export function affineText(q: number, odd: number, image: bigint): string {
  return `${q}^${odd}·x ${image < 0n ? `- ${-image}` : `+ ${image}`}`;
}

function affine(f: ClassForm): string {
  const q = BigInt(f.map.q) ** BigInt(f.odd);
  const b = f.image < 0n ? ` - ${-f.image}` : ` + ${f.image}`;
  return `T^${f.k}(${f.residue} + 2^${f.k}·x) = ${affineText(f.map.q, f.odd, f.image)}` + (f.k <= 64 ? `   (${q}·x${b})` : "");
}

/** The odd steps of a parity word (its 1s). */
const odds = (word: string) => [...word].filter((x) => x === "1").length;

/** s itself, or its first n characters and its length. */
export function abbreviate(s: string, n = 200): string {
  return s.length <= n ? s : `${s.slice(0, n)}... (${s.length} in all)`;
}

function stopLine(f: ClassForm): string {
  return f.stoppingTime === null
    ? `coefficient stays >= 1 for all ${plural(f.k, "step")} of the word: no coefficient stopping time within it`
    : `coefficient stopping time ${f.stoppingTime} (${f.stoppingTime + f.stoppingOdd!} standard steps): ${f.map.q}^${f.stoppingOdd} < 2^` +
        `${f.stoppingTime}`;
}

function classText(c: ClassCard): string {
  const f = c.form;
  const lm = c.leastMember;
  return [
    `class ${abbreviate(String(f.residue), 80)} mod 2^${f.k} of ${f.map.name}`,
    `  parity word (first step first): ${abbreviate(f.word)}`,
    `  affine form: ${abbreviate(affine(f), 400)}`,
    `  odd steps m = ${f.odd}, ${plural(f.k - f.odd, "halving")}; ${plural(f.k + f.odd, "standard step")}`,
    `  ${stopLine(f)}`,
    `  least member ${abbreviate(String(lm.n), 80)}: ` +
      (lm.n === 0n
        ? "0 is not positive"
        : lm.descent === null
          ? `does not descend within ${lm.searched} steps`
          : `first descends at step ${lm.descent} (${lm.descent + odds(parityWord(f.map, lm.n, lm.descent))} standard steps)`) +
      (lm.imageAtStop !== null && lm.n > 0n
        ? `; at the stopping time T^${f.stoppingTime}(${abbreviate(String(lm.n), 40)}) = ${abbreviate(String(lm.imageAtStop), 40)} (` +
          `${lm.imageAtStop < lm.n ? "descends" : "does not descend: an exception of the sieve"})`
        : ""),
    `  2-adic digits of the residue (least significant first): ${abbreviate(digitsOf(f.residue, f.k))}`,
  ].join("\n");
}

function numberText(map: CollatzMap, c: NumberCard): string {
  const t = c.trajectory;
  const lines = [`n = ${abbreviate(String(c.n), 80)} under ${map.name}`];
  lines.push(`  parity vector (${t.steps} steps${t.cycle ? ", to the cycle and once round it" : ""}): ${abbreviate(t.word)}`);
  const oddBefore = (j: number) => [...t.word.slice(0, j)].filter((x) => x === "1").length;
  const descent = t.descent === null ? `none within ${t.steps} steps` : `${t.descent} (${t.descent + oddBefore(t.descent)} standard steps)`;
  lines.push(`  stopping time (first T^j(n) < n): ${descent}`);
  if (c.n > 0n)
    lines.push(
      `  total stopping time (first T^j(n) = 1): ${c.delay ? `${c.delay.steps} (${c.delay.steps + c.delay.odd} standard steps)` : `1 not reached within ${t.steps} steps`}`,
    );
  if (c.form) lines.push(`  ${stopLine(c.form)}`);
  // the standard convention first: published tables of 3n+1 use it (27 peaks at 9232 there, 4616 under T)
  lines.push(
    `  largest value in standard steps: ${abbreviate(String(t.standardMax), 80)} at standard step ${t.standardMaxAt}; ` +
      `under T (${map.q}n${map.r < 0 ? "-" : "+"}${Math.abs(map.r)} halved in the same step): ${abbreviate(String(t.max), 80)} at step ${t.maxAt}`,
  );
  lines.push(
    t.cycle
      ? `  enters a cycle at step ${t.cycle.entry} (${t.cycle.entry + oddBefore(t.cycle.entry)} standard steps): period ` +
          `${t.cycle.period} (${t.cycle.period + t.cycle.odd} standard steps), ${t.cycle.odd} odd; its member of least ` +
          `absolute value: ${t.cycle.min}`
      : `  no cycle reached within ${t.steps} steps`,
  );
  lines.push(
    `  2-adic digits (least significant first): ` +
      `${abbreviate(digitsOf(c.n < 0n ? (1n << 64n) + c.n : c.n, Math.max(1, c.n < 0n ? 64 : bitLength(c.n))))}${c.n < 0n ? " ..." : ""}`,
  );
  return lines.join("\n");
}

/** The card as lines of text. @example cardText(map, inspect(map, parseInspectInput("3 mod 16"))) */
export function cardText(map: CollatzMap, card: Card): string {
  return card.kind === "class" ? classText(card.card) : numberText(map, card.card);
}
