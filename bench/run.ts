// npm run bench: figures, not pass/fail. Kernel throughput (1 worker and all cores), the plain
// TypeScript baseline, the exact counter at depth 10,000 and the peak memory of a depth-34 export.
import { spawnSync } from "node:child_process";
import { availableParallelism, cpus, tmpdir } from "node:os";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { parseMap } from "../src/core/map.js";
import { exactCounts } from "../src/core/exact.js";
import { runSieve } from "../src/jobs/sieve/sieve.js";
import type { Mode } from "../src/engine/messages.js";
import { nodePool } from "../src/node/kernel.js";
import { enumeratePlain } from "./ts-enumerate.js";
import { webBench } from "./web.js";
import { frontierBench } from "./frontier.js";
import { runCensus } from "../src/jobs/census/census.js";
import { runTree } from "../src/jobs/tree/tree.js";
import { searchCycles } from "../src/jobs/cycles/cycles.js";
import { inspect } from "../src/jobs/inspect.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import type { VerifyRequest } from "../src/jobs/verify/plan.js";

const map = parseMap("3x+1");
const cores = availableParallelism();
console.log(`machine: ${cpus()[0]?.model ?? "unknown cpu"}, ${cores} cores, node ${process.version}`);

const rows: string[][] = [["what", "workers", "nodes", "seconds", "M nodes/s"]];
const rate = (nodes: bigint | number, s: number) => (Number(nodes) / s / 1e6).toFixed(0);

async function kernelRun(mode: Mode, depth: number, workers: number): Promise<number> {
  const pool = await nodePool(workers);
  try {
    await runSieve(pool, { map, depth: Math.min(depth, 24), mode }); // warm the workers and the JIT
    const t = performance.now();
    const res = await runSieve(pool, { map, depth, mode });
    const s = (performance.now() - t) / 1000;
    rows.push([`kernel ${mode} depth ${depth}`, String(workers), res.nodes.toLocaleString("en-US"), s.toFixed(3), rate(res.nodes, s)]);
    return Number(res.nodes) / s;
  } finally {
    pool.terminate();
  }
}

const perWorker: number[] = [];
for (const depth of [32, 34, 36]) {
  perWorker.push(await kernelRun("survivors", depth, 1));
  if (cores > 1) await kernelRun("survivors", depth, cores);
}
for (const depth of [28, 30]) {
  await kernelRun("full", depth, 1);
  if (cores > 1) await kernelRun("full", depth, cores);
}

async function structureRun(
  what: string,
  workers: number,
  run: (pool: Awaited<ReturnType<typeof nodePool>>) => Promise<{ nodes: bigint }>,
): Promise<void> {
  const pool = await nodePool(workers);
  try {
    await runCensus(pool, map, 16); // warm the workers and the JIT
    const t = performance.now();
    const res = await run(pool);
    const s = (performance.now() - t) / 1000;
    rows.push([what, String(workers), res.nodes.toLocaleString("en-US"), s.toFixed(3), rate(res.nodes, s)]);
  } finally {
    pool.terminate();
  }
}
for (const w of cores > 1 ? [1, cores] : [1]) await structureRun("census depth 30", w, (pool) => runCensus(pool, map, 30));
await structureRun("cycles to period 30", cores, (pool) => searchCycles(pool, map, 30));
for (const w of cores > 1 ? [1, cores] : [1])
  await structureRun("inverse tree of 1 to depth 60 (steps of T)", w, async (pool) => {
    const r = await runTree(pool, { map, n: 1n, depth: 60, steps: "T", below: null });
    return { nodes: r.total + 1n };
  });
await structureRun("cycles 5x+1 to period 30 (128-bit)", cores, (pool) => searchCycles(pool, parseMap("5x+1"), 30));

{
  // the inspector on a 10,000-step trajectory and a 10,000-letter word (BigInt)
  const start = 2n ** 9999n - 1n;
  inspect(map, { kind: "number", n: 27n });
  let t0 = performance.now();
  inspect(map, { kind: "number", n: start }, 10_000);
  const tNumber = performance.now() - t0;
  t0 = performance.now();
  inspect(map, { kind: "word", word: "110".repeat(3333) + "1" });
  const tWord = performance.now() - t0;
  rows.push(["inspector: 10,000-step trajectory of 2^9999 - 1", "1", "-", (tNumber / 1000).toFixed(3), "-"]);
  rows.push(["inspector: class of a 10,000-letter word", "1", "-", (tWord / 1000).toFixed(3), "-"]);
}

// Verification: numbers per second over [2^50, 2^50 + 2^32), with the step tables and (baseline) with
// single steps only after the survivors' start at step K (step depth 1: no table steps).
async function verifyRun(what: string, workers: number, req: Omit<VerifyRequest, "map">, m = map): Promise<number> {
  const pool = await nodePool(workers);
  try {
    await runVerify(pool, { map: m, ...req, to: req.from + (1n << 24n) }); // warm the workers and the JIT
    const t0 = performance.now();
    const r = await runVerify(pool, { map: m, ...req });
    const sec = (performance.now() - t0) / 1000;
    const numbers = Number(req.to - req.from);
    rows.push([what, String(workers), `${numbers.toLocaleString("en-US")} n`, sec.toFixed(3), `${(numbers / sec / 1e6).toFixed(0)} M n/s`]);
    if (r.counts.numbers !== req.to - req.from) throw new Error("verify bench: counts do not add up");
    return numbers / sec;
  } finally {
    pool.terminate();
  }
}
const v50 = { from: 1n << 50n, to: (1n << 50n) + (1n << 32n), sieveDepth: 26, stepDepth: 12 };
const verifyRates: number[] = [];
for (const w of cores > 1 ? [1, cores] : [1])
  verifyRates.push(await verifyRun("verify [2^50, 2^50 + 2^32), K 26, step tables to 12", w, v50));
await verifyRun("verify baseline: same survivors, single steps", cores, { ...v50, stepDepth: 1 });
await verifyRun("verify 3x-1 (r < 0) [2^50, 2^50 + 2^32)", cores, v50, parseMap("3x-1"));
// the published frontier: a slice at 2^71 (n as a 128-bit pair in the kernel)
await verifyRun("verify [2^71, 2^71 + 2^32), K 26, step tables to 12", cores, { ...v50, from: 1n << 71n, to: (1n << 71n) + (1n << 32n) });
// A range from 1 by classes (settled bit by bit, the preimage skip on): the time per added bit, and
// the records up to 2^36 against the published lists (OEIS A060412 and A006884, from memory)
const fromOne: number[] = [];
for (const N of [30, 32, 34, 36]) {
  const pool = await nodePool(cores);
  try {
    const t0 = performance.now();
    const r = await runVerify(pool, { map, from: 1n, to: 1n << BigInt(N) });
    const sec = (performance.now() - t0) / 1000;
    fromOne.push(sec);
    const leaves = r.counts.checked + r.counts.preimage;
    rows.push([
      `verify [1, 2^${N}) by classes (${leaves.toLocaleString("en-US")} leaves)`,
      String(cores),
      `2^${N} n`,
      sec.toFixed(3),
      `${(2 ** N / sec / 1e6).toFixed(0)} M n/s`,
    ]);
    if (N === 36) {
      const a060412 = [217740015n, 1200991791n, 1827397567n, 2788008987n, 12235060455n];
      const a006884 = [1410123943n, 8528817511n, 12327829503n, 23035537407n, 45871962271n, 51739336447n, 59152641055n, 59436135663n];
      const tail = (xs: { n: bigint }[], k: number) =>
        xs
          .slice(-k)
          .map((x) => x.n)
          .join(",");
      const glideOk = tail(r.glideRecords, a060412.length) === a060412.join(",");
      const pathOk = tail(r.pathRecords, a006884.length) === a006884.join(",");
      console.log(
        `[1, 2^36): glide records end ${glideOk ? "as" : "NOT as"} A060412, path records end ${pathOk ? "as" : "NOT as"} A006884`,
      );
    }
  } finally {
    pool.terminate();
  }
}
const v40 = { from: 1n << 40n, to: (1n << 40n) + (1n << 24n), sieveDepth: 20, stepDepth: 16 };
await verifyRun("verify [2^40, 2^40 + 2^24)", cores, v40);
await verifyRun("verify [2^40, 2^40 + 2^24) with --delay", cores, { ...v40, delay: true });

const plainDepth = 30;
enumeratePlain(3, 1, 20);
let t = performance.now();
const plainNodes = enumeratePlain(3, 1, plainDepth);
let s = (performance.now() - t) / 1000;
rows.push([`plain TypeScript survivors depth ${plainDepth}`, "1", plainNodes.toLocaleString("en-US"), s.toFixed(3), rate(plainNodes, s)]);
const plainRate = plainNodes / s;

t = performance.now();
exactCounts(map, 10_000);
s = (performance.now() - t) / 1000;
rows.push(["exact counter depth 10,000", "1", "-", s.toFixed(3), "-"]);

const widths = rows[0]!.map((_, i) => Math.max(...rows.map((r) => r[i]!.length)));
for (const r of rows) console.log(r.map((c, i) => (i === 0 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join("  "));
const best = Math.max(...perWorker);
console.log(`kernel / plain TypeScript (survivors, 1 worker): ${(best / plainRate).toFixed(1)}x`);
if (verifyRates.length > 1) console.log(`verify: ${cores} workers / 1 worker: ${(verifyRates[1]! / verifyRates[0]!).toFixed(2)}x`);
console.log(
  `verify from 1 by classes (whole runs, each on a new pool): t(2^36) / t(2^32) = ${(fromOne[3]! / fromOne[1]!).toFixed(2)} (goal 8), ${((fromOne[3]! / fromOne[1]!) ** (1 / 4)).toFixed(2)} a bit`,
);

// Peak memory of a depth-34 raw export (the child reports its own max RSS, worker threads included).
const dir = mkdtempSync(join(tmpdir(), "glidepath-bench-"));
try {
  const out = join(dir, "s34.u64");
  const main = new URL("../lib/cli/main.js", import.meta.url).href;
  const script = `const { main } = await import(${JSON.stringify(main)}); const t = performance.now(); const code = await main(["sieve", "--depth", "34", "--out", ${JSON.stringify(out)}]); console.error("export " + ((performance.now() - t) / 1000).toFixed(1) + " s, peak RSS " + (process.resourceUsage().maxRSS / 1024).toFixed(0) + " MiB"); process.exitCode = code;`;
  const child = join(dir, "export.mjs");
  writeFileSync(child, script);
  const report = spawnSync("node", [child], { encoding: "utf8", stdio: ["ignore", "ignore", "pipe"] }).stderr;
  console.log(`depth-34 raw export (151,917,636 residues, u64): ${report.trim()}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}

// The frontier: verify on one worker beside the C reference (../shared/ref/verify-pub.c, -DSCALAR).
for (const line of await frontierBench()) console.log(line);

// The web app in headless Chromium (Debian's chromium).
for (const r of await webBench()) console.log(r.join("  "));
