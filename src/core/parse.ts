// Whole numbers as people write them, for every command and form: decimal digits, or a sum or
// difference of terms each decimal or b^e (2^50+2^32, 2^61-1), of any size.
import { UsageError } from "./errors.js";

/** The largest exponent accepted in b^e (2^100000 has 30,103 digits). */
const MAX_EXPONENT = 100_000;

/**
 * A whole number of any size: decimal digits, or terms each decimal or b^e joined by + and -, the
 * first term positive; the value may not be negative.
 * @example parseWhole("--from", "2^40+5") // 1099511627781n
 * @example parseWhole("N", "2^61-1") // 2305843009213693951n
 */
export function parseWhole(name: string, text: string | undefined): bigint {
  if (text === undefined) throw new UsageError(`${name} is required`);
  const t = text.replace(/\s+/g, "");
  if (!/^(\d+(\^\d+)?)([+-]\d+(\^\d+)?)*$/.test(t))
    throw new UsageError(`${name} must be a whole number (digits, or powers such as 2^50+2^32 or 2^61-1), got "${text}"`);
  const value = t.match(/[+-]?[^+-]+/g)!.reduce((s, term) => {
    const [b, e] = term.replace(/^[+-]/, "").split("^");
    if (e !== undefined && Number(e) > MAX_EXPONENT) throw new UsageError(`${name}: exponent ${e} is too large (at most ${MAX_EXPONENT})`);
    const v = e === undefined ? BigInt(b!) : BigInt(b!) ** BigInt(e);
    return term.startsWith("-") ? s - v : s + v;
  }, 0n);
  if (value < 0n) throw new UsageError(`${name} must be a whole number, got "${text}" = ${value}`);
  return value;
}

/**
 * A whole number from min to max (max Infinity: no upper bound), written as digits: the one check of
 * small counts and depths for every form; `name` is how the message names the field.
 * @example parseCount("depth", "20", 0, 40) // 20
 */
export function parseCount(name: string, text: string, min: number, max: number): number {
  const t = text.trim();
  const n = Number(t);
  if (!/^\d+$/.test(t) || n < min || n > max)
    throw new UsageError(`${name} must be a whole number from ${min}${max === Number.POSITIVE_INFINITY ? " up" : ` to ${max}`}`);
  return n;
}

/** How a front end names the ends of a range [from, to) in its messages (the CLI: --from and --to; the page: From and To). */
export interface RangeWords {
  readonly from: string;
  readonly to: string;
  /** How the range reads: "[FROM, TO)". */
  readonly range: string;
  /** A refused To names To's value alone (beside its field), not both ends. */
  readonly toAlone?: boolean;
  /** A number as the messages show it (default: its digits). */
  readonly show?: (x: bigint) => string;
}

/** The library's words: from, to, [from, to). */
export const RANGE_WORDS: RangeWords = { from: "from", to: "to", range: "[from, to)" };

/** A range refused: `end` names the end at fault (a form shows the message beside that field). */
export class RangeEndError extends UsageError {
  constructor(
    readonly end: "from" | "to",
    message: string,
  ) {
    super(message);
  }
}

/**
 * The one check of a range [from, to) for every front end and the plan: from at least 1, to above from.
 * @example checkRange(0n, 10n, { from: "--from", to: "--to", range: "[FROM, TO)" }) // throws "--from must be at least 1, got 0"
 */
export function checkRange(from: bigint, to: bigint, words: RangeWords = RANGE_WORDS): void {
  const { from: f, to: t, show = String } = words;
  if (from < 1n) throw new RangeEndError("from", `${f} must be at least 1, got ${show(from)}`);
  if (to <= from)
    throw new RangeEndError(
      "to",
      `${t} must be above ${f} (the range is ${words.range}), got ${words.toAlone ? show(to) : `${f} ${show(from)} ${t} ${show(to)}`}`,
    );
}

/**
 * A range [from, to) as a command line gives it: both ends parsed (parseWhole) and checked (checkRange).
 * @example parseRange("1", "2^20", { from: "--from", to: "--to", range: "[FROM, TO)" }) // { from: 1n, to: 1048576n }
 */
export function parseRange(fromText: string | undefined, toText: string | undefined, words: RangeWords = RANGE_WORDS) {
  const from = parseWhole(words.from, fromText);
  const to = parseWhole(words.to, toText);
  checkRange(from, to, words);
  return { from, to };
}
