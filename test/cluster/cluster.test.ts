// The cluster path as a user runs it: batch plans a job in RUN, its shards run (here one after
// another with --local or `glidepath shard`, and as a real Slurm job array), batch-status finds what
// failed, merge checks the parts and gives exactly the one-machine command's JSON and file.
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, describe, expect, it } from "vitest";
import { A076227 } from "../../src/core/published.js";
import { parseExactJson, toExactJson } from "../../src/core/json.js";
import { privateSlurm } from "../system.js";

const BIN = new URL("../../bin/glidepath.js", import.meta.url).pathname;
const exec = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), "glidepath-cluster-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Ran {
  code: number;
  stdout: string;
  stderr: string;
}

async function sh(cmd: string, args: string[], env: Record<string, string> = {}): Promise<Ran> {
  try {
    const { stdout, stderr } = await exec(cmd, args, { maxBuffer: 64 << 20, env: { ...process.env, ...env } });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

const cli = (args: string[], env: Record<string, string> = {}) => sh("node", [BIN, ...args], env);

/** A command's JSON without its timing (the one field that differs between runs). */
function untimed(text: string): unknown {
  const j = parseExactJson(text) as Record<string, unknown>;
  delete j.seconds;
  return j;
}

/**
 * Merge's JSON against the one-machine command's: every field merge prints (but the time) is the
 * one-machine run's; that run may add fields about its own process (verify: the blocks it ran, its
 * passes), and `own` names further fields that say how the one-machine run computed (tree --out: engine).
 */
function sameAsSingle(mergedText: string, singleText: string, own: readonly string[] = []): void {
  const merged = parseExactJson(mergedText) as Record<string, unknown>;
  const single = parseExactJson(singleText) as Record<string, unknown>;
  for (const k of Object.keys(merged)) if (k !== "seconds" && !own.includes(k)) expect(merged[k], `field ${k}`).toEqual(single[k]);
}

async function ok(args: string[], env: Record<string, string> = {}): Promise<string> {
  const r = await cli(args, env);
  if (r.code !== 0) throw new Error(`glidepath ${args.join(" ")} exited ${r.code}: ${r.stderr}`);
  return r.stdout;
}

const runDir = (name: string) => join(dir, name);

// Each job with its options, the one-machine command, and a fact from outside the project.
const JOBS = [
  {
    name: "sieve",
    opts: ["--depth", "30"],
    shards: 16,
    outside: (j: Record<string, unknown>) =>
      // survivors by depth: OEIS A076227 (published entry)
      expect((j.levels as { survivors: bigint }[]).map((l) => l.survivors)).toEqual(A076227.slice(0, 31)),
  },
  {
    name: "census",
    opts: ["--depth", "26"],
    shards: 8,
    // the census checks its kernel walk against the exact counter (an independent lattice-path count)
    outside: (j: Record<string, unknown>) => expect(j.agreesWithExactCounter).toBe(true),
  },
  {
    name: "cycles",
    opts: ["--map", "3x+5", "--max-period", "26"],
    shards: 8,
    // the positive cycles of 3x+5 with these periods: minima 1, 5, 19, 23 (from memory: the 3x+k tables)
    outside: (j: Record<string, unknown>) =>
      expect((j.cycles as { min: bigint }[]).map((c) => c.min).filter((m) => m > 0n)).toEqual([1n, 5n, 19n, 23n]),
  },
  {
    name: "verify",
    opts: ["--from", "1", "--to", "2^24", "--sieve-depth", "16"],
    shards: 4,
    // glide records below 2^24: OEIS A060412 (the published entry's terms below 2^24)
    outside: (j: Record<string, unknown>) =>
      expect((j.glideRecords as { n: bigint }[]).map((g) => g.n)).toEqual(
        [2, 3, 7, 27, 703, 10087, 35655, 270271, 362343, 381727, 626331, 1027431, 1126015, 8088063, 13421671].map(BigInt),
      ),
  },
  {
    name: "conjugacy",
    opts: ["--depth", "16"],
    shards: 4,
    // a permutation of 2^16 residues: its cycle lengths sum to 2^16 (common practice)
    outside: (j: Record<string, unknown>) =>
      expect((j.lengths as { length: bigint; count: bigint }[]).reduce((s, l) => s + l.length * l.count, 0n)).toBe(1n << 16n),
  },
  {
    name: "tree",
    opts: ["--n", "1", "--depth", "30"],
    single: ["tree", "1", "--depth", "30"],
    shards: 4,
    // nodes at inverse depth j of the tree of 1 under steps of T: OEIS A060322 (published entry, terms 0..11)
    outside: (j: Record<string, unknown>) =>
      expect((j.levels as { nodes: bigint }[]).slice(0, 12).map((l) => l.nodes)).toEqual(
        [1, 1, 1, 1, 2, 3, 4, 5, 6, 8, 12, 18].map(BigInt),
      ),
  },
] as const;

/** Runs every shard of RUN with `glidepath shard`, one after another. */
async function runShards(run: string, shards: number, env: Record<string, string> = {}): Promise<Ran[]> {
  const out: Ran[] = [];
  for (let i = 0; i < shards; i++) out.push(await cli(["shard", run, String(i), "--workers", "2"], env));
  return out;
}

describe("cluster: batch --local and merge equal the one-machine command", () => {
  for (const job of JOBS) {
    it(`${job.name} ${job.opts.join(" ")} in ${job.shards} shards`, async () => {
      const run = runDir(`local-${job.name}`);
      await ok(["batch", job.name, ...job.opts, "--shards", String(job.shards), "--dir", run, "--local", "--cpus-per-task", "2"]);
      const merged = await ok(["merge", run]);
      const single = await ok([...("single" in job ? job.single : [job.name, ...job.opts]), "--json", "--workers", "2"]);
      sameAsSingle(merged, single);
      job.outside(parseExactJson(merged) as Record<string, unknown>);
    });
  }

  it("tree: merge --out writes the edges that tree --out writes", async () => {
    const run = runDir("local-tree");
    await ok(["merge", run, "--out", join(dir, "merged-edges.csv")]);
    await ok(["tree", "1", "--depth", "30", "--out", join(dir, "single-edges.csv"), "--workers", "2"]);
    expect(readFileSync(join(dir, "merged-edges.csv")).equals(readFileSync(join(dir, "single-edges.csv")))).toBe(true);
  });

  it("sieve: the merged class table is byte-identical to sieve --out, and so is its manifest's sha256", async () => {
    const run = runDir("local-sieve");
    await ok(["merge", run, "--out", join(dir, "merged.u32")]);
    await ok(["sieve", "--depth", "30", "--out", join(dir, "single.u32"), "--workers", "2"]);
    expect(readFileSync(join(dir, "merged.u32")).equals(readFileSync(join(dir, "single.u32")))).toBe(true);
    const m = (f: string) => parseExactJson(readFileSync(join(dir, `${f}.json`), "utf8")) as Record<string, unknown>;
    expect(m("merged.u32").sha256).toBe(m("single.u32").sha256);
    expect(m("merged.u32").rows).toBe(A076227[30]); // OEIS A076227 (published entry)
  });

  it("the plan and the script: one array task per shard, estimates, logs under RUN/logs", async () => {
    const run = runDir("local-sieve");
    const script = readFileSync(join(run, "job.sbatch"), "utf8");
    expect(script).toMatch(/^#SBATCH --array=0-15$/m);
    expect(script).toMatch(/^#SBATCH --cpus-per-task=2$/m);
    expect(script).toMatch(/^#SBATCH --mem=\d+M$/m);
    expect(script).toMatch(/^#SBATCH --time=\d\d:\d\d:\d\d$/m);
    expect(script).toContain(`--output=${run}/logs/shard-%a.out`);
    expect(script).toMatch(/shard "\$RUN" "\$SLURM_ARRAY_TASK_ID"/);
    const plan = JSON.parse(readFileSync(join(run, "plan.json"), "utf8")) as { plan: { shards: unknown[]; hash: string } };
    expect(plan.plan.shards).toHaveLength(16);
    expect(plan.plan.hash).toMatch(/^[0-9a-f]{64}$/);
  });
});

describe("cluster: failures are found, rerun and merged; bad parts are refused", () => {
  const run = runDir("fail-census");

  it("a failed shard leaves its error line; batch-status names it and prints the rerun line", async () => {
    await ok(["batch", "census", "--depth", "20", "--shards", "6", "--dir", run]);
    const ran = await runShards(run, 6, { GLIDEPATH_FAIL_SHARDS: "3" });
    expect(ran.map((r) => r.code)).toEqual([0, 0, 0, 1, 0, 0]);
    expect(ran[3]!.stderr.trim().split("\n")).toEqual(["glidepath: shard 3 failed on purpose (GLIDEPATH_FAIL_SHARDS)"]);
    rmSync(join(run, "parts", "5.json")); // as if task 5 had been killed
    const st = await cli(["batch-status", run]);
    expect(st.code).toBe(1); // not complete
    const text = st.stdout;
    expect(text).toContain("done 4, failed 1, missing 1, damaged 0");
    expect(text).toContain("failed: shard 3: shard 3 failed on purpose");
    expect(text).toContain(`rerun what is not done: sbatch --array=3,5 ${run}/job.sbatch`);
    expect(text).toContain(`or here: for i in 3 5; do glidepath shard ${run} $i; done`);
    const j = parseExactJson((await cli(["batch-status", run, "--json"])).stdout) as { complete: boolean; missing: bigint[] };
    expect(j.complete).toBe(false);
    expect(j.missing).toEqual([5n]);
  });

  it("merge refuses while parts are missing, with one line naming them", async () => {
    const r = await cli(["merge", run]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    const lines = r.stderr.trim().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(
      /merge refused: 2 of 6 parts are missing or bad .*part 3: missing \(the shard failed: shard 3 failed on purpose/,
    );
    expect(lines[0]).toContain("part 5: missing");
  });

  it("rerunning only the missing shards completes the run, and the merge equals the one-machine census", async () => {
    for (const i of ["3", "5"]) await ok(["shard", run, i, "--workers", "2"]);
    expect(await ok(["batch-status", run])).toContain(`complete: glidepath merge ${run}`);
    expect(existsSync(join(run, "parts", "3.failed"))).toBe(false);
    // running a shard twice is harmless
    await ok(["shard", run, "0", "--workers", "2"]);
    expect(untimed(await ok(["merge", run]))).toEqual(untimed(await ok(["census", "--depth", "20", "--json", "--workers", "2"])));
  });

  it("a changed byte in a part's file, or a part from another plan, is refused with one line naming the part", async () => {
    const sieveRun = runDir("local-sieve");
    const table = join(sieveRun, "parts", "1.table");
    const bytes = readFileSync(table);
    const changed = Buffer.from(bytes);
    changed[100] = changed[100]! ^ 1;
    writeFileSync(table, changed);
    const r = await cli(["merge", sieveRun, "--out", join(dir, "never.u32")]);
    writeFileSync(table, bytes);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/part 1: parts\/1\.table differs from its manifest/);
    expect(existsSync(join(dir, "never.u32"))).toBe(false);

    const other = runDir("other-census");
    await ok(["batch", "census", "--depth", "20", "--shards", "6", "--dir", other, "--cpus-per-task", "1"]);
    await runShards(other, 6);
    copyFileSync(join(other, "parts", "2.json"), join(run, "parts", "2.json"));
    const r2 = await cli(["merge", run]);
    expect(r2.code).toBe(2);
    expect(r2.stderr.trim().split("\n")).toHaveLength(1);
    expect(r2.stderr).toMatch(/part 2: written for plan [0-9a-f]{16}, this run's plan is [0-9a-f]{16}/);
  });

  it("a part whose results were edited, truncated or taken from another run is refused by merge and batch-status, naming it", async () => {
    const vrun = runDir("tamper-verify");
    await ok(["batch", "verify", "--from", "1", "--to", "2^22", "--sieve-depth", "12", "--shards", "3", "--dir", vrun, "--local"]);
    expect((await cli(["batch-status", vrun])).code).toBe(0);
    const path = join(vrun, "parts", "1.json");
    const text = readFileSync(path, "utf8");
    // one count moved from checked to exceptions in a block of part 1 (its total unchanged)
    const edited = text.replace(
      /"checked":\{"\$n":"(\d+)"\},"sievedByDepth":(\[[^\]]*\]),"exceptions":\{"\$n":"(\d+)"\}/,
      (_m, c, s, e) => `"checked":{"$n":"${BigInt(c) - 1n}"},"sievedByDepth":${s},"exceptions":{"$n":"${BigInt(e) + 1n}"}`,
    );
    expect(edited).not.toBe(text);
    for (const [content, why] of [
      [edited, /part 1: parts\/1\.json was changed after it was written/],
      [text.slice(0, text.length >> 1), /part 1: parts\/1\.json is not JSON \(truncated or damaged\)/],
    ] as const) {
      writeFileSync(path, content);
      const m = await cli(["merge", vrun]);
      expect(m.code).toBe(2);
      expect(m.stderr.trim().split("\n")).toHaveLength(1);
      expect(m.stderr).toMatch(why);
      const st = await cli(["batch-status", vrun]);
      expect(st.code).toBe(1);
      expect(st.stdout).toMatch(/damaged 1/);
      expect(st.stdout).toContain(`rerun what is not done: sbatch --array=1 ${vrun}/job.sbatch`);
    }
    writeFileSync(path, text);
    const merged = parseExactJson(await ok(["merge", vrun, "--out", join(dir, "tamper.cert.json")])) as { counts: { numbers: bigint } };
    expect(merged.counts.numbers).toBe((1n << 22n) - 1n);
    const cert = parseExactJson(readFileSync(join(dir, "tamper.cert.json"), "utf8")) as { started: string; finished: string };
    const times = [0, 1, 2].map(
      (i) => parseExactJson(readFileSync(join(vrun, "parts", `${i}.json`), "utf8")) as { started: string; finished: string },
    );
    expect(cert.started).toBe(times.map((t) => t.started).sort()[0]); // the earliest start, the latest finish
    expect(cert.finished).toBe(
      times
        .map((t) => t.finished)
        .sort()
        .at(-1),
    );
  });

  it("shards beyond the work are not planned, and batch says so", async () => {
    const r = await cli([
      "batch",
      "verify",
      "--from",
      "2^26",
      "--to",
      "2^27",
      "--periods",
      "--shards",
      "4",
      "--dir",
      runDir("small-verify"),
    ]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/asked for 4 shards, but only 1 would have work \(1 kernel task\): planned 1/);
    expect(r.stdout).toMatch(/as 1 shard of 1 kernel task/);
  });

  it("bad requests get one line and exit 2", async () => {
    const cases: [string[], RegExp][] = [
      [["batch", "sieve", "--depth", "20", "--dir", runDir("x")], /--shards is required/],
      [["batch", "sieve", "--depth", "20", "--shards", "0", "--dir", runDir("x")], /--shards must be from 1/],
      [["batch", "sieve", "--depth", "99", "--shards", "2", "--dir", runDir("x")], /^glidepath: --depth must be from 0 to 63, got 99$/m],
      [["batch", "census", "--depth", "20", "--shards", "3", "--dir", run], /already holds another plan/],
      [["shard", run, "6"], /shard 6 is not in the plan/],
      [["shard", join(dir, "nowhere"), "0"], /is not a glidepath run/],
      [["merge", run, "--out", join(dir, "c.csv")], /c\.csv is named as csv, which this command does not write \(it writes arrow\)/],
      [
        ["merge", runDir("tamper-verify"), "--out", join(dir, "c.csv")],
        /c\.csv is named as csv, .*it writes the certificate, JSON: name it \.json/,
      ],
      [["merge", runDir("damaged-plan")], /plan\.json is damaged: it does not hold a plan/],
      [["batch-status", runDir("damaged-plan")], /plan\.json is damaged: it does not hold a plan/],
    ];
    mkdirSync(join(runDir("damaged-plan"), "parts"), { recursive: true });
    writeFileSync(join(runDir("damaged-plan"), "plan.json"), '{"kind": "glidepath plan", "plan": {"job": "verify"}}');
    for (const [args, msg] of cases) {
      const r = await cli(args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stderr.trim().split("\n"), args.join(" ")).toHaveLength(1);
      expect(r.stderr).toMatch(msg);
    }
  });
});

// ---- every option of every job, through plan.json, shards on disk and merge ----

/** Fields that say when and where a file was made, not what it holds (a certificate's document digest covers its times). */
const WHEN_FIELDS = new Set(["started", "finished", "workers", "digest", "created", "seconds"]);

/** Two documents equal field by field, apart from WHEN_FIELDS; each differing field is named. */
function sameFields(merged: Record<string, unknown>, single: Record<string, unknown>, what: string): void {
  const keys = new Set([...Object.keys(merged), ...Object.keys(single)]);
  for (const k of keys) if (!WHEN_FIELDS.has(k)) expect(merged[k], `${what}: field ${k}`).toEqual(single[k]);
}

const readExact = (path: string) => parseExactJson(readFileSync(path, "utf8")) as Record<string, unknown>;

/**
 * A job's options through a cluster run (batch --local, merge --out) against the one-machine command
 * (--json --out) with the same options: the JSON field by field (the one-machine run may add fields
 * about its own process), the --out file byte for byte or, for a certificate, field by field, and its
 * manifest field by field. The check values are the one-machine run's (a computation inside the test).
 */
const OPTION_CASES: { job: string; opts: string[]; single?: string[]; shards: number; out?: string }[] = [
  // verify: the run (--periods was dropped by the plan's encoder: 15 blocks planned, 16 run)
  { job: "verify", opts: ["--from", "2^20", "--to", "2^24", "--periods"], shards: 3, out: "cert.json" },
  { job: "verify", opts: ["--from", "1", "--to", "2^18", "--no-preimage"], shards: 3, out: "cert.json" },
  { job: "verify", opts: ["--from", "2^16", "--to", "2^19", "--delay"], shards: 3, out: "cert.json" },
  { job: "verify", opts: ["--from", "1000", "--to", "2^20+77", "--sieve-depth", "10", "--step-depth", "7"], shards: 3, out: "cert.json" },
  { job: "verify", opts: ["--from", "2^20", "--to", "2^21", "--sieve-depth", "14", "--max-steps", "20"], shards: 2, out: "cert.json" },
  { job: "verify", opts: ["--map", "3x+5", "--from", "1", "--to", "2^16", "--no-preimage"], shards: 2, out: "cert.json" },
  { job: "verify", opts: ["--map", "3x-1", "--from", "1", "--to", "5000", "--sieve-depth", "8", "--delay"], shards: 2, out: "cert.json" },
  // the records known below FROM travel too: merge reports the new records and writes them in the certificate
  { job: "verify", opts: ["--from", "10^6", "--to", "2^20+2^18", "--known-published", "--skip-reached"], shards: 3, out: "cert.json" },
  {
    job: "verify",
    opts: ["--from", "2^30", "--to", "2^30+2^20", "--known-glide", "300", "--known-path", "2^36"],
    shards: 2,
    out: "cert.json",
  },
  { job: "sieve", opts: ["--map", "3x-1", "--depth", "16"], shards: 3, out: "table.u32" },
  { job: "census", opts: ["--map", "5x+1", "--depth", "12"], shards: 3, out: "census.arrow" },
  { job: "cycles", opts: ["--map", "3x+5", "--max-period", "14"], shards: 3, out: "cycles.arrow" },
  { job: "conjugacy", opts: ["--map", "3x-1", "--depth", "10"], shards: 3 },
  {
    job: "tree",
    opts: ["--map", "3x+5", "--n", "7", "--depth", "14", "--steps", "standard", "--below", "100"],
    single: ["tree", "7", "--map", "3x+5", "--depth", "14", "--steps", "standard", "--below", "100"],
    shards: 3,
    out: "edges.csv",
  },
];

describe("cluster: every option of every job travels through plan.json, the shards and merge", () => {
  OPTION_CASES.forEach((c, i) => {
    it(`batch ${c.job} ${c.opts.join(" ")} = ${c.job} with the same options`, async () => {
      const run = runDir(`option-${i}`);
      const mergedOut = c.out ? join(dir, `option-${i}-merged`, c.out) : null;
      const singleOut = c.out ? join(dir, `option-${i}-single`, c.out) : null;
      for (const f of [mergedOut, singleOut]) if (f) mkdirSync(join(f, ".."), { recursive: true });
      await ok(["batch", c.job, ...c.opts, "--shards", String(c.shards), "--dir", run, "--local", "--cpus-per-task", "1"]);
      const merged = await ok(["merge", run, ...(mergedOut ? ["--out", mergedOut] : []), "--workers", "1"]);
      const single = await ok([
        ...(c.single ?? [c.job, ...c.opts]),
        "--json",
        ...(singleOut ? ["--out", singleOut] : []),
        "--workers",
        "1",
      ]);
      // tree --out walks the tree in BigInt to write its edges, and says so in `engine`
      sameAsSingle(merged, single, c.job === "tree" ? ["engine"] : []);
      if (!mergedOut || !singleOut) return;
      if (c.job === "verify") sameFields(readExact(mergedOut), readExact(singleOut), "certificate");
      else {
        expect(readFileSync(mergedOut).equals(readFileSync(singleOut)), `${c.out} bytes`).toBe(true);
        sameFields(readExact(`${mergedOut}.json`), readExact(`${singleOut}.json`), "manifest");
      }
    });
  });
});

it("verify 3x+5 by classes with the preimage skip: merge refuses and names --no-preimage (the one-machine run goes again without it)", async () => {
  const run = runDir("preimage-3x+5");
  await ok([
    "batch",
    "verify",
    "--map",
    "3x+5",
    "--from",
    "1",
    "--to",
    "2^12",
    "--shards",
    "2",
    "--dir",
    run,
    "--local",
    "--cpus-per-task",
    "1",
  ]);
  const m = await cli(["merge", run, "--workers", "1"]);
  expect(m.code).toBe(2);
  expect(m.stdout).toBe("");
  expect(m.stderr).toMatch(/cycle entrants with the preimage sieve on.*--no-preimage/);
  expect(m.stderr).toMatch(/plan it again with --no-preimage \(glidepath batch verify \.\.\. --no-preimage\)$/m); // the batch's fix
  // the one-machine command's second pass: preimage false (the run without the skip)
  expect(
    (
      parseExactJson(await ok(["verify", "--map", "3x+5", "--from", "1", "--to", "2^12", "--json", "--workers", "1"])) as {
        preimage: boolean;
      }
    ).preimage,
  ).toBe(false);
});

describe("cluster: a part that is not its shard's, an extra part, a resumed block of another range", () => {
  const run = runDir("slips-census");

  it("a part copied over another part's file is refused by merge and batch-status (its shard number is not the file's)", async () => {
    await ok(["batch", "census", "--depth", "14", "--shards", "3", "--dir", run, "--local", "--cpus-per-task", "1"]);
    const one = join(run, "parts", "1.json");
    const saved = readFileSync(one);
    copyFileSync(join(run, "parts", "0.json"), one); // digest, plan and build all sound: only the shard number differs
    const m = await cli(["merge", run]);
    expect(m.code).toBe(2);
    expect(m.stdout).toBe("");
    expect(m.stderr.trim().split("\n")).toHaveLength(1);
    expect(m.stderr).toMatch(/part 1: its manifest says shard 0/);
    const st = await cli(["batch-status", run]);
    expect(st.code).toBe(1);
    expect(st.stdout).toContain("done 2, failed 0, missing 0, damaged 1");
    expect(st.stdout).toContain(`rerun what is not done: sbatch --array=1 ${run}/job.sbatch`);
    writeFileSync(one, saved);
    expect((await cli(["batch-status", run])).code).toBe(0);
  });

  it("an extra part file makes the run incomplete: batch-status says so (exit 1) and merge refuses", async () => {
    for (const name of ["3.json", "01.json"]) {
      const extra = join(run, "parts", name);
      copyFileSync(join(run, "parts", "0.json"), extra);
      const st = await cli(["batch-status", run]);
      expect(st.code, name).toBe(1);
      expect(st.stdout).toContain("done 3, failed 0, missing 0, damaged 0, not in the plan 1");
      expect(st.stdout).toContain(`not complete: remove the parts not in the plan: rm ${extra}`);
      expect(st.stdout).not.toContain("complete: glidepath merge");
      const j = parseExactJson((await cli(["batch-status", run, "--json"])).stdout) as { complete: boolean; extra: string[] };
      expect(j.complete).toBe(false);
      expect(j.extra).toEqual([name]);
      const m = await cli(["merge", run]);
      expect(m.code, name).toBe(2);
      expect(m.stderr).toMatch(name === "3.json" ? /part 3: not in the plan \(shards 0 to 2\)/ : /parts\/01\.json: not a part of the plan/);
      rmSync(extra);
    }
    expect(await ok(["batch-status", run])).toContain(`complete: glidepath merge ${run}`);
  });

  it("--resume refuses a checkpoint whose block ends (or starts) elsewhere than the plan's block, before running anything", async () => {
    const cp = join(dir, "slip.checkpoint.json");
    await ok(["verify", "--from", "1", "--to", "2^18", "--sieve-depth", "10", "--checkpoint", cp, "--workers", "1"]);
    const text = readFileSync(cp, "utf8");
    for (const field of ["last", "first"]) {
      const j = parseExactJson(text) as { done: Record<string, bigint>[] };
      j.done[1]![field] = j.done[1]![field]! - 1n; // the rest of the file (its key, its block count) is the plan's
      writeFileSync(cp, toExactJson(j));
      const r = await cli(["verify", "--resume", cp, "--workers", "1"]);
      expect(r.code, field).toBe(2);
      expect(r.stdout, field).toBe("");
      expect(r.stderr.trim().split("\n"), field).toEqual([`glidepath: ${cp}: its block 1 is not the plan's block 1: it cannot be resumed`]);
    }
    writeFileSync(cp, text);
    expect((await cli(["verify", "--resume", cp, "--workers", "1"])).code).toBe(0);
  });
});

describe("cluster: a part's digest finds damage, not a node that lies; the merged certificate's full check does", () => {
  const run = runDir("lying-verify");

  it("batch-status and merge print the check to run; a part edited and re-digested merges, and --check --full refuses it", async () => {
    await ok([
      "batch",
      "verify",
      "--from",
      "2^20",
      "--to",
      "2^22",
      "--sieve-depth",
      "12",
      "--shards",
      "3",
      "--dir",
      run,
      "--local",
      "--cpus-per-task",
      "1",
    ]);
    const cert = join(run, "certificate.json");
    const status = await ok(["batch-status", run]);
    expect(status).toContain(`complete: glidepath merge ${run} --out ${cert}; glidepath verify --check ${cert} --full`);
    expect(status).toContain("a part's digest finds accidental damage, not a node that lies");
    // a node that lies: one count moved from checked to exceptions in a block of part 1, and the part's digest made again
    const path = join(run, "parts", "1.json");
    const text = readFileSync(path, "utf8");
    const edited = text.replace(
      /"checked":\{"\$n":"(\d+)"\},"sievedByDepth":(\[[^\]]*\]),"exceptions":\{"\$n":"(\d+)"\}/,
      (_m, c, s, e) => `"checked":{"$n":"${BigInt(c) - 1n}"},"sievedByDepth":${s},"exceptions":{"$n":"${BigInt(e) + 1n}"}`,
    );
    expect(edited).not.toBe(text);
    const { digest: _old, ...body } = parseExactJson(edited) as Record<string, unknown>;
    // the part digest as cluster.ts defines it: sha256 of the part's exact JSON without the digest (README)
    writeFileSync(path, `${toExactJson({ ...body, digest: createHash("sha256").update(toExactJson(body)).digest("hex") })}\n`);
    expect((await cli(["batch-status", run])).code).toBe(0); // the digest cannot tell
    const m = await cli(["merge", run, "--out", cert, "--workers", "1"]);
    expect(m.code).toBe(0);
    expect(m.stderr).toContain(`check it: glidepath verify --check ${cert} --full`);
    const full = await cli(["verify", "--check", cert, "--full", "--workers", "1"]);
    expect(full.code).not.toBe(0); // running every block again finds the forged one
    writeFileSync(path, text);
  });
});

// submitted only to the private single-node Slurm that test/cluster/slurm.sh started, when asked for
const slurm = privateSlurm();

describe.runIf(slurm !== null)("cluster: a real Slurm job array (sbatch --wait)", () => {
  for (const job of JOBS.filter((j) => j.name !== "conjugacy" && j.name !== "tree")) {
    it(`${job.name}: submitted, merged, equal to the one-machine command`, { timeout: 300_000 }, async () => {
      const run = runDir(`slurm-${job.name}`);
      await ok(["batch", job.name, ...job.opts, "--shards", String(job.shards), "--dir", run, "--cpus-per-task", "1"]);
      const sub = await sh("sbatch", ["--wait", join(run, "job.sbatch")], slurm!);
      expect(sub.code, sub.stderr).toBe(0);
      expect(await ok(["batch-status", run])).toContain("complete");
      const out = job.name === "sieve" ? ["--out", join(dir, "slurm.u32")] : [];
      const merged = await ok(["merge", run, ...out]);
      sameAsSingle(merged, await ok([job.name, ...job.opts, "--json", "--workers", "2"]));
      job.outside(parseExactJson(merged) as Record<string, unknown>);
      if (job.name === "sieve") expect(readFileSync(join(dir, "slurm.u32")).equals(readFileSync(join(dir, "single.u32")))).toBe(true);
    });
  }

  it("a task that fails is named by batch-status; its rerun line, submitted, completes the run", { timeout: 300_000 }, async () => {
    const run = runDir("slurm-fail");
    await ok(["batch", "census", "--depth", "22", "--shards", "4", "--dir", run, "--cpus-per-task", "1"]);
    const sub = await sh("sbatch", ["--wait", "--export=ALL,GLIDEPATH_FAIL_SHARDS=2", join(run, "job.sbatch")], slurm!);
    expect(sub.code).not.toBe(0); // sbatch --wait reports the failed task
    const status = await cli(["batch-status", run]);
    expect(status.code).toBe(1);
    const text = status.stdout;
    expect(text).toContain("failed: shard 2: shard 2 failed on purpose");
    const line = /rerun what is not done: (sbatch .*)$/m.exec(text)?.[1];
    expect(line).toBe(`sbatch --array=2 ${run}/job.sbatch`);
    expect(readFileSync(join(run, "logs", "shard-2.out"), "utf8")).toContain("shard 2 failed on purpose");
    const [cmd, ...args] = line!.split(" ");
    const again = await sh(cmd!, ["--wait", ...args], slurm!);
    expect(again.code, again.stderr).toBe(0);
    expect(await ok(["batch-status", run])).toContain("complete");
    expect(untimed(await ok(["merge", run]))).toEqual(untimed(await ok(["census", "--depth", "22", "--json", "--workers", "2"])));
  });
});
