// What every job's messages share: the sieve's two modes (the plan layer cuts work by them) and the
// row stride of tally tables. Each job's own requests and results sit in its folder
// (src/jobs/<job>/messages.ts).

export type Mode = "survivors" | "full";

/**
 * Row stride of every tally table in a result: entry (j, m) at j * TALLY_STRIDE + m. The kernels'
 * own value (assembly/layout.ts) is checked against it when a kernel is loaded (engine/tables.ts).
 */
export const TALLY_STRIDE = 64;

/** The tool version and kernel build that outputs, plans and parts carry. */
export interface ToolStamp {
  readonly version: string;
  readonly kernelBuild: string;
}
