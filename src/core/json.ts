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

/** Typed arrays a packed value may hold, by tag. */
const TYPED = {
  u8: Uint8Array,
  u32: Uint32Array,
  u64: BigUint64Array,
  i64: BigInt64Array,
} as const;
type TypedTag = keyof typeof TYPED;
type Typed = InstanceType<(typeof TYPED)[TypedTag]>;

function tagOf(v: unknown): TypedTag | null {
  for (const [tag, ctor] of Object.entries(TYPED)) if (v instanceof ctor) return tag as TypedTag;
  return null;
}

function toBase64(bytes: Uint8Array): string {
  let s = "";
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}

function fromBase64(text: string): Uint8Array {
  const s = atob(text);
  const out = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) out[i] = s.charCodeAt(i);
  return out;
}

/**
 * A value as plain JSON, exactly: bigints as {"$n": digits}, typed arrays as {"$t": tag, "b64": bytes}
 * (little-endian), or, when `spill` is given and the array is larger than `spillBytes`, as
 * {"$t": tag, "file": name} with the bytes handed to `spill` (which returns the name).
 * @example JSON.stringify(packData({ n: 2n ** 70n })) // '{"n":{"$n":"1180591620717411303424"}}'
 */
export function packData(value: unknown, spill?: (bytes: Uint8Array) => string, spillBytes = 1 << 20): unknown {
  if (typeof value === "bigint") return { $n: value.toString() };
  const tag = tagOf(value);
  if (tag) {
    const a = value as Typed;
    const bytes = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
    if (spill && bytes.byteLength > spillBytes) return { $t: tag, file: spill(bytes), length: a.length };
    return { $t: tag, b64: toBase64(bytes) };
  }
  if (Array.isArray(value)) return value.map((v) => packData(v, spill, spillBytes));
  if (value !== null && typeof value === "object") {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) out[k] = packData(v, spill, spillBytes);
    return out;
  }
  return value;
}

/** The inverse of packData; `load` returns the bytes of a spilled file. */
export function unpackData(value: unknown, load?: (file: string) => Uint8Array): unknown {
  if (Array.isArray(value)) return value.map((v) => unpackData(v, load));
  if (value === null || typeof value !== "object") return value;
  const o = value as Record<string, unknown>;
  if (typeof o.$n === "string") return BigInt(o.$n);
  if (typeof o.$t === "string" && o.$t in TYPED) {
    const ctor = TYPED[o.$t as TypedTag];
    let bytes: Uint8Array;
    if (typeof o.b64 === "string") bytes = fromBase64(o.b64);
    else if (typeof o.file === "string" && load) bytes = load(o.file);
    else throw new Error(`packed ${o.$t} array without its bytes`);
    if (bytes.byteLength % ctor.BYTES_PER_ELEMENT !== 0) throw new Error(`packed ${o.$t} array of ${bytes.byteLength} bytes`);
    // copy into fresh, aligned memory
    const copy = new Uint8Array(bytes.byteLength);
    copy.set(bytes);
    return new ctor(copy.buffer, 0, bytes.byteLength / ctor.BYTES_PER_ELEMENT);
  }
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(o)) out[k] = unpackData(v, load);
  return out;
}
