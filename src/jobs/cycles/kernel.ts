// The cycle search's kernel adapter: the q^m words and the exact divisibility table that
// assembly/cycles.ts reads, one shard's run, and its candidates copied out.
import { inverseMod2k } from "../../core/arith.js";
import type { Kernel } from "../../engine/loader.js";
import type { WorkerContext } from "../../engine/worker.js";
import { collector } from "../../engine/loader.js";
import type { CycleShard, CycleShardResult } from "./messages.js";

/**
 * Runs one shard of the cycle search.
 * @example cycleShard(kernel, { q: 3, r: 1, depth: 12, wide: false, prefixBits: 0, prefix: 0n, walkTallies: true })
 */
export function cycleShard(kernel: Kernel, req: CycleShard): CycleShardResult {
  const { q, r, depth, wide } = req;
  const L = (name: string) => kernel.layout(name);
  const qTables = kernel.region("cycles.qpow", L("CYCLE_QPOW_BYTES"));
  const dTable = kernel.region("cycles.divisors", L("CYCLE_DIVISOR_BYTES"));
  const candidates = kernel.region("cycles.candidates", L("CYCLE_CANDIDATE_BYTES"));
  kernel.tablesFor("cycles", `${q} ${depth} ${wide}`, () => writeCycleTables(kernel, qTables, dTable, q, depth, wide ? 128 : 64));
  const found = collector(kernel, candidates);
  const nodes = kernel.call(
    "cycleSearch",
    [q, r, depth, wide ? 1 : 0, req.prefixBits, req.prefix, qTables, dTable, candidates, req.walkTallies ? 1 : 0],
    (channel, count) => {
      if (channel === L("CHANNEL_CYCLES")) found.take(count);
    },
  );
  return { nodes: BigInt.asUintN(64, BigInt(nodes)), candidates: found.all() };
}

/**
 * q^m as two u64 words, and per (j, m) with 1 <= j <= depth the exact divisibility data for
 * |D| = |2^j - q^m| (odd): its inverse mod 2^w and floor((2^w - 1) / |D|), low word then high word
 * (CYCLE_DIVISOR_WORDS u64 at entry (j << TALLY_SHIFT) + m).
 */
function writeCycleTables(kernel: Kernel, qTables: number, dTable: number, q: number, depth: number, w: 64 | 128): void {
  const L = (name: string) => kernel.layout(name);
  const mem = kernel.memory;
  const lo = new BigUint64Array(mem, qTables, L("TABLE_ENTRIES"));
  const hi = new BigUint64Array(mem, qTables + L("CYCLE_QPOW_HIGH"), L("TABLE_ENTRIES"));
  const words = L("CYCLE_DIVISOR_WORDS");
  const shift = L("TALLY_SHIFT");
  const d = new BigUint64Array(mem, dTable, L("CYCLE_DIVISOR_BYTES") / BigUint64Array.BYTES_PER_ELEMENT);
  const mask64 = (1n << 64n) - 1n;
  const mod = 1n << BigInt(w);
  let p = 1n;
  for (let m = 0; m <= depth; m++) {
    lo[m] = p & mask64;
    hi[m] = (p >> 64n) & mask64;
    p *= BigInt(q);
  }
  for (let j = 1; j <= depth; j++) {
    let qm = 1n;
    for (let m = 0; m <= j; m++) {
      let D = (1n << BigInt(j)) - qm;
      if (D < 0n) D = -D;
      const inv = inverseMod2k(D, w);
      const lim = (mod - 1n) / D;
      const at = ((j << shift) + m) * words;
      d[at] = inv & mask64;
      d[at + 1] = inv >> 64n;
      d[at + 2] = lim & mask64;
      d[at + 3] = lim >> 64n;
      qm *= BigInt(q);
    }
  }
}

/** What this job asks of its workers. */
export const cyclesHandlers = {
  runCycles: (ctx: WorkerContext, req: CycleShard): CycleShardResult => cycleShard(ctx.kernel(), req),
};
