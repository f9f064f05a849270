// npm run mutate: plants one bug at a time in a copy of the tree (the kernels in assembly/, the
// library in src/), rebuilds what it touches, runs every test file that reaches the mutated file, and
// reports which test killed each planted bug (or that none did). The bugs are the classes that
// verification relies on: carries and overflow checks, cut depths, the descent and cycle tests, table
// steps, path bounds, record sweeps, certificate and part checks.
// Usage: npm run mutate [-- NAME ...] (a NAME selects the mutants whose name contains it; --list prints
// each one's test files and runs nothing), or node --import tsx test/mutate/mutate.ts [NAME ...].
// A planted bug that does not build is an error of the mutant (reported, exit code 2), not a kill.
// Which tests reach a file: the import graph of test/, src/ and assembly/ (relative imports and
// relative URLs; lib/X.js stands for src/X.ts, bin/glidepath.js for src/cli/main.ts), and a kernel
// file is reached by every file that names one of its exported functions (kernel.call("verifyClasses")),
// but not through the jobs' registry (which names every job for the workers): a job's worker handlers
// (src/jobs/<job>/kernel.ts) are reached from the job's other files.
// The browser tests (test/browser/) are left out: they need a browser and guard no kernel or check.
import { execFileSync, spawnSync } from "node:child_process";
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, relative, resolve } from "node:path";

interface Mutant {
  readonly name: string;
  readonly file: string;
  readonly find: string;
  readonly replace: string;
  /** Test files run before the others that reach the file (the ones expected to kill it), so that --bail stops early. */
  readonly first?: readonly string[];
}

const MUTANTS: Mutant[] = [
  {
    name: "classes: a settled class counted one member short",
    file: "assembly/verify/classes.ts",
    find: "store<u64>(p, load<u64>(p) + (X - x));",
    replace: "store<u64>(p, load<u64>(p) + (X - x - 1));",
    first: ["test/classes.test.ts"],
  },
  {
    name: "classes: a leaf skipped behind a smaller number below FROM",
    file: "assembly/verify/preimage.ts",
    find: "if (fromN > 1) return preimageBelow(n) >= fromN;",
    replace: "if (fromN > 1) return preimageBelow(n) != 0;",
    first: ["test/classes.test.ts"],
  },
  {
    name: "classes: a leaf's path never iterated again exactly when its bound could beat the band's",
    file: "assembly/verify/classes.ts",
    find: "    if (exceededPath) {\n      const again = exact(n, 0);",
    replace: "    if (false) {\n      const again = exact(n, 0);",
    first: ["test/classes.test.ts"],
  },
  {
    name: "u128: a dropped carry from the low word in the multiply-add",
    file: "assembly/u128.ts",
    find: "  if (l2 < l) {\n    hh++;",
    replace: "  if (l2 < l) {\n    hh += 0;",
    first: ["test/u128.test.ts"],
  },
  {
    name: "u128: a missed overflow of the high word in the multiply-add",
    file: "assembly/u128.ts",
    find: "carry = mulhi(hi, y) != 0 || hh < h;",
    replace: "carry = hh < h;",
    first: ["test/u128.test.ts"],
  },
  {
    name: "kernel: a return to n taken for a descent in the fast path",
    file: "assembly/verify/walk.ts",
    find: "      bh = vh;\n    }\n    if (ltU(vl, vh, nl, nh)) break;",
    replace: "      bh = vh;\n    }\n    if (leU(vl, vh, nl, nh)) break;",
    first: ["test/verify.test.ts"],
  },
  {
    name: "kernel: a table step that may pass over the first value below n",
    file: "assembly/verify/walk.ts",
    find: "let d = bits - nBits - 1;",
    replace: "let d = bits - nBits + 1;",
    first: ["test/verify.test.ts"],
  },
  {
    name: "kernel: a class's cut depth off by one",
    file: "assembly/verify/walk.ts",
    find: "if (cutDepth == 0 && steps <= K && steps >= dropDepth(odd)) cutDepth = steps;",
    replace: "if (cutDepth == 0 && steps <= K && steps > dropDepth(odd)) cutDepth = steps;",
    first: ["test/verify.test.ts"],
  },
  {
    name: "kernel: the peak bound without its slack",
    file: "assembly/verify/state.ts",
    find: "const l = rlo + slack;",
    replace: "const l = rlo;",
    first: ["test/classes.test.ts"],
  },
  {
    name: "kernel: a survivor's records not noted after it is iterated again in single steps",
    file: "assembly/verify/periods.ts",
    find: "      if (again == DONE_DESCENT) noteRecords(nl, nh, glideT + glideOdd);",
    replace: "      if (again == DONE_DESCENT) {}",
    first: ["test/verify.test.ts"],
  },
  {
    name: "classes: the leaf's path-bound shortcut with margin -2 instead of +2",
    file: "assembly/verify/classes.ts",
    find: "if (nBits + dropDepth(mp) - ip + 2 >= bestPathBits || 64 - <i32>clz(slack) > nBits) {",
    replace: "if (nBits + dropDepth(mp) - ip - 2 >= bestPathBits || 64 - <i32>clz(slack) > nBits) {",
    first: ["test/classes.test.ts"],
  },
  {
    name: "classes: a band skipped when its bound's bit length only equals the lower bound's",
    file: "assembly/verify/classes.ts",
    find: "if (bits + extra < bitlen(lbl, lbh) && 64 - <i32>clz(slack) <= bits) continue;",
    replace: "if (bits + extra <= bitlen(lbl, lbh) && 64 - <i32>clz(slack) <= bits) continue;",
    first: ["test/classes.test.ts"],
  },
  {
    name: "kernel: peakBound not flagging q^m v past 128 bits",
    file: "assembly/verify/state.ts",
    find: "carry = over || rhi == 0xffffffffffffffff || slack == 0xffffffffffffffff;",
    replace: "carry = rhi == 0xffffffffffffffff || slack == 0xffffffffffffffff;",
    first: ["test/verify.test.ts"],
  },
  {
    name: "kernel: the carry into the high word of the next survivor or period end dropped",
    file: "assembly/verify/periods.ts",
    find: "const nextL = baseL + off, nextH = baseH + select<u64>(1, 0, baseL + off < baseL);",
    replace: "const nextL = baseL + off, nextH = baseH;",
    first: ["test/verify.test.ts"],
  },

  {
    name: "check: the step table's hash not compared",
    file: "src/jobs/verify/check.ts",
    find: 'expectSame(c.tables, hashes, "tables", "the rebuilt tables");',
    replace: 'expectSame(c.tables?.sieve, hashes.sieve, "tables.sieve", "the rebuilt tables");',
  },
  {
    name: "check: path-record values not compared with BigInt iteration",
    file: "src/jobs/verify/check.ts",
    find: 'if (t.outcome === "unresolved" || peak !== p.peakT)',
    replace: 'if (t.outcome === "unresolved")',
  },
  {
    name: "check: block entry digests not compared",
    file: "src/jobs/verify/check.ts",
    find: "if (d !== c.entryDigests[i])",
    replace: "if (d === c.entryDigests[i] && false)",
  },
  {
    name: "check: the sieved counts not compared with the sieve restricted to the range",
    file: "src/jobs/verify/check.ts",
    find: "expectSame(counts.sievedByDepth, sieved, ",
    replace: "expectSame(counts.sievedByDepth, counts.sievedByDepth, ",
  },
  {
    name: "check: sampled blocks not compared with their entries",
    file: "src/jobs/verify/check.ts",
    find: "for (const e of rerun) expectSame(",
    replace: "for (const e of rerun.slice(rerun.length)) expectSame(",
  },
  {
    name: "merge: a record kept on a tie in the sweep",
    file: "src/jobs/verify/block.ts",
    find: "    if (v > best) {",
    replace: "    if (v >= best) {",
  },
  {
    name: "block: an exception of the sieve counted as checked",
    file: "src/jobs/verify/block.ts",
    find: "else if (t.cutDepth !== null) f.exceptions++;",
    replace: "else if (t.cutDepth !== null) f.checked++;",
  },
  {
    name: "trace: a return to n taken for a descent",
    file: "src/jobs/verify/trace.ts",
    find: 'if (v < n) return { outcome: "descent", steps, odd, path, cutDepth };',
    replace: 'if (v <= n) return { outcome: "descent", steps, odd, path, cutDepth };',
  },
  {
    name: "parts: a part's digest not compared",
    file: "src/node/cluster/parts.ts",
    find: 'if (typeof m.digest !== "string" || partDigest(withoutDigest(exact)) !== m.digest)',
    replace: 'if (typeof m.digest !== "string")',
  },
  {
    name: "exact counter: a class kept alive one step too long",
    file: "src/core/exact.ts",
    find: "if (keep !== 0n && jj === drop[lo + i]) {",
    replace: "if (keep !== 0n && jj === drop[lo + i]! + 1) {",
  },
  {
    name: "check: glide records' standard steps not re-derived",
    file: "src/jobs/verify/check.ts",
    find: "t.steps !== g.steps || t.steps + t.odd !== g.standardSteps)",
    replace: "t.steps !== g.steps)",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: cycle members' periods not re-derived",
    file: "src/jobs/verify/check.ts",
    find: "if (c?.min !== m.n || c.period !== m.period)",
    replace: "if (c?.min !== m.n)",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: the random sample never includes the last block",
    file: "src/jobs/verify/check.ts",
    find: "pick.add(o.randomBelow(n));",
    replace: "pick.add(o.randomBelow(n - 1));",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: a listed n equal to TO accepted in the last block",
    file: "src/jobs/verify/check.ts",
    find: "return (n) => n >= b.first && n <= b.last;",
    replace: "return (n) => n >= b.first && n <= b.last + 1n;",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: skipped leaves left out of the bound on leaves",
    file: "src/jobs/verify/check.ts",
    find: "if (c.checked + c.preimage > leaves ||",
    replace: "if (c.checked > leaves ||",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: skipped leaves accepted under a plan without the skip",
    file: "src/jobs/verify/check.ts",
    find: "if (!plan.preimage && !plan.skipReached && e.counts.preimage !== 0n)",
    replace: "if (false)",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "skip of slices: a wrong residue in the table mod q^2",
    file: "assembly/verify/preimage.ts",
    find: "return load<u8>(skipTable + <usize>t) != 0;",
    replace: "return load<u8>(skipTable + <usize>(t + 1 == <i32>skipPeriod ? 0 : t + 1)) != 0;",
    first: ["test/skip.test.ts"],
  },
  {
    name: "skip of slices: n's high word dropped from its residue mod q^2",
    file: "assembly/verify/preimage.ts",
    find: ": ((nh % skipPeriod) * skipWrap + (nl % skipPeriod)) % skipPeriod;",
    replace: ": nl % skipPeriod;",
    first: ["test/skip.test.ts"],
  },
  {
    name: "skip of slices: a period's residue plus a survivor's not reduced below q^2",
    file: "assembly/verify/preimage.ts",
    find: "  if (t >= <i32>skipPeriod) t -= <i32>skipPeriod;",
    replace: "",
    first: ["test/skip.test.ts"],
  },
  {
    name: "skip of slices: a skipped survivor still walked and booked (its records too)",
    file: "assembly/verify/periods.ts",
    find: "    if (!ltU(pl, ph, nl, nh)) return;\n    i = -1;",
    replace: "    if (false) return;",
    first: ["test/skip.test.ts"],
  },
  {
    name: "check: numbers said not to reach 1 not iterated",
    file: "src/jobs/verify/check.ts",
    find: 'if (fresh("unreached", n) && delayBig(map, n, maxSteps) !== null)',
    replace: "if (false)",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: an entry's list length not compared with its count",
    file: "src/jobs/verify/check.ts",
    find: "if (BigInt(xs.length) !== want)",
    replace: "if (false)",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: an aligned block's sieved counts not re-derived",
    file: "src/jobs/verify/check.ts",
    find: 'if (b.kind === "aligned" && data) {',
    replace: 'if (b.kind === "aligned" && data && b.periods < 0n) {',
    first: ["test/certificate.test.ts"],
  },
  {
    name: "check: the r < 0 sign fix dropped in the residue walk",
    file: "src/jobs/verify/check.ts",
    find: "v = ((((map.q * v + map.r) % mod) + mod) % mod) / 2;",
    replace: "v = ((map.q * v + map.r) % mod) / 2;",
    first: ["test/certificate.test.ts"],
  },
  {
    name: "cluster: batch-status calls a run complete with an extra part file",
    file: "src/cli/cluster.ts",
    find: "const complete = rerun.length === 0 && inspected.problems.length === 0;",
    replace: "const complete = rerun.length === 0;",
    first: ["test/cluster/cluster.test.ts"],
  },
  {
    name: "cluster: a part's shard number not compared with its file name",
    file: "src/node/cluster/parts.ts",
    find: "if (m.shard !== i)",
    replace: "if (m.shard === undefined)",
    first: ["test/cluster/cluster.test.ts"],
  },
  {
    name: "resume: a checkpoint block's end not compared with the plan's",
    file: "src/cli/verify.ts",
    find: "b.last !== e.last || ",
    replace: "",
    first: ["test/cluster/cluster.test.ts"],
  },
  {
    name: "files: a live process's temporary removed",
    file: "src/node/files.ts",
    find: "|| alive(Number(m[2]))) continue;",
    replace: ") continue;",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "files: another file's temporary removed",
    file: "src/node/files.ts",
    find: "if (!m || m[1] !== basename(path) ||",
    replace: "if (!m ||",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "files: a write error without the file's name",
    file: "src/node/files.ts",
    // biome-ignore lint/suspicious/noTemplateCurlyInString: the text to find is source code with a template literal
    find: "return new Error(`cannot write ${path}: ${e instanceof Error ? e.message : String(e)}`, { cause: e });",
    replace: "return e instanceof Error ? e : new Error(String(e));",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "files: a device renamed over",
    file: "src/node/files.ts",
    find: "if (stat && !stat.isFile() && !stat.isDirectory()) {",
    replace: "if (stat?.isFIFO()) {",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "cycle-bound: the run of fractions skips a convergent",
    file: "src/core/cyclebound.ts",
    find: "let hi = a + 1n; // a + 1: none",
    replace: "let hi = a; // a + 1: none",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: the first intermediate fraction skipped",
    file: "src/core/cyclebound.ts",
    find: "        let lo = 1n;\n",
    replace: "        let lo = 2n;\n",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: the sign case of r < 0 dropped",
    file: "src/core/cyclebound.ts",
    find: "if ((k % 2 === 1) === above) {",
    replace: "if (k % 2 === 1) {",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: no l >= m for r < 0",
    file: "src/core/cyclebound.ts",
    find: "this.lowerIsOne = map.r < 0 && top <= 2n * X;",
    replace: "this.lowerIsOne = map.r < 0 && top <= 0n;",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: the window's closed end excluded",
    file: "src/core/cyclebound.ts",
    find: "above ? this.betaDecide(f).sign >= 0 :",
    replace: "above ? this.betaDecide(f).sign > 0 :",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: uncertain continued-fraction terms kept",
    file: "src/core/cyclebound.ts",
    find: "if (b.num > (f + 1n) * b.den) break;",
    replace: "if (b.num > (f + 2n) * b.den) break;",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: the bracket's upper end rounded down",
    file: "src/core/cyclebound.ts",
    find: "zh = (sh + 1n) >> 1n;",
    replace: "zh = (sh + 1n) >> 2n;",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "cycle-bound: a certificate not from 1 accepted",
    file: "src/jobs/cyclebound.ts",
    find: "if (from !== 1n)",
    replace: "if (from === 0n)",
    first: ["test/cyclebound.test.ts"],
  },
  {
    name: "resume: the checkpoint's blocks counted as run by this process",
    file: "src/jobs/verify/verify.ts",
    find: "const given = new Set(options.done?.keys());",
    replace: "const given = new Set<number>();",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "resume: the rate over the whole range, not this process's numbers",
    file: "src/cli/verify.ts",
    find: "Number(r.numbersRun) / Math.max",
    replace: "Number(r.counts.numbers) / Math.max",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "files: stale temporaries of a killed run not removed",
    file: "src/cli/verify.ts",
    find: "removeStaleTemporaries(path)) process",
    replace: "([] as string[])) process",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "verify: no report when the certificate cannot be written",
    file: "src/cli/verify.ts",
    find: "  print(\n    o.json\n      ? `${jsonText({ ...verifyJson(result, known)",
    replace: "  if (!unwritten) print(\n    o.json\n      ? `${jsonText({ ...verifyJson(result, known)",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "verify: only the second pass timed after the preimage fallback",
    file: "src/jobs/verify/verify.ts",
    find: "return { ...r, seconds, blocksRun",
    replace: "return { ...r, blocksRun",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "verify: a second pass not reported",
    file: "src/jobs/verify/verify.ts",
    find: "const passes: 1 | 2 = firstPassSeconds === null ? 1 : 2;",
    replace: "const passes: 1 | 2 = 1;",
    first: ["test/verify-run.test.ts"],
  },
  {
    name: "layout: a host copy of a kernel limit drifts from assembly/layout.ts",
    file: "src/jobs/verify/plan.ts",
    find: "export const MAX_CLASS_DEPTH = 62;",
    replace: "export const MAX_CLASS_DEPTH = 61;",
    first: ["test/layout.test.ts"],
  },
  {
    name: "published: a glide record left out of A060412",
    file: "src/core/published.ts",
    find: "27, 703, 10087, 35655,",
    replace: "27, 703, 10087,",
    first: ["test/records.test.ts"],
  },
  {
    name: "orbit: the standard orbit's odd step through twice the value before it, not after",
    file: "src/core/orbit.ts",
    find: "standard.push(2n * values[j + 1]!);",
    replace: "standard.push(2n * values[j]!);",
    first: ["test/records.test.ts"],
  },
  {
    name: "orbit: a path that never rises above n doubled in standard steps",
    file: "src/core/orbit.ts",
    find: "return peakT > n ? 2n * peakT : n;",
    replace: "return peakT >= n ? 2n * peakT : n;",
    first: ["test/records.test.ts"],
  },
  {
    name: "run pairs: the descent's halving count one too many",
    file: "assembly/verify/walk.ts",
    find: "return at > n ? t + 1 : t;",
    replace: "return at > n ? t + 2 : t + 1;",
    first: ["test/runs.test.ts"],
  },
  {
    name: "run pairs: a threshold table entry one too high (a run that reaches the best path stays in the lane)",
    file: "assembly/verify/walk.ts",
    find: "const t = runU / unchecked(runPow[alpha]);",
    replace: "const t = runU / unchecked(runPow[alpha]) + 1;",
    first: ["test/runs.test.ts"],
  },
  {
    name: "run pairs: an odd run of 41 steps at once (3^41 wraps past 2^64)",
    file: "assembly/verify/walk.ts",
    find: "const RUN_MAX: i32 = 40;",
    replace: "const RUN_MAX: i32 = 41;",
    first: ["test/runs.test.ts"],
  },
  {
    name: "run pairs: the step cap checked too late (a run pair may pass it)",
    file: "assembly/verify/walk.ts",
    find: "return maxSteps - RUN_MAX - 64;",
    replace: "return maxSteps;",
    first: ["test/runs.test.ts"],
  },
  {
    name: "run pairs: U one above the best path less one",
    file: "assembly/verify/walk.ts",
    find: "const u = bestPathLo + runR - 1;",
    replace: "const u = bestPathLo + runR;",
    first: ["test/runs.test.ts"],
  },
  {
    name: "deeper sieve: a cut class's descent taken without testing the value there against n",
    file: "assembly/verify/deeper.ts",
    find: "  if (!on && !ltU(wl, wh, nl, nh)) return -1;",
    replace: "  if (false) return -1;",
    first: ["test/deeper.test.ts"],
  },
  {
    name: "deeper sieve: the continuation one step early",
    file: "assembly/verify/deeper.ts",
    find: "    deeperSteps = tableK + s;",
    replace: "    deeperSteps = tableK + s - 1;",
    first: ["test/deeper.test.ts"],
  },
  {
    name: "deeper sieve: the values after step K left out of the path bound",
    file: "assembly/verify/deeper.ts",
    find: "  if (ltU(pl, ph, bl, bh)) {\n    pl = bl;\n    ph = bh;\n  }",
    replace: "  pl = bl;\n  ph = bh;",
    first: ["test/deeper.test.ts"],
  },
  {
    name: "deeper sieve: the table's additive term with r one place too far left",
    file: "assembly/verify/deeper.ts",
    find: "d = 3 * d + (r << <u64>(s - 1));",
    replace: "d = 3 * d + (r << <u64>s);",
    first: ["test/deeper.test.ts"],
  },
  {
    name: "deeper sieve: the continuation one odd step short",
    file: "assembly/verify/deeper.ts",
    find: "    deeperOdd = m + mm;",
    replace: "    deeperOdd = m + mm - 1;",
    first: ["test/deeper.test.ts"],
  },
  {
    name: "deeper sieve: a cut class's glide one step short",
    file: "assembly/verify/deeper.ts",
    find: "  glideT = tableK + s;",
    replace: "  glideT = tableK + s - 1;",
    first: ["test/deeper.test.ts"],
  },
  {
    name: "partial periods: an exception counted as sieved too",
    file: "assembly/verify/periods.ts",
    find: "    if (e < excN && nh == 0 && load<u64>(exc + (<usize>e << 3)) == nl) e++;\n    else if",
    replace: "    if (e < excN && nh == 0 && load<u64>(exc + (<usize>e << 3)) == nl) e++;\n    if",
    first: ["test/verify.test.ts"],
  },
  {
    name: "partial periods: the first survivor searched one residue too far",
    file: "assembly/verify/periods.ts",
    find: "if (load<u32>(survA + (<usize>mid << 2)) < r0) lo = mid + 1;",
    replace: "if (load<u32>(survA + (<usize>mid << 2)) <= r0) lo = mid + 1;",
    first: ["test/verify.test.ts"],
  },
  {
    name: "partial periods: a cycle member's period counted from step K (whole laps), not its first return",
    file: "assembly/verify/periods.ts",
    find: "settle(nl, nh, exact(nl, nh), -1);\n  } else {",
    replace: "settle(nl, nh, done, -1);\n  } else {",
    first: ["test/verify.test.ts", "test/certificate.test.ts"],
  },
  {
    name: "global records: a tie with the known glide taken as a new record",
    file: "src/jobs/verify/known.ts",
    find: "g.standardSteps > known.glide.standardSteps",
    replace: "g.standardSteps >= known.glide.standardSteps",
    first: ["test/global.test.ts"],
  },
  {
    name: "global records: --check leaves the certificate's known values unchecked against the named n",
    file: "src/jobs/verify/check.ts",
    find: 'const wrong = knownMismatch(plan.map, known, "known");',
    replace: "const wrong = null as string | null;",
    first: ["test/certificate.test.ts", "test/global.test.ts"],
  },
];

const root = resolve(new URL("../../", import.meta.url).pathname);

/** The repository files a file refers to: relative imports and URLs, lib/ and bin/ mapped to src/, kernel exports named. */
function graph(): { edges: Map<string, Set<string>>; tests: string[] } {
  const files: string[] = [];
  const walk = (dir: string) => {
    for (const e of readdirSync(join(root, dir), { withFileTypes: true })) {
      const rel = join(dir, e.name);
      if (e.isDirectory()) walk(rel);
      else if (/\.(ts|js|mjs)$/.test(e.name)) files.push(rel);
    }
  };
  for (const d of ["src", "test", "assembly"]) walk(d);
  const known = new Set(files);
  const toSource = (p: string): string | null => {
    if (p === "bin/glidepath.js") return "src/cli/main.ts";
    if (p.startsWith("lib/")) p = `src/${p.slice(4)}`;
    for (const c of [p, p.replace(/\.js$/, ".ts"), `${p}.ts`]) if (known.has(c)) return c;
    return null;
  };
  // exported functions of each kernel file: a file naming one in a string reaches it
  const exportsOf = new Map<string, string>();
  for (const f of files)
    if (f.startsWith("assembly/"))
      for (const m of readFileSync(join(root, f), "utf8").matchAll(/^export function (\w+)/gm)) exportsOf.set(m[1]!, f);
  const edges = new Map<string, Set<string>>();
  for (const f of files) {
    // type-only imports run nothing; the jobs' registry names every job for the workers, so a test
    // reaches a job's kernel adapter through the job it runs, not through the registry
    const text = f === "src/jobs/registry.ts" ? "" : readFileSync(join(root, f), "utf8").replace(/\b(import|export)\s+type\s[^;]*;/g, "");
    const out = new Set<string>();
    for (const m of text.matchAll(/["'`](\.{1,2}\/[^"'`$]+)["'`]/g)) {
      const t = toSource(relative(root, resolve(root, dirname(f), m[1]!)));
      if (t) out.add(t);
    }
    for (const m of text.matchAll(/["'`](\w+)["'`]/g)) {
      const k = exportsOf.get(m[1]!);
      if (k && k !== f) out.add(k);
    }
    edges.set(f, out);
  }
  const tests = files.filter((f) => f.endsWith(".test.ts") && !f.startsWith("test/browser/")).sort();
  return { edges, tests };
}

/** The test files whose closure in the graph holds `file`. */
function testsReaching(g: ReturnType<typeof graph>, file: string): string[] {
  return g.tests.filter((t) => {
    const seen = new Set([t]);
    const todo = [t];
    while (todo.length > 0) {
      const f = todo.pop()!;
      if (f === file) return true;
      // a job's worker handlers (src/jobs/<job>/kernel.ts) run for whoever reaches the job
      const job = /^src\/jobs\/[^/]+\//.exec(f)?.[0];
      const next = [...(g.edges.get(f) ?? [])];
      if (job && g.edges.has(`${job}kernel.ts`)) next.push(`${job}kernel.ts`);
      for (const n of next)
        if (!seen.has(n)) {
          seen.add(n);
          todo.push(n);
        }
    }
    return false;
  });
}

const listOnly = process.argv.includes("--list");
const only = process.argv.slice(2).filter((a) => a !== "--list");
const chosen = MUTANTS.filter((m) => only.length === 0 || only.some((o) => m.name.includes(o)));
if (chosen.length === 0) throw new Error(`no mutant's name contains ${only.map((o) => JSON.stringify(o)).join(" or ")}`);
for (const m of chosen)
  if (readFileSync(join(root, m.file), "utf8").split(m.find).length !== 2)
    throw new Error(`mutant "${m.name}": its text is not found exactly once in ${m.file}`);
const g = graph();
if (listOnly) {
  for (const m of chosen) process.stdout.write(`${m.name}\n          ${testsReaching(g, m.file).join(", ")}\n`);
  process.exit(0);
}
const work = mkdtempSync(join(tmpdir(), "glidepath-mutate-"));
const copy = join(work, "tree");
const skip = new Set(["node_modules", ".git", "dist", "build", "lib"]);
cpSync(root, copy, { recursive: true, filter: (src) => !skip.has(relative(root, src).split("/")[0]!) });
symlinkSync(join(root, "node_modules"), join(copy, "node_modules"));
const run = (cmd: string, args: string[]) =>
  spawnSync(cmd, args, { cwd: copy, encoding: "utf8", env: { ...process.env, CI: "", NO_COLOR: "1", FORCE_COLOR: "0" } });
execFileSync("npm", ["run", "build:wasm"], { cwd: copy, stdio: "ignore" });
execFileSync("npm", ["run", "build:lib"], { cwd: copy, stdio: "ignore" });
// vitest runs the files in the order given here (a mutant's `first`, then the smaller test files, the command line's and
// the cluster's last), so that with --bail a killed mutant stops early
writeFileSync(
  join(copy, "vitest.mutate.config.ts"),
  `import { relative } from "node:path";
import { mergeConfig } from "vitest/config";
import base from "./vitest.config.ts";
const order: string[] = JSON.parse(process.env.MUTATE_ORDER ?? "[]");
class InOrder {
  constructor(readonly ctx: { config: { root: string } }) {}
  shard<T>(files: T[]): T[] { return files; }
  sort<T extends { moduleId: string }>(files: T[]): T[] {
    const at = (f: T) => order.indexOf(relative(this.ctx.config.root, f.moduleId));
    return [...files].sort((a, b) => at(a) - at(b));
  }
}
export default mergeConfig(base, { test: { sequence: { sequencer: InOrder } } });
`,
);
const weight = (t: string) =>
  (t.startsWith("test/cluster/") ? 2e9 : t === "test/cli.test.ts" ? 1e9 : 0) + readFileSync(join(root, t)).length;
const runTests = (tests: string[], first: readonly string[], report: string) =>
  spawnSync(
    "npx",
    ["vitest", "run", "--config", "vitest.mutate.config.ts", ...tests, "--reporter=json", `--outputFile=${report}`, "--bail=1"],
    {
      cwd: copy,
      encoding: "utf8",
      env: {
        ...process.env,
        CI: "",
        MUTATE_ORDER: JSON.stringify(
          [...tests].sort((a, b) => (first.includes(b) ? 1 : 0) - (first.includes(a) ? 1 : 0) || weight(a) - weight(b)),
        ),
      },
    },
  );
const rebuild = (file: string) => (file.startsWith("assembly/") ? run("npm", ["run", "build:wasm"]) : run("npm", ["run", "build:lib"]));

type Outcome = "killed" | "survived" | "error";
const results: { name: string; outcome: Outcome; by: string }[] = [];
try {
  for (const m of chosen) {
    const tests = [...new Set([...(m.first ?? []), ...testsReaching(g, m.file)])];
    const path = join(copy, m.file);
    const original = readFileSync(path, "utf8");
    writeFileSync(path, original.replace(m.find, m.replace));
    const started = Date.now();
    let restored = false;
    try {
      const build = rebuild(m.file);
      if (build.status !== 0) {
        const why = `${build.stdout}${build.stderr}`.split("\n").find((l) => /error/i.test(l)) ?? `exit code ${build.status}`;
        results.push({ name: m.name, outcome: "error", by: `the planted bug does not build: ${why.trim()}` });
      } else if (tests.length === 0) results.push({ name: m.name, outcome: "error", by: `no test file reaches ${m.file}` });
      else {
        const report = join(work, "report.json");
        const t = runTests(tests, m.first ?? [], report);
        let by = "";
        if (existsSync(report)) {
          const j = JSON.parse(readFileSync(report, "utf8")) as {
            testResults: { name: string; status: string; message?: string; assertionResults: { status: string; fullName: string }[] }[];
          };
          const failed = j.testResults.flatMap((f) => {
            const at = relative(copy, f.name);
            const tests = f.assertionResults.filter((a) => a.status === "failed").map((a) => `${at}: ${a.fullName}`);
            return tests.length > 0 || f.status !== "failed" ? tests : [`${at} (the file failed: ${(f.message ?? "").split("\n")[0]})`];
          });
          by = failed[0] ?? "";
          rmSync(report);
        }
        results.push(
          t.status === 0
            ? { name: m.name, outcome: "survived", by: tests.join(", ") }
            : { name: m.name, outcome: "killed", by: by || `vitest exit code ${t.status}` },
        );
      }
    } finally {
      writeFileSync(path, original);
      restored = rebuild(m.file).status === 0;
    }
    if (!restored) throw new Error(`the copy does not build again after "${m.name}"`);
    const r = results.at(-1)!;
    const label = { killed: "killed  ", survived: "SURVIVED", error: "ERROR   " }[r.outcome];
    const seconds = Math.round((Date.now() - started) / 1000);
    const detail = { killed: `by ${r.by}`, survived: `ran ${r.by}`, error: r.by }[r.outcome];
    process.stdout.write(`${label}  ${m.name} (${tests.length} test files, ${seconds} s)\n          ${detail}\n`);
  }
} finally {
  rmSync(work, { recursive: true, force: true });
}
const killed = results.filter((r) => r.outcome === "killed").length;
const errors = results.filter((r) => r.outcome === "error").length;
process.stdout.write(
  `\nmutation score: ${killed} of ${results.length - errors} planted bugs killed${errors > 0 ? `; ${errors} mutant(s) in error (not scored)` : ""}\n`,
);
process.exitCode = errors > 0 ? 2 : killed === results.length ? 0 : 1;
