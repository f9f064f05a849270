// Number formatting for people (CLI text and the web page); never used for arithmetic.

/** Digits in groups of three. @example group(1234567n) // "1,234,567" */
export function group(n: bigint | number): string {
  return n.toString().replace(/\B(?=(\d{3})+(?!\d))/g, ",");
}
