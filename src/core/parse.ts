// Whole numbers as people write them, for every command and form: decimal digits, or a sum of terms
// each decimal or b^e (2^50+2^32), of any size.
import { UsageError } from "./errors.js";

/** The largest exponent accepted in b^e (2^100000 has 30,103 digits). */
const MAX_EXPONENT = 100_000;

/**
 * A whole number of any size: decimal digits, or a sum of terms each decimal or b^e.
 * @example parseWhole("--from", "2^40+5") // 1099511627781n
 */
export function parseWhole(name: string, text: string | undefined): bigint {
  if (text === undefined) throw new UsageError(`${name} is required`);
  const t = text.replace(/\s+/g, "");
  if (!/^(\d+(\^\d+)?)(\+\d+(\^\d+)?)*$/.test(t))
    throw new UsageError(`${name} must be a whole number (digits, or powers such as 2^50+2^32), got "${text}"`);
  return t.split("+").reduce((s, term) => {
    const [b, e] = term.split("^");
    if (e !== undefined && Number(e) > MAX_EXPONENT) throw new UsageError(`${name}: exponent ${e} is too large (at most ${MAX_EXPONENT})`);
    return s + (e === undefined ? BigInt(b!) : BigInt(b!) ** BigInt(e));
  }, 0n);
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
