// The frontier: `verify` on one worker against the C measurement reference ../shared/ref/verify-pub.c
// (published techniques, plain 64-bit build with -DSCALAR: the per-core anchor), on the same slices,
// CPU time, medians of alternating runs. The reference is built here with the system's C compiler
// when there is one; its maxima must equal ours (else the line says so). Figures, not pass/fail.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { parseMap } from "../src/core/map.js";
import { nodePool } from "../src/node/kernel.js";
import { runVerify } from "../src/jobs/verify/verify.js";

const REFERENCE = new URL("../../shared/ref/verify-pub.c", import.meta.url).pathname;
const map = parseMap("3x+1");
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;
const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
};

/** The reference built here (its scalar build), or null without a C compiler or without its source. */
function buildReference(dir: string): string | null {
  if (!existsSync(REFERENCE)) return null;
  const bin = join(dir, "verify-pub-scalar");
  const cc = spawnSync("cc", ["-O3", "-march=native", "-DSCALAR", "-o", bin, REFERENCE], { encoding: "utf8" });
  return cc.status === 0 ? bin : null;
}

/** One run of the reference: its CPU seconds (user and system) and its two maxima as "n value". */
function runReference(bin: string, from: bigint, to: bigint) {
  const r = spawnSync("bash", ["-c", `TIMEFORMAT='%3U %3S'; time "${bin}" ${from} ${to}`], { encoding: "utf8" });
  const [u, s] = r.stderr.trim().split(/\s+/).slice(-2).map(Number);
  const glide = /glide (\d+) (\d+)/.exec(r.stdout);
  const path = /path (\d+) (\d+)/.exec(r.stdout);
  return { seconds: u! + s!, glide: glide ? `${glide[1]} ${glide[2]}` : "?", path: path ? `${path[1]} ${path[2]}` : "?" };
}

async function runOurs(workers: number, from: bigint, to: bigint) {
  const pool = await nodePool(workers);
  try {
    await runVerify(pool, { map, from, to: from + (1n << 20n) }); // warm the workers and the JIT
    const c0 = cpu();
    const t0 = performance.now();
    const r = await runVerify(pool, { map, from, to });
    const g = r.glideRecords.at(-1)!;
    const p = r.pathRecords.at(-1)!;
    // both print the largest glide in standard steps and the highest value under T before the first descent
    return { seconds: cpu() - c0, wall: (performance.now() - t0) / 1000, glide: `${g.n} ${g.standardSteps}`, path: `${p.n} ${p.peakT}` };
  } finally {
    pool.terminate();
  }
}

export async function frontierBench(rounds = 3): Promise<string[]> {
  const lines: string[] = [];
  const dir = mkdtempSync(join(tmpdir(), "glidepath-ref-"));
  try {
    const bin = buildReference(dir);
    if (!bin) lines.push("frontier: no C compiler or no ../shared/ref/verify-pub.c here, so no reference figures");
    const slices: [string, bigint, bigint][] = [
      ["[3*2^48+7, +2^34)", 3n * (1n << 48n) + 7n, 1n << 34n],
      ["[2^71, +2^32)", 1n << 71n, 1n << 32n],
    ];
    for (const [what, from, width] of slices) {
      const ours: number[] = [];
      const ref: number[] = [];
      let same = "";
      for (let i = 0; i < rounds; i++) {
        const o = await runOurs(1, from, from + width);
        ours.push(o.seconds);
        if (bin) {
          const c = runReference(bin, from, from + width);
          ref.push(c.seconds);
          same =
            c.glide === o.glide && c.path === o.path
              ? "maxima equal"
              : `MAXIMA DIFFER: ours ${o.glide} / ${o.path}, reference ${c.glide} / ${c.path}`;
        }
      }
      const n = Number(width);
      const o = median(ours);
      let line = `frontier ${what}: verify, 1 worker ${o.toFixed(2)} s CPU (${(n / o / 1e9).toFixed(2)}e9 n/s)`;
      if (bin) {
        const c = median(ref);
        line += `; C reference -DSCALAR ${c.toFixed(2)} s (${(n / c / 1e9).toFixed(2)}e9 n/s); ratio ${(o / c).toFixed(2)} (goal <= 2.0); ${same}`;
      }
      lines.push(`${line} (medians of ${rounds})`);
      const two = await runOurs(2, from, from + width);
      const one = await runOurs(1, from, from + width);
      lines.push(
        `frontier ${what}: wall time 1 worker ${one.wall.toFixed(2)} s, 2 workers ${two.wall.toFixed(2)} s (ratio ${(one.wall / two.wall).toFixed(2)})`,
      );
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return lines;
}

if (import.meta.url === `file://${process.argv[1]}`)
  for (const line of await frontierBench(Number(process.env.ROUNDS ?? 3))) console.log(line);
