// The cycle bound for people and for JSON: the statement, the least pair, the pairs, the continued fraction.
import type { CycleBound, Decision, Frac } from "../core/cyclebound.js";
import type { CycleBoundReport, KnownCycle } from "../jobs/cyclebound.js";
import { group, plural } from "./format.js";

const fracText = (f: Frac) => (f.den === 0n ? "1/0" : `${f.num}/${f.den}`);
const decisionJson = (d: Decision) => (d.by === "powers" ? { by: "powers" } : { by: "bracket", bits: d.bits });
const decisionText = (d: Decision) => (d.by === "powers" ? "powers compared in BigInt" : `a ${d.bits}-bit bracket of the logarithm`);

/** X as people write it where it is a power of two or a small multiple of one. */
export function limitText(X: bigint): string {
  let e = 0;
  while (X > 0n && ((X >> BigInt(e)) & 1n) === 0n) e++;
  const odd = X >> BigInt(e);
  return e >= 10 ? `${group(X)} = ${odd === 1n ? "" : `${odd}·`}2^${e}` : group(X);
}

/** The window, in words: the inequality of a cycle with every element >= X. */
export function windowText(b: CycleBound): string {
  const { q, r } = b.map;
  if (b.side === "above") return `${q}^m < 2^ℓ <= (${q} + ${r}/X)^m`;
  return b.lowerIsOne ? `2^m <= 2^ℓ < ${q}^m (ℓ >= m; ${q} - ${-r}/X <= 2)` : `(${q} - ${-r}/X)^m <= 2^ℓ < ${q}^m`;
}

/**
 * The statement in one line, with the numbers.
 * @example cycleBoundLine(bound) // "every n below 2^40 verified: any other cycle of 3x+1 (...) has at least 10,781,274 odd elements and 17,087,915 elements (...)"
 */
export function cycleBoundLine(b: CycleBound, exceptions?: readonly KnownCycle[]): string {
  const known =
    exceptions === undefined
      ? ""
      : exceptions.length === 0
        ? ""
        : ` (the cycle${exceptions.length === 1 ? "" : "s"} of ${exceptions.map((c) => c.min).join(", ")} aside)`;
  return (
    `every n below X = ${limitText(b.X)} verified for ${b.map.name}: any other cycle${known}, one with all its elements >= X, ` +
    `has at least ${plural(b.least.odd, "odd element")} and ${plural(b.least.length, "element")} (steps of T; ` +
    `${plural(b.least.length + b.least.odd, "standard step")})`
  );
}

const cycleJson = (c: KnownCycle) => ({ min: c.min, length: c.period, odd: c.odd });

/** The fields of `glidepath cycle-bound --json`. */
export function cycleBoundJson(rep: CycleBoundReport, source: Record<string, unknown>) {
  const b = rep.bound;
  return {
    map: b.map.name,
    q: b.map.q,
    r: b.map.r,
    ...source,
    X: b.X,
    convention: "length = steps of T(n) = n/2 | (q n + r)/2 (elements of the cycle); odd = odd elements; standard = length + odd",
    window: windowText(b),
    least: { length: b.least.length, odd: b.least.odd, standard: b.least.length + b.least.odd },
    at: { k: b.at.k, j: b.at.j, a: b.at.a },
    previous: b.previous,
    neighbour: b.neighbour,
    confirmed: {
      qSide: decisionJson(b.confirmed.qSide),
      xSide: decisionJson(b.confirmed.xSide),
      previous: decisionJson(b.confirmed.previous),
    },
    statement: cycleBoundLine(b, rep.below),
    exceptions: rep.below.map(cycleJson),
    knownAbove: rep.above.map(cycleJson),
    continuedFraction: {
      of: `log2 ${b.map.q}`,
      terms: b.terms,
      convergents: b.convergents,
      intermediates: b.visited.map((v) => ({ k: v.k, j: v.j, num: v.fraction.num, den: v.fraction.den })),
      intermediateCount: b.visitedCount,
    },
    pairs: {
      maxOdd: rep.maxOdd,
      count: rep.pairs.count,
      listed: rep.pairs.listed.map((p) => ({ length: p.length, odd: p.odd })),
      more: rep.pairs.more,
    },
  };
}

/** The report as text. */
export function cycleBoundText(rep: CycleBoundReport, source: string, knownFrom: string): string {
  const b = rep.bound;
  const { q, r } = b.map;
  const side = b.side === "above" ? "above" : "below";
  const sideK = b.side === "above" ? "k odd" : "k even";
  const lines = [
    `cycles of ${b.map.name} with every element >= X = ${limitText(b.X)} (${source})`,
    `  a cycle of ℓ elements (steps of T), m of them odd (x_1..x_m), has 2^ℓ = ∏ (${q} ${r > 0 ? "+" : "-"} ${Math.abs(r)}/x_i); with every x_i >= X: ${windowText(b)}`,
    `  least: m = ${plural(b.least.odd, "odd element")}, ℓ = ${plural(b.least.length, "element")} (${plural(b.least.length + b.least.odd, "standard step")}, ℓ + m)`,
    `    ℓ/m = ${fracText({ num: b.least.length, den: b.least.odd })}: the ${b.at.j === b.at.a ? `convergent p_${b.at.k}/q_${b.at.k}` : `intermediate fraction (p_${b.at.k - 2} + ${b.at.j}·p_${b.at.k - 1})/(q_${b.at.k - 2} + ${b.at.j}·q_${b.at.k - 1})`} of log2 ${q}`,
    `    confirmed: ${b.side === "above" ? `2^ℓ > ${q}^m` : `2^ℓ < ${q}^m`} by ${decisionText(b.confirmed.qSide)}; the X side by ${decisionText(b.confirmed.xSide)}; ` +
      `the fraction before it ${side} log2 ${q}, ${fracText(b.previous)}, is outside the window (${decisionText(b.confirmed.previous)}), ` +
      `and every fraction strictly between that one and ${fracText(b.neighbour)} (so every admissible one) has numerator and denominator at least these`,
    `  so: ${cycleBoundLine(b, rep.below)}`,
    `  known cycles with an element below X (${knownFrom}): ${rep.below.length === 0 ? "none" : rep.below.map((c) => `${c.min} (ℓ ${c.period}, m ${c.odd})`).join(", ")}`,
    ...(rep.above.length > 0
      ? [
          `  known cycles lying at or above X (each admitted, none shorter than the bound): ${rep.above.map((c) => `${c.min} (ℓ ${c.period}, m ${c.odd})`).join(", ")}`,
        ]
      : []),
    "",
    `admissible pairs (ℓ, m) with m <= ${group(rep.maxOdd)}: ${group(rep.pairs.count)}${rep.pairs.listed.length > 0 ? `, the ${rep.pairs.listed.length} with least m:` : ""}`,
    ...rep.pairs.listed.map((p) => `  ℓ = ${group(p.length).padStart(20)}   m = ${group(p.odd).padStart(20)}`),
    ...(rep.pairs.more > 0n && rep.pairs.listed.length > 0 ? [`  ... and ${plural(rep.pairs.more, "more pair")}`] : []),
    "",
    `continued fraction of log2 ${q} = [${b.terms[0]}; ${b.terms.slice(1).join(", ")}] (to a_${b.terms.length - 1})`,
    `  convergents p_k/q_k: ${b.convergents.map(fracText).join("  ")}`,
    `  intermediate fractions ${side} log2 ${q} (${sideK}, j = 1..a_k), in the order visited: ${b.visited.map((v) => fracText(v.fraction)).join("  ")}` +
      (b.visitedCount > b.visited.length ? ` ... (${group(b.visitedCount)} in all)` : ""),
    "",
  ];
  return lines.join("\n");
}
