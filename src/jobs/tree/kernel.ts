// The inverse tree's kernel adapter: the roots written into the kernel's memory, one walk
// (assembly/inverse.ts), and the per-depth tallies copied out.
import type { Kernel } from "../../engine/loader.js";
import type { WorkerContext } from "../../engine/worker.js";
import { INVERSE_BOUND_BITS } from "./messages.js";
import type { InverseShard, InverseShardResult } from "./messages.js";

/**
 * Walks the subtrees below `req.roots` (all at inverse depth rootDepth) to req.depth.
 * @example inverseShard(kernel, { q: 3, r: 1, steps: 0, depth: 4, n: 1n, below: 0n, rootDepth: 0, roots: BigUint64Array.of(1n) }).nodes[4] // 2n
 */
export function inverseShard(kernel: Kernel, req: InverseShard): InverseShardResult {
  const L = (name: string) => kernel.layout(name);
  if (L("INVERSE_BOUND_BITS") !== INVERSE_BOUND_BITS)
    throw new Error("internal error: the kernel's inverse-tree bound (assembly/layout.ts) is not the host's (messages.ts)");
  const tallies = kernel.region("inverse.tallies", L("INVERSE_TALLY_BYTES"));
  const roots = kernel.region("inverse.roots", req.roots.byteLength);
  new BigUint64Array(kernel.memory, roots, req.roots.length).set(req.roots);
  kernel.call("inverseTree", [req.q, req.r, req.steps, req.depth, req.n, req.below, req.rootDepth, roots, req.roots.length, tallies]);
  const levels = L("INVERSE_LEVELS");
  const table = (name: string) => new BigUint64Array(kernel.memory, tallies + L(name) * levels * 8, levels).slice();
  return {
    nodes: table("INVERSE_NODES"),
    withOdd: table("INVERSE_ODD"),
    zeroModQ: table("INVERSE_ZERO"),
    min: table("INVERSE_MIN"),
    max: table("INVERSE_MAX"),
    belowN: table("INVERSE_BELOW_N"),
    belowX: table("INVERSE_BELOW_X"),
  };
}

/** What this job asks of its workers. */
export const treeHandlers = {
  runInverse: (ctx: WorkerContext, req: InverseShard): InverseShardResult => inverseShard(ctx.kernel(), req),
};
