// Option parsing shared by the commands: one place turns text into validated values.
import { parseArgs } from "node:util";
import type { ParseArgsConfig } from "node:util";
import { availableParallelism } from "node:os";
import { UsageError } from "../errors.js";
import { parseMap } from "../map.js";
import type { CollatzMap } from "../map.js";

export type Options = NonNullable<ParseArgsConfig["options"]>;

/** Parses argv strictly; unknown options and stray arguments are usage errors. */
export function parseOptions<T extends Options>(argv: string[], options: T): Record<string, string | boolean | undefined> {
  try {
    const { values } = parseArgs({ args: argv, options, strict: true, allowPositionals: false });
    return values as Record<string, string | boolean | undefined>;
  } catch (e) {
    throw new UsageError((e as Error).message.split("\n")[0]!);
  }
}

export function mapOption(v: string | boolean | undefined): CollatzMap {
  return parseMap(typeof v === "string" ? v : "3x+1");
}

/** A decimal integer option within [min, max]. */
export function intOption(name: string, v: string | boolean | undefined, min: number, max: number, fallback?: number): number {
  if (v === undefined) {
    if (fallback === undefined) throw new UsageError(`--${name} is required`);
    return fallback;
  }
  if (typeof v !== "string" || !/^\d+$/.test(v)) throw new UsageError(`--${name} must be a whole number, got "${String(v)}"`);
  const n = Number(v);
  if (n < min || n > max) throw new UsageError(`--${name} must be between ${min} and ${max}, got ${v}`);
  return n;
}

export function workersOption(v: string | boolean | undefined): number {
  return intOption("workers", v, 1, 256, availableParallelism());
}
