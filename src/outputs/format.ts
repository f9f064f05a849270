// Number formatting for people (CLI text and the web page); never used for arithmetic.

/**
 * Digits in groups of three, linear in the number of digits (numbers here reach thousands of digits).
 * @example group(1234567n) // "1,234,567"
 */
export function group(n: bigint | number): string {
  const s = n.toString();
  const sign = s.startsWith("-") ? "-" : "";
  const d = sign ? s.slice(1) : s;
  if (d.length <= 3 || /[^0-9]/.test(d)) return s;
  const head = d.length % 3 || 3;
  const parts = [d.slice(0, head)];
  for (let i = head; i < d.length; i += 3) parts.push(d.slice(i, i + 3));
  return sign + parts.join(",");
}

/**
 * survivors / 2^depth to `digits` decimals, rounded half up, from exact integers.
 * @example density(3830n, 14) // "0.23376465"
 */
export function density(survivors: bigint, depth: number, digits = 8): string {
  const scaled = (survivors * 10n ** BigInt(digits) * 2n + (1n << BigInt(depth))) >> BigInt(depth + 1);
  const s = scaled.toString().padStart(digits + 1, "0");
  return `${s.slice(0, -digits)}.${s.slice(-digits)}`;
}

/** "1 step", "2 steps". */
export function plural(n: number | bigint, word: string, many = `${word}s`): string {
  return `${group(n)} ${n === 1 || n === 1n ? word : many}`;
}

/**
 * value / n to three decimals, rounded half up, grouped (for reading only: the value itself is
 * decided exactly elsewhere).
 * @example ratioText(10n, 3n) // "3.333"
 */
export function ratioText(value: bigint, n: bigint): string {
  const scaled = (value * 2000n + n) / (2n * n);
  const s = scaled.toString().padStart(4, "0");
  return `${group(BigInt(s.slice(0, -3)))}.${s.slice(-3)}`;
}

export { sha256Hex } from "../engine/plan.js";
