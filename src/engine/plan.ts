// Planning by residue prefix: how deep the prefixes of a run's shards go, so that each worker gets
// many shards of bounded size (counted exactly beforehand by the exact counter).
import { exactCounts } from "../core/exact.js";
import type { CollatzMap } from "../core/map.js";
import type { Mode } from "./messages.js";

/** Live classes per shard and nodes per shard that the plan aims below. */
const SHARD_NODES = 2n ** 22n;
const SHARD_LEAVES = 2n ** 18n;
const MAX_PREFIX_BITS = 20;

/**
 * The prefix depth d: the least d with at least 16 live prefixes per worker and shards of bounded
 * size, using the exact counter's survivor counts (full mode: 2^d prefixes).
 */
export function choosePrefixBits(
  map: CollatzMap,
  depth: number,
  mode: Mode,
  workers: number,
  withLeaves: boolean,
  shardNodes = SHARD_NODES,
): number {
  const levels = exactCounts(map, depth).levels;
  const live = (d: number) => (mode === "full" ? 1n << BigInt(d) : levels[d]!.survivors);
  const nodes = mode === "full" ? (1n << BigInt(depth + 1)) - 1n : levels.reduce((s, l) => s + l.survivors, 0n);
  const leaves = live(depth);
  const top = Math.min(depth, MAX_PREFIX_BITS);
  for (let d = 0; d < top; d++) {
    const n = live(d);
    if (n === 0n) return d;
    if (n >= BigInt(16 * workers) && nodes / n <= shardNodes && (!withLeaves || leaves / n <= SHARD_LEAVES)) return d;
  }
  return top;
}
