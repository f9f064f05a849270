// The worker side of the pool, isomorphic: Node's entry (src/node/worker.ts) and the browser's
// expose this same object through comlink on their own endpoints.
import { transfer } from "comlink";
import { Kernel } from "./loader.js";
import type { KernelWorkerApi, LeafChunk, ShardOutput } from "./messages.js";
import { enumerateShard } from "../jobs/sieve/kernel.js";
import { censusShard } from "../jobs/census/kernel.js";
import { cycleShard } from "../jobs/cycles/kernel.js";
import { inverseShard } from "../jobs/tree/kernel.js";
import { verifyBlockEntry, verifyPrepare } from "../jobs/verify/kernel.js";
import type { VerifyTables } from "./messages.js";
import { makeMap } from "../core/map.js";
import { classFromResidue } from "../core/padic.js";
import { csvLines, finishBucket, groupResidues } from "../outputs/tables.js";
import type { CsvRow } from "../outputs/tables.js";
import { classTableArrow } from "../outputs/arrow.js";

/** @example expose(createWorkerApi(), endpoint) */
export function createWorkerApi(): KernelWorkerApi {
  let kernel: Kernel | null = null;
  let verifyTables: VerifyTables | null = null;
  return {
    async init(module) {
      kernel = await Kernel.instantiate(module);
    },
    async runShard(req) {
      if (!kernel) throw new Error("worker used before init");
      const chunks: LeafChunk[] = [];
      const res = enumerateShard(kernel, req, req.leaves ? (c) => chunks.push(c) : undefined);
      const out: ShardOutput = !req.leaves
        ? res
        : req.buckets
          ? { ...res, grouped: groupResidues(chunks, req.depth, req.buckets) }
          : { ...res, leaves: concatLeaves(chunks, req.r < 0) };
      const buffers: ArrayBuffer[] = [res.live.buffer, res.stopped.buffer, res.exceptionClasses.buffer].map(asArrayBuffer);
      if (out.leaves) buffers.push(...[out.leaves.a.buffer, out.leaves.b.buffer, out.leaves.m.buffer].map(asArrayBuffer));
      if (out.grouped) buffers.push(asArrayBuffer(out.grouped.low.buffer), asArrayBuffer(out.grouped.counts.buffer));
      return transfer(out, buffers);
    },
    async runCensus(req) {
      if (!kernel) throw new Error("worker used before init");
      const res = censusShard(kernel, req);
      const arrays: ArrayBufferView[] = [
        res.live,
        res.stopped,
        res.bins,
        res.counts,
        res.ambiguous,
        res.differ,
        res.ratio,
        res.exceptionClasses,
      ];
      if (res.leafVectors) arrays.push(res.leafVectors);
      return transfer(
        res,
        arrays.map((x) => asArrayBuffer(x.buffer)),
      );
    },
    async runInverse(req) {
      if (!kernel) throw new Error("worker used before init");
      const res = inverseShard(kernel, req);
      return transfer(
        res,
        Object.values(res).map((x: BigUint64Array) => asArrayBuffer(x.buffer)),
      );
    },
    async exportTable(req) {
      const map = makeMap(req.q, req.r);
      const rows: CsvRow[] = Array.from(req.residues, (a) => {
        const c = classFromResidue(map, BigInt(a), req.depth);
        return { residue: c.residue, odd: c.odd, image: c.image };
      });
      const bytes =
        req.format === "arrow" ? classTableArrow(rows, map, req.depth, req.tool) : new TextEncoder().encode([...csvLines(rows)].join(""));
      return transfer(bytes, [asArrayBuffer(bytes.buffer)]);
    },
    async sortBucket(keys, bits, high, wide) {
      const out = finishBucket(keys, bits, high, wide);
      return transfer(out, [asArrayBuffer(out.buffer)]);
    },
    async verifyPrepare(tables) {
      if (!kernel) throw new Error("worker used before init");
      verifyPrepare(kernel, tables);
      verifyTables = tables;
    },
    async verifyBlock(block) {
      if (!kernel) throw new Error("worker used before init");
      return verifyBlockEntry(kernel, verifyTables, block);
    },
    async runCycles(req) {
      if (!kernel) throw new Error("worker used before init");
      const res = cycleShard(kernel, req);
      return transfer(res, [asArrayBuffer(res.candidates.buffer)]);
    },
  };
}

function asArrayBuffer(b: ArrayBufferLike): ArrayBuffer {
  return b as ArrayBuffer;
}

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
