// Per-m tables the host writes into a kernel's memory before a run (layout.ts: TABLE_*), shared by
// the sieve and the census: q^m (u64) and bitlen(q^m) (i32), both exact (BigInt).
import { dropDepths } from "../core/map.js";
import type { Kernel } from "./loader.js";
import { TALLY_STRIDE } from "./messages.js";

/** The kernel build's tally stride is the one results are read with. */
export function checkTallyStride(kernel: Kernel): void {
  if (kernel.layout("TALLY_STRIDE") !== TALLY_STRIDE)
    throw new Error(`kernel build has tally stride ${kernel.layout("TALLY_STRIDE")}, the host reads ${TALLY_STRIDE}: rebuild`);
}

/** Writes q^m and bitlen(q^m) for m <= depth at `at`; entries past depth are set out of reach. */
export function writeDropTables(kernel: Kernel, at: number, q: number, depth: number): void {
  const mem = kernel.memory;
  const entries = kernel.layout("TABLE_ENTRIES");
  const qpow = new BigUint64Array(mem, at + kernel.layout("TABLE_QPOW"), entries);
  const drop = new Int32Array(mem, at + kernel.layout("TABLE_DROP"), entries).fill(0x7fffffff);
  const depths = dropDepths(q, depth);
  let p = 1n;
  for (let m = 0; m <= depth; m++) {
    // within the proven width: m <= depth <= kernelDepthLimit
    qpow[m] = BigInt.asUintN(64, p);
    drop[m] = depths[m]!;
    p *= BigInt(q);
  }
}
