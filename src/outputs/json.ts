// JSON with exact integers: BigInt values are written as bare digits, never as floats or strings.

const TAG = "\u0000bigint:";

/** @example toExactJson({ n: 2n ** 70n }) // '{"n":1180591620717411303424}' */
export function toExactJson(value: unknown, indent?: number): string {
  const text = JSON.stringify(value, (_k, v: unknown) => (typeof v === "bigint" ? TAG + v.toString() : v), indent);
  return text.replace(/"\\u0000bigint:(-?\d+)"/g, "$1");
}

/** Parses JSON keeping every integer literal exact as a BigInt (for tests and tools reading our output). */
export function parseExactJson(text: string): unknown {
  // Wrap bare integers outside strings in a tagged string, then revive them.
  const tagged = text.replace(/"(?:[^"\\]|\\.)*"|-?\d+(?:\.\d+)?(?:[eE][+-]?\d+)?/g, (tok) =>
    tok.startsWith('"') || /[.eE]/.test(tok) ? tok : `"\\u0000bigint:${tok}"`,
  );
  return JSON.parse(tagged, (_k, v: unknown) => (typeof v === "string" && v.startsWith(TAG) ? BigInt(v.slice(TAG.length)) : v));
}
