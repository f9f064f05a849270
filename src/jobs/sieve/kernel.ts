// The sieve's kernel adapter: fills the drop tables, runs assembly/enumerate.ts on one shard and
// copies its tallies, leaves and exception classes out of wasm memory.
import type { Kernel } from "../../engine/loader.js";
import { concatU64 } from "../../engine/loader.js";
import type { LeafChunk, ShardRequest, ShardResult } from "../../engine/messages.js";
import { checkTallyStride, writeDropTables } from "../../engine/tables.js";

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
  const chunk = L("LEAF_CHUNK");
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
          b: (r < 0 ? new BigInt64Array(buf, leaves + chunk * 8, n) : new BigUint64Array(buf, leaves + chunk * 8, n)).slice(),
          m: new Uint8Array(buf, leaves + chunk * 16, n).slice(),
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
