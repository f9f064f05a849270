// Option values for every command: text turned into validated values once, at the edge.
// Commander (src/cli/main.ts) reads the words; these functions decide what they mean.
import type { Command } from "commander";
import { createHash } from "node:crypto";
import { readFileSync, statSync } from "node:fs";
import { availableParallelism } from "node:os";
import { dirname } from "node:path";
import { UsageError } from "../core/errors.js";
import { parseMap } from "../core/map.js";
import type { CollatzMap } from "../core/map.js";

/** The options every command reads through commander, as strings (commander does no checking). */
export interface RawOptions {
  readonly map?: string;
  readonly depth?: string;
  readonly workers?: string;
  readonly json?: boolean;
  readonly out?: string;
  readonly format?: string;
  readonly force?: boolean;
}

export function mapOption(v: string | undefined): CollatzMap {
  return parseMap(v ?? "3x+1");
}

/**
 * A decimal integer option within [min, max]; `fallback` when absent (required when there is none).
 * @example intOption("depth", "20", 0, 40) // 20
 */
export function intOption(name: string, v: string | undefined, min: number, max: number, fallback?: number): number {
  if (v === undefined) {
    if (fallback === undefined) throw new UsageError(`--${name} is required`);
    return fallback;
  }
  if (!/^\d+$/.test(v)) throw new UsageError(`--${name} must be a whole number from ${min} to ${max}, got "${v}"`);
  const n = Number(v);
  if (n < min || n > max) throw new UsageError(`--${name} must be from ${min} to ${max}, got ${v}`);
  return n;
}

export const MAX_WORKERS = 256;

export function workersOption(v: string | undefined): number {
  return intOption("workers", v, 1, MAX_WORKERS, availableParallelism());
}

export type FileFormat = "raw" | "csv" | "arrow";

/** What a file name's ending says its format is, where it says anything. */
const ENDINGS: readonly [string, FileFormat][] = [
  [".csv", "csv"],
  [".arrow", "arrow"],
  [".feather", "arrow"],
  [".ipc", "arrow"],
  [".u32", "raw"],
  [".u64", "raw"],
  [".bin", "raw"],
  [".raw", "raw"],
];

export interface OutputChoice<F extends FileFormat> {
  readonly path: string;
  readonly format: F;
}

/**
 * The output file and its format, checked before any work: --format needs --out; a format the
 * command cannot write, or a name whose ending contradicts the format, is refused; the target must
 * not be a directory and its folder must exist. Returns null without --out.
 */
export function outputOption<F extends FileFormat>(
  o: RawOptions,
  allowed: readonly F[],
  fallback: F,
  writes: string = allowed.join(" or "),
): OutputChoice<F> | null {
  if (o.out === undefined) {
    if (o.format !== undefined) throw new UsageError("--format needs --out FILE");
    if (o.force) throw new UsageError("--force needs --out FILE");
    return null;
  }
  const path = o.out;
  if (path.trim() === "") throw new UsageError("--out needs a file name");
  const named = ENDINGS.find(([end]) => path.toLowerCase().endsWith(end))?.[1];
  let format: F;
  if (o.format !== undefined) {
    if (!(allowed as readonly string[]).includes(o.format))
      throw new UsageError(`--format must be ${allowed.join(" or ")} here, got "${o.format}"`);
    format = o.format as F;
    if (named !== undefined && named !== format)
      throw new UsageError(`${path} is named as ${named} but --format is ${format}: rename the file or change --format`);
  } else if (named !== undefined) {
    if (!(allowed as readonly string[]).includes(named))
      throw new UsageError(`${path} is named as ${named}, which this command does not write (it writes ${writes})`);
    format = named as F;
  } else format = fallback;
  checkWritableTarget(path);
  checkWritableTarget(`${path}.json`);
  return { path, format };
}

/** The target is not a directory and its folder exists (the write itself is tried when the file is opened). */
export function checkWritableTarget(path: string): void {
  const stat = statSync(path, { throwIfNoEntry: false });
  if (stat?.isDirectory()) throw new UsageError(`cannot write ${path}: it is a directory`);
  const folder = statSync(dirname(path), { throwIfNoEntry: false });
  if (!folder?.isDirectory()) throw new UsageError(`cannot write ${path}: the folder ${dirname(path)} does not exist`);
}

/**
 * A new command with the options most commands share: --map, and --workers and --json unless left out.
 * @example jobCommand(program, "census", "all 2^K parity vectors").option("--depth <K>", "depth")
 */
export function jobCommand(
  program: Command,
  name: string,
  description: string,
  shared: { workers?: boolean; json?: boolean } = {},
): Command {
  const cmd = program.command(name).description(description).option("--map <qx+r>", "the map", "3x+1");
  if (shared.workers !== false) cmd.option("--workers <N>", "worker threads (default: the available cores)");
  if (shared.json !== false) cmd.option("--json", "print JSON (exact integers)");
  return cmd;
}

/** sha256 (hex) with Node's crypto. */
export const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/**
 * A file named on the command line, as text; one clear line when it cannot be read.
 * @example readText("cert.json")
 */
export function readText(path: string): string {
  try {
    return readFileSync(path, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(`cannot read ${path}: ${code === "EISDIR" ? "it is a folder" : (code ?? String(e))}`);
  }
}
