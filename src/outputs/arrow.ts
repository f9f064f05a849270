// Apache Arrow IPC files (the "file" format, readable by pyarrow, polars and DuckDB as they are).
// Column names and types are documented in README ("Arrow exports").
import { Field, Int32, List, Table, Uint64, Utf8, tableFromArrays, tableToIPC, vectorFromArray } from "apache-arrow";
import type { CsvRow } from "./tables.js";
import { censusTallies } from "./screen.js";
import type { ToolStamp } from "./manifest.js";
import type { CollatzMap } from "../core/map.js";
import type { StepTable } from "../jobs/steps.js";
import type { CensusResult } from "../jobs/census/census.js";
import type { CycleSearchResult } from "../jobs/cycles/cycles.js";
import type { TreeEdge } from "../jobs/tree/tree.js";

/**
 * Class table: residue (uint32 for depth <= 32, else uint64), odd_steps (uint8), image (int64 when
 * r < 0, uint64 when r > 0: the kernels' own widths, so every image the sieve can make fits). The
 * schema's metadata names the map, the depth and the tool (glidepath.map, .depth, .version, .kernel_build).
 */
export function classTableArrow(rows: readonly CsvRow[], map: CollatzMap, depth: number, tool: ToolStamp): Uint8Array {
  const signed = map.r < 0;
  const sorted = [...rows].sort((u, v) => (u.residue < v.residue ? -1 : u.residue > v.residue ? 1 : 0));
  const residue = depth <= 32 ? Uint32Array.from(sorted, (r) => Number(r.residue)) : BigUint64Array.from(sorted, (r) => r.residue);
  const image = signed
    ? BigInt64Array.from(sorted, (r) => fits(r.image, BigInt.asIntN(64, r.image), "int64"))
    : BigUint64Array.from(sorted, (r) => fits(r.image, BigInt.asUintN(64, r.image), "uint64"));
  const table = tableFromArrays({ residue, odd_steps: Uint8Array.from(sorted, (r) => r.odd), image });
  const meta: [string, string][] = [
    ["map", map.name],
    ["depth", String(depth)],
    ["version", tool.version],
    ["kernel_build", tool.kernelBuild],
  ];
  for (const [k, v] of meta) table.schema.metadata.set(`glidepath.${k}`, v);
  return tableToIPC(table, "file");
}

function fits(x: bigint, wrapped: bigint, type: string): bigint {
  if (wrapped !== x) throw new RangeError(`image ${x} does not fit ${type}`);
  return x;
}

/** Step table: residue (uint32, 0..2^k-1 in order), odd_steps (uint8), image (int64, or uint64 when r > 0). */
export function stepTableArrow(t: StepTable): Uint8Array {
  const residue = new Uint32Array(t.odd.length);
  for (let i = 0; i < residue.length; i++) residue[i] = i;
  return tableToIPC(tableFromArrays({ residue, odd_steps: t.odd, image: t.image }), "file");
}

/**
 * Census tallies in long form: tally (utf8: live, stopped, vectors, peak, log2_ratio_quarter,
 * nonpositive_image), depth (int32), odd_steps (int32), bin (int32: log2 ratio in [bin/4, (bin+1)/4)),
 * count (uint64); unused coordinates are -1.
 */
export function censusArrow(c: CensusResult): Uint8Array {
  const rows = censusTallies(c);
  const tally = rows.map((t) => t.tally),
    depth = rows.map((t) => t.depth),
    odd = rows.map((t) => t.odd),
    bin = rows.map((t) => t.bin),
    count = rows.map((t) => t.count);
  return tableToIPC(
    new Table({
      tally: vectorFromArray(tally, new Utf8()),
      depth: vectorFromArray(depth, new Int32()),
      odd_steps: vectorFromArray(odd, new Int32()),
      bin: vectorFromArray(bin, new Int32()),
      count: vectorFromArray(count, new Uint64()),
    }),
    "file",
  );
}

/**
 * Cycles: representative, min, max (utf8 exact decimals: elements may exceed 64 bits), period and
 * odd_steps (int32), elements (list<utf8>, in orbit order from the representative).
 */
export function cyclesArrow(r: CycleSearchResult): Uint8Array {
  const cycles = r.cycles;
  return tableToIPC(
    new Table({
      representative: vectorFromArray(
        cycles.map((c) => String(c.representative)),
        new Utf8(),
      ),
      min: vectorFromArray(
        cycles.map((c) => String(c.min)),
        new Utf8(),
      ),
      max: vectorFromArray(
        cycles.map((c) => String(c.max)),
        new Utf8(),
      ),
      period: vectorFromArray(
        cycles.map((c) => c.period),
        new Int32(),
      ),
      odd_steps: vectorFromArray(
        cycles.map((c) => c.odd),
        new Int32(),
      ),
      elements: vectorFromArray(
        cycles.map((c) => c.elements.map(String)),
        new List(new Field("item", new Utf8(), false)),
      ),
    }),
    "file",
  );
}

/**
 * The inverse tree's edges: node and parent (utf8 exact decimals: nodes may exceed 64 bits; the
 * root's parent is null), depth (int32: steps from the node to N), kind (utf8: root, even, odd).
 */
export function treeEdgesArrow(edges: readonly TreeEdge[]): Uint8Array {
  return tableToIPC(
    new Table({
      node: vectorFromArray(
        edges.map((e) => String(e.node)),
        new Utf8(),
      ),
      parent: vectorFromArray(
        edges.map((e) => (e.parent === null ? null : String(e.parent))),
        new Utf8(),
      ),
      depth: vectorFromArray(
        edges.map((e) => e.depth),
        new Int32(),
      ),
      kind: vectorFromArray(
        edges.map((e) => e.kind),
        new Utf8(),
      ),
    }),
    "file",
  );
}
