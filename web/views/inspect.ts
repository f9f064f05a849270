// The inspector: a parity word, a number or a residue to a class card, and a number's trajectory.
import { parseMap } from "../../src/map.js";
import { inspect, parseInspectInput } from "../../src/inspect.js";
import { digitsOf, iterate } from "../../src/padic.js";
import type { ClassForm } from "../../src/padic.js";
import { drawTrajectory } from "./charts.js";

const $ = <T extends HTMLElement>(id: string) => document.getElementById(id) as T;

function short(s: string, n = 160): string {
  return s.length <= n ? s : `${s.slice(0, n)}… (${s.length} in all)`;
}

function formLines(f: ClassForm): string[] {
  const b = f.image < 0n ? `- ${-f.image}` : `+ ${f.image}`;
  return [
    `class ${short(String(f.residue), 60)} mod 2^${f.k} of ${f.map.name}`,
    `parity word (first step first): ${short(f.word)}`,
    `affine form: T^${f.k}(${short(String(f.residue), 40)} + 2^${f.k}·x) = ${f.map.q}^${f.odd}·x ${short(b, 60)}`,
    `odd steps m = ${f.odd}, ${f.k - f.odd} halvings, ${f.k + f.odd} standard steps`,
    f.stoppingTime === null
      ? `coefficient stays >= 1 for all ${f.k} steps`
      : `coefficient stopping time ${f.stoppingTime} (${f.stoppingTime + f.stoppingOdd!} standard steps): ${f.map.q}^${f.stoppingOdd} < 2^${f.stoppingTime}`,
    `2-adic digits of the residue (least significant first): ${short(digitsOf(f.residue, f.k))}`,
  ];
}

function err(id: string, text: string): void {
  $(`${id}-error`).textContent = text;
  $(id).setAttribute("aria-invalid", text ? "true" : "false");
}

/** Shows the card for `text`; returns false (with a message beside the field) on bad input. */
export function runInspect(text: string, mapText: string): boolean {
  let ok = true;
  let map;
  try {
    map = parseMap(mapText.trim());
    err("inspect-map", "");
  } catch (e) {
    err("inspect-map", (e as Error).message);
    ok = false;
  }
  let input;
  try {
    input = parseInspectInput(text);
    err("inspect-input", "");
  } catch (e) {
    err("inspect-input", (e as Error).message);
    ok = false;
  }
  if (!ok || !map || !input) return false;
  let card;
  try {
    card = inspect(map, input);
  } catch (e) {
    err("inspect-input", (e as Error).message);
    return false;
  }
  const plot = $("inspect-plot");
  if (card.kind === "class") {
    const lm = card.card.leastMember;
    const f = card.card.form;
    $("inspect-card").textContent = [
      ...formLines(f),
      lm.n === 0n
        ? "least member 0 is not positive"
        : `least member ${short(String(lm.n), 40)}: ${lm.descent === null ? `does not descend within ${f.k} steps` : `first descends at step ${lm.descent}`}` +
          (lm.imageAtStop !== null ? `; T^${f.stoppingTime}(a) ${lm.imageAtStop < lm.n ? "<" : ">="} a` : ""),
    ].join("\n");
    plot.hidden = true;
  } else {
    const t = card.card.trajectory;
    $("inspect-card").textContent = [
      `n = ${short(String(t.n), 60)} under ${map.name}`,
      `parity vector (${t.steps} steps${t.cycle ? ", to its cycle and once round it" : ""}): ${short(t.word)}`,
      `stopping time (first T^j(n) < n): ${t.descent ?? `none within ${t.steps} steps`}`,
      `largest value ${short(String(t.max), 60)} at step ${t.maxAt}`,
      t.cycle ? `enters the cycle of ${t.cycle.min} (period ${t.cycle.period}) at step ${t.cycle.entry}` : `no cycle within ${t.steps} steps`,
      ...(card.card.form?.stoppingTime != null ? [`coefficient stopping time ${card.card.form.stoppingTime}`] : []),
    ].join("\n");
    const values: bigint[] = [t.n];
    for (let i = 0, v = t.n; i < t.steps; i++) values.push((v = iterate(map, v, 1)));
    plot.hidden = false;
    drawTrajectory(values);
  }
  return true;
}
