// What a job offers the cluster commands (batch, shard, batch-status, merge): its plan-layer job,
// its options, its JSON and what `merge --out` writes. Each command file defines its job's entry;
// cluster.ts lists them.
import type { Command } from "commander";
import type { JobKind, PartBase } from "../engine/plan.js";
import type { KernelPool } from "../engine/pool.js";
import type { ToolStamp } from "../engine/messages.js";
import type { FileFormat, OutputChoice, RawOptions } from "./options.js";

/** What `merge --out FILE` writes: the file the one-machine command's --out writes. */
export interface MergeOutput<P, R> {
  readonly formats: readonly FileFormat[];
  readonly what: string;
  /** How a refusal names what it writes (default: the formats). */
  readonly writes?: string;
  write(
    pool: KernelPool,
    result: R,
    out: OutputChoice<FileFormat>,
    stamp: ToolStamp,
    tables: readonly string[],
    span: { readonly started: string; readonly finished: string },
    /** The plan's parameters (the object the merge read: verify's plan is made once for it). */
    params: P,
  ): Promise<void>;
}

/** A job as the cluster commands see it: the plan layer's job, its options, its JSON and its --out. */
export interface BatchJob<P, R> {
  readonly job: JobKind<P, PartBase, R>;
  /** The job's own options (the same as its one-machine command's). */
  options(cmd: Command): Command;
  params(o: RawOptions): P;
  /** The merged result's JSON (params: the plan's, as the merge read them). */
  json(result: R, params: P): unknown;
  /** Its shards write their sorted part of the class table (RUN/parts/I.table). */
  readonly table?: boolean;
  readonly out?: MergeOutput<P, R>;
  /**
   * The command that checks the merged file on its own (verify: --check --full runs every block
   * again), for jobs that have one, and the file name (in RUN) batch-status suggests for it: a
   * part's digest finds accidental damage only, not a node that lies.
   */
  readonly check?: { readonly file: string; command(file: string): string };
}
