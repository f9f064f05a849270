// The class inspector: one input (parity word, number, or residue a mod 2^k) to a class card.
import type { CollatzMap } from "../core/map.js";
import { UsageError } from "../core/errors.js";
import {
  delayBig,
  classFromResidue,
  classFromWord,
  coefficientStoppingTime,
  firstDescent,
  iterate,
  MAX_INSPECT_STEPS,
  parityWord,
  trajectory,
} from "../core/padic.js";
import type { ClassForm, Trajectory } from "../core/padic.js";
import { parseWhole } from "../core/parse.js";

export type InspectInput =
  | { readonly kind: "word"; readonly word: string }
  | { readonly kind: "number"; readonly n: bigint }
  | { readonly kind: "residue"; readonly a: bigint; readonly k: number };

/**
 * Reads "w:1101000" (a parity word, first step first), "27", "2^100+1" or "2^9999-1" (a number, any
 * size, may be negative)
 * or "27 mod 2^5" / "27 mod 32" (a residue class).
 * @example parseInspectInput("3 mod 16") // { kind: "residue", a: 3n, k: 4 }
 */
export function parseInspectInput(text: string): InspectInput {
  const t = text.trim().replace(/\s+/g, " ");
  let m = /^w:(.*)$/.exec(t);
  if (m) return { kind: "word", word: m[1]! };
  m = /^(\d+) mod (?:2\^(\d+)|(\d+))$/.exec(t);
  if (m) {
    let k: number;
    if (m[2] !== undefined) k = Number(m[2]);
    else {
      const mod = BigInt(m[3]!);
      if (mod === 1n) throw new UsageError("modulus 1 = 2^0 holds every number: give a modulus 2^k with k >= 1");
      if (mod < 2n || (mod & (mod - 1n)) !== 0n) throw new UsageError(`modulus ${m[3]} is not a power of two (write a mod 2^k)`);
      k = mod.toString(2).length - 1;
    }
    return { kind: "residue", a: BigInt(m[1]!), k };
  }
  if (/^-?\d+$/.test(t)) return { kind: "number", n: BigInt(t) };
  // sums and differences of powers, as every other field takes (2^100+1, 2^9999-1); negative as -(...)
  const neg = /^-\s*(.*)$/.exec(t);
  if (/^[\d^+\- ]+$/.test(neg ? neg[1]! : t)) {
    const n = parseWhole("the number", neg ? neg[1]! : t);
    return { kind: "number", n: neg ? -n : n };
  }
  throw new UsageError(`cannot read "${text}": give a number (27), a residue (27 mod 2^5) or a parity word (w:1101000)`);
}

export interface ClassCard {
  readonly form: ClassForm;
  /** The least member's own trajectory: its first descent (within `steps`), its value at the stopping time. */
  readonly leastMember: {
    readonly n: bigint;
    readonly descent: number | null;
    readonly searched: number;
    readonly imageAtStop: bigint | null;
  };
}

export interface NumberCard {
  readonly n: bigint;
  readonly trajectory: Trajectory;
  /** The class given by the first min(steps, 64+) parities: its coefficient stopping time. */
  readonly form: ClassForm | null;
  /** n's total stopping time (steps of T to reach 1, and the odd steps among them) within the trajectory's steps; null when 1 is not reached there or n < 1. */
  readonly delay: { readonly steps: number; readonly odd: number } | null;
}

export type Card = { readonly kind: "class"; readonly card: ClassCard } | { readonly kind: "number"; readonly card: NumberCard };

function classCard(form: ClassForm, steps: number): ClassCard {
  const n = form.residue;
  const descent = n > 0n ? firstDescent(form.map, n, steps) : null;
  const imageAtStop = form.stoppingTime === null ? null : iterate(form.map, n, form.stoppingTime);
  return { form, leastMember: { n, descent, searched: steps, imageAtStop } };
}

/**
 * The card for an input: a class (word or residue) or a number's trajectory, `steps` at most.
 * @example inspect(parseMap("3x+1"), parseInspectInput("3 mod 16")).card.form.stoppingTime // 4
 */
export function inspect(map: CollatzMap, input: InspectInput, steps = MAX_INSPECT_STEPS): Card {
  if (!Number.isInteger(steps) || steps < 1 || steps > MAX_INSPECT_STEPS)
    throw new UsageError(`steps must be between 1 and ${MAX_INSPECT_STEPS}`);
  switch (input.kind) {
    case "word":
      return { kind: "class", card: classCard(classFromWord(map, input.word), steps) };
    case "residue":
      return { kind: "class", card: classCard(classFromResidue(map, input.a, input.k), steps) };
    case "number": {
      const t = trajectory(map, input.n, steps);
      // the class of n's first parities, followed past the cycle if need be, up to its coefficient
      // stopping time (the depth where the sieve cuts n's class) or `steps`
      const stop = coefficientStoppingTime(map, input.n, steps);
      const length = Math.max(t.steps, stop ?? 0);
      const form = length > 0 ? classFromWord(map, parityWord(map, input.n, length)) : null;
      const delay = input.n > 0n ? delayBig(map, input.n, t.steps) : null;
      return { kind: "number", card: { n: input.n, trajectory: t, form, delay } };
    }
  }
}
