// A job's request as plan.json stores it: one codec per field, in one table whose keys are exactly
// the request type's keys. A field added to a request and not to its table does not compile (the
// table is a mapped type over keyof P, every key required), and one codec pair serves the stored
// plan and its hash alike, so a field cannot be dropped on the way to a shard while the hash agrees.
import { parseMap } from "../core/map.js";
import type { CollatzMap } from "../core/map.js";

/**
 * One field: its value as plain JSON (bigints allowed: packData carries them) and back. `decode`
 * throws an Error saying what the value must be; decode(encode(v)) equals v for every valid v.
 * (Function-typed properties, not methods: T is then invariant, so an optional field's codec must
 * take undefined.)
 */
export interface FieldCodec<T> {
  readonly encode: (value: T) => unknown;
  readonly decode: (stored: unknown) => T;
}

/** A codec for every key of P, none missing, none extra. */
export type FieldTable<P> = { readonly [K in keyof P]-?: FieldCodec<P[K]> };

/** A request's codec: its field table, and the encode/decode pair built from it. */
export interface ParamsCodec<P> {
  readonly fields: FieldTable<P>;
  /** Every field of the table, in the table's order. */
  encode(params: P): Record<string, unknown>;
  /** Exactly the table's fields (a missing or unknown one is an error naming it). */
  decode(stored: Record<string, unknown>): P;
}

/**
 * The codec of a request type from its field table.
 * @example const codec = paramsCodec<{ map: CollatzMap; depth: number }>({ map: mapField, depth: intField });
 */
export function paramsCodec<P>(fields: FieldTable<P>): ParamsCodec<P> {
  const keys = Object.keys(fields) as (keyof P & string)[];
  return {
    fields,
    encode(params) {
      const out: Record<string, unknown> = {};
      for (const k of keys) out[k] = fields[k].encode(params[k]);
      return out;
    },
    decode(stored) {
      if (stored === null || typeof stored !== "object" || Array.isArray(stored)) throw new Error("params is not an object");
      for (const k of Object.keys(stored)) if (!(k in fields)) throw new Error(`params.${k} is not a parameter of this job`);
      const out: Partial<P> = {};
      for (const k of keys) {
        if (!(k in stored)) throw new Error(`params.${k} is missing`);
        try {
          out[k] = fields[k].decode(stored[k]);
        } catch (e) {
          throw new Error(`params.${k} ${e instanceof Error ? e.message : String(e)}`);
        }
      }
      return out as P;
    },
  };
}

const shown = (v: unknown) => (typeof v === "string" ? `"${v}"` : typeof v === "bigint" ? String(v) : JSON.stringify(v));

/** A whole number that a double holds exactly (depths, counts of steps). */
export const intField: FieldCodec<number> = {
  encode: (v) => v,
  decode: (v) => {
    if (typeof v !== "number" || !Number.isSafeInteger(v)) throw new Error(`must be a whole number, got ${shown(v)}`);
    return v;
  },
};

/** An exact integer of any size. */
export const bigintField: FieldCodec<bigint> = {
  encode: (v) => v,
  decode: (v) => {
    if (typeof v !== "bigint") throw new Error(`must be an exact integer, got ${shown(v)}`);
    return v;
  },
};

export const boolField: FieldCodec<boolean> = {
  encode: (v) => v,
  decode: (v) => {
    if (typeof v !== "boolean") throw new Error(`must be true or false, got ${shown(v)}`);
    return v;
  },
};

/** A map, stored by its canonical name. */
export const mapField: FieldCodec<CollatzMap> = {
  encode: (m) => m.name,
  decode: (v) => {
    if (typeof v !== "string") throw new Error(`must be a map such as "3x+1", got ${shown(v)}`);
    const map = parseMap(v);
    if (map.name !== v) throw new Error(`must be a map's canonical name, got "${v}" (${map.name})`);
    return map;
  },
};

/** One of a few strings. */
export function choiceField<T extends string>(...values: readonly T[]): FieldCodec<T> {
  return {
    encode: (v) => v,
    decode: (v) => {
      if (!values.includes(v as T)) throw new Error(`must be ${values.join(" or ")}, got ${shown(v)}`);
      return v as T;
    },
  };
}

/** An optional field: absent (undefined) stored as null. */
export function optional<T>(codec: FieldCodec<T>): FieldCodec<T | undefined> {
  return {
    encode: (v) => (v === undefined ? null : codec.encode(v)),
    decode: (v) => (v === null ? undefined : codec.decode(v)),
  };
}

/** A field that may be null. */
export function nullable<T>(codec: FieldCodec<T>): FieldCodec<T | null> {
  return {
    encode: (v) => (v === null ? null : codec.encode(v)),
    decode: (v) => (v === null ? null : codec.decode(v)),
  };
}
