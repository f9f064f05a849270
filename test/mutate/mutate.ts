// npm run mutate: plants one bug at a time in a copy of the tree (the kernels in assembly/, the
// library in src/), rebuilds what it touches, runs the tests that guard that code, and reports which
// test killed each planted bug (or that none did). The bugs are the classes that verification relies
// on: carries and overflow checks, cut depths, the descent and cycle tests, table steps, path bounds,
// record sweeps, certificate and part checks. Usage: npm run mutate [-- NAME ...] (names as listed;
// --all also runs the bugs marked masked: ones that, by the design, change no result).
import { execFileSync, spawnSync } from "node:child_process";
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

interface Mutant {
  readonly name: string;
  readonly file: string;
  readonly find: string;
  readonly replace: string;
  /** The test files that guard this code. */
  readonly tests: readonly string[];
  /** Why the planted bug cannot change a result (it is run only with --all, and not scored). */
  readonly masked?: string;
}

const VERIFY = ["test/verify.test.ts", "test/certificate.test.ts", "test/u128.test.ts"];
const CLASSES = ["test/classes.test.ts"];
const MUTANTS: Mutant[] = [
  {
    name: "classes: a settled class counted one member short",
    file: "assembly/verify.ts",
    find: "store<u64>(p, load<u64>(p) + (X - x));",
    replace: "store<u64>(p, load<u64>(p) + (X - x - 1));",
    tests: CLASSES,
  },
  {
    name: "classes: a leaf skipped behind a smaller number below FROM",
    file: "assembly/verify.ts",
    find: "if (fromN > 1) return preimageBelow(n) >= fromN;",
    replace: "if (fromN > 1) return preimageBelow(n) != 0;",
    tests: CLASSES,
  },
  {
    name: "classes: a leaf's path never iterated again exactly when its bound could beat the band's",
    file: "assembly/verify.ts",
    find: "    if (exceededPath) {\n      const again = exact(n, 0);",
    replace: "    if (false) {\n      const again = exact(n, 0);",
    tests: CLASSES,
  },
  {
    name: "u128: a dropped carry from the low word in the multiply-add",
    file: "assembly/u128.ts",
    find: "  if (l2 < l) {\n    hh++;",
    replace: "  if (l2 < l) {\n    hh += 0;",
    tests: VERIFY,
  },
  {
    name: "u128: a missed overflow of the high word in the multiply-add",
    file: "assembly/u128.ts",
    find: "carry = mulhi(hi, y) != 0 || hh < h;",
    replace: "carry = hh < h;",
    tests: VERIFY,
  },
  {
    name: "kernel: a return to n taken for a descent in the fast path",
    file: "assembly/verify.ts",
    find: "      bh = vh;\n    }\n    if (ltU(vl, vh, nl, nh)) break;",
    replace: "      bh = vh;\n    }\n    if (leU(vl, vh, nl, nh)) break;",
    tests: VERIFY,
  },
  {
    name: "kernel: a table step that may pass over the first value below n",
    file: "assembly/verify.ts",
    find: "let d = bits - nBits - 1;",
    replace: "let d = bits - nBits + 1;",
    tests: VERIFY,
    masked:
      "the fast path's glide only decides whether a survivor is iterated again in single steps (exact), which finds its records; " +
      "a descent passed over is found later, so only the time changes",
  },
  {
    name: "kernel: a class's cut depth off by one",
    file: "assembly/verify.ts",
    find: "if (cutDepth == 0 && steps <= K && steps >= dropDepth(odd)) cutDepth = steps;",
    replace: "if (cutDepth == 0 && steps <= K && steps > dropDepth(odd)) cutDepth = steps;",
    tests: VERIFY,
  },
  {
    name: "kernel: the peak bound without its slack",
    file: "assembly/verify.ts",
    find: "const l = rlo + slack;",
    replace: "const l = rlo;",
    tests: VERIFY,
    masked:
      "no input found where it changes a record: 72 ranges of 3x+r (r up to 2^20 - 1, depths 4 to 12) give the same path records; " +
      "the bound only decides whether a survivor is iterated again, and survivors whose glide beats the block's are iterated anyway",
  },
  {
    name: "kernel: a survivor's records not noted after it is iterated again in single steps",
    file: "assembly/verify.ts",
    find: "          if (again == DONE_DESCENT) noteRecords(nextL, nextH, glideT + glideOdd);",
    replace: "          if (again == DONE_DESCENT) {}",
    tests: VERIFY,
  },
  {
    name: "check: the step table's hash not compared",
    file: "src/jobs/verify/check.ts",
    find: 'expectSame(c.tables, hashes, "tables", "the rebuilt tables");',
    replace: 'expectSame(c.tables?.sieve, hashes.sieve, "tables.sieve", "the rebuilt tables");',
    tests: VERIFY,
  },
  {
    name: "check: path-record values not compared with BigInt iteration",
    file: "src/jobs/verify/check.ts",
    find: 'if (t.outcome === "unresolved" || peak !== p.peakT)',
    replace: 'if (t.outcome === "unresolved")',
    tests: VERIFY,
  },
  {
    name: "check: block entry digests not compared",
    file: "src/jobs/verify/check.ts",
    find: "if (d !== c.entryDigests[i])",
    replace: "if (d === c.entryDigests[i] && false)",
    tests: VERIFY,
  },
  {
    name: "check: the sieved counts not compared with the sieve restricted to the range",
    file: "src/jobs/verify/check.ts",
    find: "          merged.counts.sievedByDepth,\n          sieved,\n",
    replace: "          merged.counts.sievedByDepth,\n          merged.counts.sievedByDepth,\n",
    tests: VERIFY,
  },
  {
    name: "check: sampled blocks not compared with their entries",
    file: "src/jobs/verify/check.ts",
    find: "for (const e of rerun) expectSame(",
    replace: "for (const e of rerun.slice(rerun.length)) expectSame(",
    tests: VERIFY,
  },
  {
    name: "merge: a record kept on a tie in the sweep",
    file: "src/jobs/verify/block.ts",
    find: "    if (v > best) {",
    replace: "    if (v >= best) {",
    tests: VERIFY,
  },
  {
    name: "block: an exception of the sieve counted as checked",
    file: "src/jobs/verify/block.ts",
    find: "else if (t.cutDepth !== null) f.exceptions++;",
    replace: "else if (t.cutDepth !== null) f.checked++;",
    tests: VERIFY,
  },
  {
    name: "trace: a return to n taken for a descent",
    file: "src/jobs/verify/trace.ts",
    find: 'if (v < n) return { outcome: "descent", steps, odd, path, cutDepth };',
    replace: 'if (v <= n) return { outcome: "descent", steps, odd, path, cutDepth };',
    tests: VERIFY,
  },
  {
    name: "parts: a part's digest not compared",
    file: "src/node/cluster.ts",
    find: 'if (typeof m.digest !== "string" || partDigest(withoutDigest(exact)) !== m.digest)',
    replace: 'if (typeof m.digest !== "string")',
    tests: ["test/cluster/cluster.test.ts"],
  },
  {
    name: "exact counter: a class kept alive one step too long",
    file: "src/core/exact.ts",
    find: "if (keep !== 0n && jj === drop[lo + i]) {",
    replace: "if (keep !== 0n && jj === drop[lo + i]! + 1) {",
    tests: ["test/exact.test.ts", "test/sieve.test.ts"],
  },
];

const root = new URL("../../", import.meta.url).pathname;
const args = process.argv.slice(2);
const all = args.includes("--all");
const only = args.filter((a) => a !== "--all");
const chosen = MUTANTS.filter((m) => (all || !m.masked) && (only.length === 0 || only.some((o) => m.name.includes(o))));
for (const m of MUTANTS) if (m.masked && !all) process.stdout.write(`masked    ${m.name}\n          (not run: ${m.masked})\n`);
for (const m of chosen)
  if (readFileSync(join(root, m.file), "utf8").split(m.find).length !== 2)
    throw new Error(`mutant "${m.name}": its text is not found exactly once in ${m.file}`);
const work = mkdtempSync(join(tmpdir(), "glidepath-mutate-"));
const copy = join(work, "tree");
const skip = new Set(["node_modules", ".git", "dist", "build", "lib"]);
cpSync(root, copy, { recursive: true, filter: (src) => !skip.has(src.slice(root.length).split("/")[0]!) });
symlinkSync(join(root, "node_modules"), join(copy, "node_modules"));
const run = (cmd: string, args: string[]) => spawnSync(cmd, args, { cwd: copy, encoding: "utf8", env: { ...process.env, CI: "" } });
execFileSync("npm", ["run", "build:wasm"], { cwd: copy, stdio: "ignore" });
execFileSync("npm", ["run", "build:lib"], { cwd: copy, stdio: "ignore" });

const results: { name: string; killed: boolean; by: string }[] = [];
try {
  for (const m of chosen) {
    const path = join(copy, m.file);
    const original = readFileSync(path, "utf8");
    if (original.split(m.find).length !== 2) throw new Error(`mutant "${m.name}": its text is not found exactly once in ${m.file}`);
    writeFileSync(path, original.replace(m.find, m.replace));
    try {
      const build = m.file.startsWith("assembly/") ? run("npm", ["run", "build:wasm"]) : run("npm", ["run", "build:lib"]);
      if (build.status !== 0) {
        results.push({ name: m.name, killed: true, by: "the build" });
        continue;
      }
      const report = join(work, "report.json");
      const t = run("npx", ["vitest", "run", ...m.tests, "--reporter=json", `--outputFile=${report}`, "--bail=1"]);
      let by = "";
      if (existsSync(report)) {
        const j = JSON.parse(readFileSync(report, "utf8")) as {
          testResults: { name: string; assertionResults: { status: string; fullName: string }[] }[];
        };
        const failed = j.testResults.flatMap((f) =>
          f.assertionResults.filter((a) => a.status === "failed").map((a) => `${f.name.slice(copy.length + 1)}: ${a.fullName}`),
        );
        by = failed[0] ?? "";
        rmSync(report);
      }
      results.push({ name: m.name, killed: t.status !== 0, by: t.status !== 0 ? by || "a failing test file" : "" });
    } finally {
      writeFileSync(path, original);
      if (m.file.startsWith("assembly/")) run("npm", ["run", "build:wasm"]);
      else run("npm", ["run", "build:lib"]);
    }
    const r = results.at(-1)!;
    process.stdout.write(`${r.killed ? "killed  " : "SURVIVED"}  ${r.name}${r.killed ? `\n          by ${r.by}` : ""}\n`);
  }
} finally {
  rmSync(work, { recursive: true, force: true });
}
const scored = results.filter((r) => !MUTANTS.find((m) => m.name === r.name)?.masked);
const killed = scored.filter((r) => r.killed).length;
process.stdout.write(`\nmutation score: ${killed} of ${scored.length} planted bugs killed\n`);
process.exitCode = killed === scored.length ? 0 : 1;
