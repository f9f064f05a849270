// The inspector: a parity word, a number or a residue to a class card, and a number's trajectory.
import { parseMap } from "../../src/core/map.js";
import { inspect, parseInspectInput } from "../../src/jobs/inspect.js";
import type { Card } from "../../src/jobs/inspect.js";
import { iterate } from "../../src/core/padic.js";
import { cardText } from "../../src/outputs/card.js";
import { drawTrajectory } from "./charts.js";
import { $, fieldError, parseField, ResultsPanel } from "../dom.js";

const panel = new ResultsPanel("inspect-results", "inspect-stale", "inspect-form");

/** Shows the card for `text`; returns false (with a message beside the field, the old card marked stale) on bad input. */
export function runInspect(text: string, mapText: string): boolean {
  const ok = showCard(text, mapText);
  if (!ok) panel.markStale("the inputs above are not valid");
  return ok;
}

function showCard(text: string, mapText: string): boolean {
  const map = parseField("inspect-map", parseMap, mapText);
  const input = parseField("inspect-input", parseInspectInput, text);
  if (!map || !input) return false;
  let card: Card;
  try {
    card = inspect(map, input);
  } catch (e) {
    fieldError("inspect-input", (e as Error).message);
    return false;
  }
  const plot = $("inspect-plot");
  panel.shown(`${text.trim()} under ${map.name}`);
  $("inspect-card").textContent = cardText(map, card);
  plot.hidden = card.kind !== "number";
  if (card.kind === "number") {
    const t = card.card.trajectory;
    const values: bigint[] = [t.n];
    for (let i = 0, v = t.n; i < t.steps; i++) {
      v = iterate(map, v, 1);
      values.push(v);
    }
    drawTrajectory(values);
  }
  return true;
}
