// glidepath tree N: the inverse tree of N, level by level, exact at every size; --out writes its edges.
import type { Command } from "commander";
import { CSV_ROW_GUARD } from "../outputs/tables.js";
import { MAX_TREE_DEPTH, runTree, treeEdges, treeJob, walkWithEdges } from "../jobs/tree/tree.js";
import type { StepConvention, TreeEdge, TreeParams, TreeResult } from "../jobs/tree/tree.js";
import { parseWhole } from "../core/parse.js";
import { treeEdgesArrow } from "../outputs/arrow.js";
import { group, plural } from "../outputs/format.js";
import { toExactJson } from "../core/json.js";
import { manifest } from "../outputs/manifest.js";
import type { DataFile, ToolStamp } from "../outputs/manifest.js";
import type { AtomicFile } from "../node/files.js";
import type { BatchJob } from "./batch.js";
import type { FileFormat } from "./options.js";
import { growth, treeJson } from "../outputs/summary.js";
import { withManifestOutput } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { LimitError, UsageError } from "../core/errors.js";
import { intOption, jobCommand, mapOption, outputOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { confirmOutput, print } from "./print.js";

interface TreeOptions extends RawOptions {
  readonly n?: string;
  readonly depth?: string;
  readonly below?: string;
  readonly steps?: string;
}

export function treeCommand(program: Command): Command {
  return jobCommand(program, "tree", "the inverse tree of N: every n whose trajectory reaches N, counted by inverse depth")
    .argument("<N>", "a positive integer not divisible by q (digits, or powers such as 2^40+1)")
    .option("--depth <K>", `inverse depth: 0 to ${MAX_TREE_DEPTH}`, "20")
    .option("--below <X>", "also count the nodes below X")
    .option("--steps <T|standard>", "steps of T (n/2, (qn+r)/2) or standard steps (n/2, qn+r)", "T")
    .option("--out <FILE>", "write the edges (node, parent, depth, kind) as CSV or Arrow, with FILE.json beside it")
    .option("--format <csv|arrow>", "output format (default: from the file name, else csv)")
    .option("--force", `allow more than ${group(CSV_ROW_GUARD)} edges`)
    .action((n: string, o: TreeOptions) => tree(n, o));
}

function stepsOption(v: string | undefined): StepConvention {
  if (v === "T" || v === "t") return "T";
  if (v === "standard") return "standard";
  throw new UsageError(`--steps must be T or standard, got "${v}"`);
}

/** The tree's parameters from the command line (N positional for `tree`, --n for `batch tree`). */
function treeParams(nText: string | undefined, o: TreeOptions): TreeParams {
  return {
    map: mapOption(o.map),
    n: parseWhole("N", nText),
    depth: intOption("depth", o.depth, 0, MAX_TREE_DEPTH, 20),
    steps: stepsOption(o.steps ?? "T"),
    below: o.below === undefined ? null : parseWhole("--below", o.below),
  };
}

/** Writes edges into an open file as they come (CSV, after its header) or at the end (Arrow, one record batch). */
async function edgeWriter(file: AtomicFile, format: FileFormat, force: boolean | undefined) {
  const held: TreeEdge[] = [];
  let rows = 0;
  if (format === "csv") await file.write("node,parent,depth,kind\n");
  return {
    async edge(e: TreeEdge): Promise<void> {
      if (++rows > CSV_ROW_GUARD && !force)
        throw new LimitError(
          `the tree has more edges than rows allowed, over the ${group(CSV_ROW_GUARD)}-row guard: choose a smaller --depth, or --force`,
        );
      if (format === "arrow") held.push(e);
      else await file.write(edgeLine(e));
    },
    async end(): Promise<void> {
      if (format === "arrow") await file.write(treeEdgesArrow(held));
    },
  };
}

const edgeManifest = (res: TreeResult, format: FileFormat, data: DataFile, stamp: ToolStamp) =>
  manifest("glidepath tree edges", res.map, format, data, stamp, { n: res.n, depth: res.depth, steps: res.steps, rows: res.total + 1n });

/** The inverse tree on a cluster: shards are groups of subtrees; merge --out writes the edges. */
export const treeBatch: BatchJob<TreeParams, TreeResult> = {
  job: treeJob,
  options: (cmd) =>
    cmd
      .option("--n <N>", "the root N: a positive integer not divisible by q (digits, or powers such as 2^40+1)")
      .option("--depth <K>", `inverse depth: 0 to ${MAX_TREE_DEPTH} (default 20)`)
      .option("--below <X>", "also count the nodes below X")
      .option("--steps <T|standard>", "steps of T (n/2, (qn+r)/2) or standard steps (n/2, qn+r) (default T)"),
  params: (o: TreeOptions) => treeParams(o.n, o),
  json: treeJson,
  out: {
    formats: ["csv", "arrow"],
    what: "the edges of the tree",
    async write(_pool, result, out, stamp) {
      await withManifestOutput(
        out.path,
        // a cluster's tree is large by intent, and merge has no --force: the row guard is for interactive runs
        async (file) => {
          // the cluster's parts hold tallies, not edges: the edges come from a walk here
          const w = await edgeWriter(file!, out.format, true);
          for (const e of treeEdges(result.map, result.steps, result.n, result.depth)) await w.edge(e);
          await w.end();
        },
        (_res, data) => edgeManifest(result, out.format, data, stamp),
      );
    },
  },
};

async function tree(nText: string, o: TreeOptions): Promise<void> {
  const params = treeParams(nText, o);
  const workers = workersOption(o.workers);
  const out = outputOption(o, ["csv", "arrow"], "csv");
  const stamp = await toolStamp();
  const r = await withPool(workers, `tree of ${params.n} under ${params.map.name}`, (pool, onProgress) =>
    withManifestOutput(
      out?.path,
      async (file) => {
        if (!file || !out) return runTree(pool, params, { onProgress });
        // one walk makes the tallies and the edges
        const w = await edgeWriter(file, out.format, o.force);
        const result = await walkWithEdges(params, (e) => w.edge(e), { onProgress });
        await w.end();
        return result;
      },
      (res, data) => edgeManifest(res, out!.format, data, stamp),
    ),
  );
  print(o.json ? `${toExactJson(treeJson(r))}\n` : treeText(r, workers));
  if (out) confirmOutput(o.json, `${plural(r.total + 1n, "edge")} of the tree (${out.format})`, out.path);
}

const edgeLine = (e: TreeEdge) => `${e.node},${e.parent ?? ""},${e.depth},${e.kind}\n`;

function treeText(r: TreeResult, workers: number): string {
  const x = r.below !== null;
  const head = ["depth", "nodes", "growth", "odd pred", "= 0 mod q", "least", "largest", "below N", ...(x ? ["below X"] : [])];
  const rows = r.levels.map((l, j) => [
    String(l.depth),
    group(l.nodes),
    j === 0 ? "" : (growth(l.nodes, r.levels[j - 1]!.nodes)?.toFixed(4) ?? ""),
    group(l.withOdd),
    group(l.zeroModQ),
    String(l.min ?? ""),
    String(l.max ?? ""),
    group(l.belowN),
    ...(x ? [group(l.belowX!)] : []),
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i]!.length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padStart(widths[i]!)).join("  ");
  const heuristic = r.steps === "T" ? `1 + 1/${r.map.q}` : `(1 + sqrt(1 + 4/${r.map.q}))/2`;
  return [
    `inverse tree of ${r.n} under ${r.map.name}, ${r.steps === "T" ? "steps of T" : "standard steps"}, to depth ${r.depth}`,
    `(a node at depth j reaches ${r.n} first after j steps; growth = nodes / nodes of the level above, heuristic ${heuristic} = ` +
      `${treeJson(r).heuristicGrowth})`,
    "",
    line(head),
    ...rows.map(line),
    "",
    `predecessors within depth ${r.depth}: ${group(r.total)}${x ? `; below ${r.below}: ${group(r.totalBelowX!)}` : ""}`,
    `${r.engine === "kernel" ? "kernel (u64)" : "BigInt"}, ${r.seconds.toFixed(2)} s, ${plural(workers, "worker")}`,
    "",
  ].join("\n");
}
