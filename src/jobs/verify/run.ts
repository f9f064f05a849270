// One verification request as the front ends run it (the CLI's verify, the page's Verify view, the
// cluster's merge --out): the plan (made once, planOf), the tables and their hashes, the run, and
// the certificate's text. What differs by platform (sha256, the pool, writing files) is passed in.
import { toExactJson } from "../../core/json.js";
import type { ToolStamp } from "../../engine/messages.js";
import type { KernelPool, RunOptions } from "../../engine/pool.js";
import { certificate, tableHashes } from "./certificate.js";
import type { TableHashes } from "./certificate.js";
import type { VerifyResult } from "./merge.js";
import type { VerifyPlan, VerifyRequest } from "./plan.js";
import { verifyTables } from "./tables.js";
import type { VerifyTableData } from "./tables.js";
import type { KnownRecords } from "./known.js";
import { planOf, runVerify } from "./verify.js";
import type { VerifyOptions } from "./verify.js";

/** sha256 (hex) of the tables' bytes: Node's crypto, or the page's SubtleCrypto. */
export type Sha256 = (bytes: Uint8Array) => string | Promise<string>;

/** The run's options, and what a front end hears of it besides progress and finished blocks. */
export interface VerificationOptions extends Omit<VerifyOptions, "tables"> {
  /** A phase begins: the tables (kernel runs only), then the blocks. */
  readonly onPhase?: (phase: "tables" | "blocks", plan: VerifyPlan) => void;
  /** The tables' hashes, before any block runs (the CLI checks its table files against them). */
  readonly onTables?: (hashes: TableHashes) => void | Promise<void>;
}

/** A finished request: its result, its tables' hashes (null on the BigInt engine) and the seconds the tables took. */
export interface Verification {
  readonly result: VerifyResult;
  readonly hashes: TableHashes | null;
  readonly tableSeconds: number;
}

/**
 * The tables of a plan (on the kernel engine; none on the BigInt one) and their hashes.
 * @example const { hashes } = await verificationTables(pool, planOf(req), sha256);
 */
export async function verificationTables(
  pool: KernelPool,
  plan: VerifyPlan,
  sha256: Sha256,
  options: RunOptions = {},
): Promise<{ data: VerifyTableData | undefined; hashes: TableHashes | null }> {
  if (plan.engine !== "kernel") return { data: undefined, hashes: null };
  const data = await verifyTables(pool, plan, options);
  return { data, hashes: await tableHashes(data, sha256) };
}

/**
 * Runs a request: its plan (planOf: the one the front end checked), the tables and their hashes,
 * then the blocks (runVerify, with progress, cancel, resumed blocks and onBlock).
 * @example const { result } = await runVerification(pool, { map: parseMap("3x+1"), from: 1n, to: 1n << 20n }, sha256);
 */
export async function runVerification(
  pool: KernelPool,
  req: VerifyRequest,
  sha256: Sha256,
  options: VerificationOptions = {},
): Promise<Verification> {
  const plan = planOf(req);
  const t0 = performance.now();
  if (plan.engine === "kernel") options.onPhase?.("tables", plan);
  const { data, hashes } = await verificationTables(pool, plan, sha256, options);
  const tableSeconds = plan.engine === "kernel" ? (performance.now() - t0) / 1000 : 0;
  if (hashes) await options.onTables?.(hashes);
  options.onPhase?.("blocks", plan);
  const { onPhase: _phase, onTables: _tables, ...rest } = options;
  const result = await runVerify(pool, req, { ...rest, tables: data });
  return { result, hashes, tableSeconds };
}

/**
 * The certificate of a result as its file holds it (JSON, two-space indents, a final newline); with
 * the records known below FROM, also the new records among all n.
 * @example await writeFile(path, await certificateText(result, hashes, stamp, { started, finished, workers }))
 */
export async function certificateText(
  result: VerifyResult,
  hashes: TableHashes | null,
  stamp: ToolStamp,
  run: { readonly started: string; readonly finished: string; readonly workers: number },
  known: KnownRecords | null = null,
): Promise<string> {
  return `${toExactJson(await certificate(result, hashes, stamp, run, known), 2)}\n`;
}
