// The sieve's kernel adapter: fills the drop tables, runs assembly/enumerate.ts on one shard and
// copies its tallies, leaves and exception classes out of wasm memory.
import type { Kernel } from "../../engine/loader.js";
import { concatU64 } from "../../engine/loader.js";
import type { LeafChunk, ShardOutput, ShardRequest, ShardResult } from "./messages.js";
import { checkTallyStride, writeDropTables } from "../../engine/tables.js";
import type { WorkerContext } from "../../engine/worker.js";
import { finishBucket, groupResidues } from "./sort.js";

/**
 * Runs one shard; leaves go to `onLeaves` chunk by chunk (copies, safe to keep).
 * @example enumerateShard(kernel, { q: 3, r: 1, depth: 20, mode: "survivors", prefixBits: 0, prefix: 0n, leaves: false,
 *   walkTallies: true })
 */
export function enumerateShard(kernel: Kernel, req: ShardRequest, onLeaves?: (chunk: LeafChunk) => void): ShardResult {
  const { q, r, depth } = req;
  const L = (name: string) => kernel.layout(name);
  const tables = kernel.region("tables", L("TABLE_BYTES"));
  const tallies = kernel.region("enumerate.tallies", L("ENUM_TALLY_BYTES"));
  const leaves = kernel.region("enumerate.leaves", L("LEAF_BYTES"));
  const exceptions = kernel.region("enumerate.exceptions", L("ENUM_EXCEPTION_BYTES"));
  kernel.tablesFor("tables", `drop ${q} ${depth}`, () => {
    checkTallyStride(kernel);
    writeDropTables(kernel, tables, q, depth);
  });
  const excParts: BigUint64Array[] = [];
  const nodes = kernel.call(
    "enumerate",
    [
      q,
      r,
      depth,
      req.mode === "full" ? L("MODE_FULL") : L("MODE_SURVIVORS"),
      req.prefixBits,
      req.prefix,
      tables,
      tallies,
      leaves,
      req.leaves && onLeaves ? 1 : 0,
      exceptions,
      req.walkTallies ? 1 : 0,
    ],
    (channel, count) => {
      const buf = kernel.memory;
      if (channel === L("CHANNEL_LEAVES")) {
        if (!onLeaves) return;
        const n = req.residuesOnly ? 0 : count;
        onLeaves({
          a: new BigUint64Array(buf, leaves, count).slice(),
          b: (r < 0 ? new BigInt64Array(buf, leaves + L("LEAF_B_AT"), n) : new BigUint64Array(buf, leaves + L("LEAF_B_AT"), n)).slice(),
          m: new Uint8Array(buf, leaves + L("LEAF_M_AT"), n).slice(),
        });
      } else if (channel === L("CHANNEL_EXCEPTIONS")) {
        excParts.push(new BigUint64Array(buf, exceptions, count * 4).slice());
      }
    },
  );
  const rows = (depth + 1) * L("TALLY_STRIDE");
  const buf = kernel.memory;
  return {
    nodes: BigInt.asUintN(64, BigInt(nodes)),
    live: new BigUint64Array(buf, tallies, rows).slice(),
    stopped: new BigUint64Array(buf, tallies + L("TALLY_TABLE_BYTES"), rows).slice(),
    exceptionClasses: concatU64(excParts),
  };
}

/** What the sieve asks of its workers: a shard, and a bucket of the class table sorted. */
export const sieveHandlers = {
  runShard(ctx: WorkerContext, req: ShardRequest): ShardOutput {
    const chunks: LeafChunk[] = [];
    const res = enumerateShard(ctx.kernel(), req, req.leaves ? (c) => chunks.push(c) : undefined);
    if (!req.leaves) return res;
    return req.buckets
      ? { ...res, grouped: groupResidues(chunks, req.depth, req.buckets) }
      : { ...res, leaves: concatLeaves(chunks, req.r < 0) };
  },
  /** Sorts one bucket of a class table (sort.ts finishBucket). */
  sortBucket(_ctx: WorkerContext, req: { keys: Uint32Array; bits: number; high: number; wide: boolean }): Uint32Array {
    return finishBucket(req.keys, req.bits, req.high, req.wide);
  },
};

/** Joins streamed chunks into one struct-of-arrays. */
function concatLeaves(chunks: LeafChunk[], signed: boolean): LeafChunk {
  const n = chunks.reduce((s, c) => s + c.a.length, 0);
  const nb = chunks.reduce((s, c) => s + c.b.length, 0); // 0 when only residues were streamed
  const a = new BigUint64Array(n);
  const b = signed ? new BigInt64Array(nb) : new BigUint64Array(nb);
  const m = new Uint8Array(nb);
  let o = 0,
    ob = 0;
  for (const c of chunks) {
    a.set(c.a, o);
    if (b instanceof BigInt64Array) b.set(c.b as BigInt64Array, ob);
    else b.set(c.b as BigUint64Array, ob);
    m.set(c.m, ob);
    o += c.a.length;
    ob += c.b.length;
  }
  return { a, b, m };
}
