// verify as a long run meets the world: an interruption and --resume, a process killed outright, a
// full disk at the end, and the time a run reports (this process's, both passes of a fallback).
import { execFile, spawn } from "node:child_process";
import { copyFileSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, describe, expect, it } from "vitest";
import { parseExactJson } from "../src/core/json.js";
import { parseMap } from "../src/core/map.js";
import { runVerify } from "../src/jobs/verify/verify.js";
import type { VerifyRunState } from "../src/jobs/verify/verify.js";
import { planVerify } from "../src/jobs/verify/plan.js";
import { readCheckpoint } from "../src/jobs/verify/certificate.js";
import { nodePool } from "../src/node/kernel.js";

const BIN = new URL("../bin/glidepath.js", import.meta.url).pathname;
const run = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), "glidepath-run-"));
const pool = await nodePool(2);
afterAll(() => {
  pool.terminate();
  rmSync(dir, { recursive: true, force: true });
});

async function cli(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run("node", [BIN, ...args], { maxBuffer: 64 << 20, timeout: 100_000, killSignal: "SIGKILL" });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

/** Starts a run with a checkpoint and stops it with `signal` once the checkpoint holds a block; resolves to its pid. */
async function interrupted(ck: string, signal: NodeJS.Signals, args: string[]): Promise<number> {
  const child = spawn("node", [BIN, ...args, "--checkpoint", ck], { stdio: "ignore" });
  const exited = new Promise<void>((res) => child.on("exit", () => res()));
  while (!existsSync(ck)) await new Promise((r) => setTimeout(r, 10));
  child.kill(signal);
  await exited;
  return child.pid!;
}

interface Checkpoint {
  blocks: bigint;
  done: { first: bigint; last: bigint }[];
}
const readCk = (path: string) => parseExactJson(readFileSync(path, "utf8")) as unknown as Checkpoint;
const partials = (sub: string) => readdirSync(sub).filter((f) => f.includes(".partial-"));

describe("verify: --resume reports this process's time and numbers, and the run's total apart", () => {
  it("after Ctrl-C, the rate divides the numbers this process ran (not the whole range) by its time", async () => {
    const sub = mkdtempSync(join(dir, "resume-"));
    const ck = join(sub, "run.ck.json");
    const range = ["verify", "--from", "2^40", "--to", "2^40+2^30", "--sieve-depth", "20"];
    await interrupted(ck, "SIGINT", range);
    const held = readCk(ck);
    copyFileSync(ck, join(sub, "copy.ck.json"));
    // computed here: the numbers of the blocks the checkpoint holds (first and last inclusive), and the rest
    const heldNumbers = held.done.reduce((s, e) => s + e.last - e.first + 1n, 0n);
    const ranNumbers = (1n << 30n) - heldNumbers;
    expect(held.done.length).toBeGreaterThan(0);
    expect(held.done.length).toBeLessThan(Number(held.blocks));

    const text = await cli("verify", "--resume", ck);
    expect(text.code).toBe(0);
    const m =
      /^([\d.]+) s for (\d+) of (\d+) blocks \(([\d,]+) of ([\d,]+) numbers; the checkpoint held the other (\d+)\), ([\d,]+) numbers\/s/m.exec(
        text.stdout,
      );
    expect(m, text.stdout).not.toBeNull();
    const [, secs, ran, all, ranN, allN, other, rate] = m!;
    const num = (s: string) => BigInt(s.replaceAll(",", ""));
    expect([Number(ran), Number(all), Number(other)]).toEqual([
      Number(held.blocks) - held.done.length,
      Number(held.blocks),
      held.done.length,
    ]);
    expect([num(ranN!), num(allN!)]).toEqual([ranNumbers, 1n << 30n]);
    // the rate is this process's numbers over its time (the seconds shown are rounded to 0.01 s); the
    // whole range over the same time would be at least 16/15 of it (one of the run's 16 blocks held)
    expect(Math.abs(Number(num(rate!)) * Number(secs) - Number(ranNumbers)) / Number(ranNumbers)).toBeLessThan(0.02);

    const json = await cli("verify", "--resume", join(sub, "copy.ck.json"), "--json");
    expect(json.code).toBe(0);
    const j = parseExactJson(json.stdout) as {
      seconds: number;
      blocksRun: bigint;
      numbersRun: bigint;
      blockCount: bigint;
      counts: { numbers: bigint };
    };
    expect([j.blocksRun, j.numbersRun]).toEqual([held.blocks - BigInt(held.done.length), ranNumbers]);
    expect([j.blockCount, j.counts.numbers]).toEqual([held.blocks, 1n << 30n]); // the run's total
  });
});

describe("verify: a process killed outright leaves a temporary that the next run removes", () => {
  it("SIGKILL, then --resume: the checkpoint's stale .partial-PID-N files go; a live process's and another file's stay", async () => {
    const sub = mkdtempSync(join(dir, "kill-"));
    const ck = join(sub, "run.ck.json");
    const pid = await interrupted(ck, "SIGKILL", ["verify", "--from", "2^40", "--to", "2^40+2^28", "--sieve-depth", "18"]);
    // what SIGKILL leaves when it lands during a checkpoint write (AtomicFile's name: .NAME.partial-PID-N),
    // made here with the killed process's own pid, in case the kill fell between writes
    const stale = `.run.ck.json.partial-${pid}-3`;
    if (!partials(sub).some((f) => f.startsWith(`.run.ck.json.partial-${pid}-`))) writeFileSync(join(sub, stale), "");
    const left = partials(sub);
    const live = `.run.ck.json.partial-${process.pid}-0`; // this test's own pid: a running process
    const other = `.other.ck.json.partial-${pid}-0`; // another file's temporary
    writeFileSync(join(sub, live), "");
    writeFileSync(join(sub, other), "");
    const r = await cli("verify", "--resume", ck);
    expect(r.code).toBe(0);
    for (const f of left) expect(r.stderr).toContain(`removed ${f}, left by a process that no longer runs`);
    expect(partials(sub).sort()).toEqual([other, live].sort());
  });
});

describe("verify: a certificate that cannot be written loses neither the report nor the checkpoint", () => {
  // /dev/full answers every write with ENOSPC (Linux): a real full-disk failure; reached through a
  // link in the test's folder, so that a build renaming over its target replaces the link, not the device
  it.skipIf(!existsSync("/dev/full"))(
    "--out on a full device: the error names the file, the report is printed, the checkpoint kept, exit 1",
    async () => {
      const sub = mkdtempSync(join(dir, "full-"));
      const cert = join(sub, "cert.json");
      const ck = join(sub, "run.ck.json");
      symlinkSync("/dev/full", cert);
      const args = ["verify", "--from", "1", "--to", "2^20", "--sieve-depth", "16", "--out", cert, "--checkpoint", ck];
      const text = await cli(...args);
      // the report: the glide records below 2^20 are OEIS A060412's first 12 terms, the 12th 1027431 (published entry)
      expect(text.stdout).toMatch(/glide records \(n whose glide beats every smaller n of the range; standard steps\): 12\n/);
      expect(text.stdout).toMatch(/^ +1027431 {2}\d+$/m);
      expect(text.stdout).not.toMatch(/wrote the certificate/);
      expect(text.code).toBe(1);
      expect(text.stderr.trim().split("\n")).toHaveLength(1);
      expect(text.stderr).toContain(`cannot write ${cert}: ENOSPC`);
      expect(text.stderr).toContain(`glidepath verify --resume ${ck} --out FILE`);
      const c = readCk(ck);
      expect(c.done.length).toBe(Number(c.blocks)); // complete
      const json = await cli(...args, "--json");
      expect(json.code).toBe(1);
      expect((parseExactJson(json.stdout) as { counts: { numbers: bigint } }).counts.numbers).toBe((1n << 20n) - 1n); // [1, 2^20)
      expect(partials(sub)).toEqual([]);
      // the certificate from the complete checkpoint, no block run again
      const good = join(sub, "good.cert.json");
      const again = await cli("verify", "--resume", ck, "--out", good);
      expect(again.code).toBe(0);
      expect(again.stdout).toMatch(/the checkpoint held all \d+ blocks/);
      expect((parseExactJson(readFileSync(good, "utf8")) as { counts: { numbers: bigint } }).counts.numbers).toBe((1n << 20n) - 1n);
    },
  );
});

describe("verify: a run that falls back from the preimage skip reports both passes", () => {
  it("3x+5 over [1, 2^16): passes 2, and seconds are the whole call's wall time, the first pass included", async () => {
    // computed here: under 3x+5, 3 never goes below 3 and enters the cycle of 19 (a cycle entrant), so the skip falls back
    const T = (n: bigint) => (n % 2n === 0n ? n / 2n : (3n * n + 5n) / 2n);
    const path = [3n];
    while (path.at(-1) !== 19n) path.push(T(path.at(-1)!));
    const cycle = [19n];
    for (let x = T(19n); x !== 19n; x = T(x)) cycle.push(x);
    expect([...path, ...cycle].every((v) => v >= 3n)).toBe(true);
    const delay = 20;
    let calls = 0;
    const t0 = performance.now();
    const r = await runVerify(
      pool,
      { map: parseMap("3x+5"), from: 1n, to: 1n << 16n },
      {
        // each block of either pass waits here: the first pass alone takes at least its blocks × delay
        onBlock: async () => {
          calls++;
          await new Promise((res) => setTimeout(res, delay));
        },
      },
    );
    const wall = (performance.now() - t0) / 1000;
    expect([r.passes, r.preimage]).toEqual([2, false]);
    expect(calls).toBeGreaterThan(r.entries.length); // both passes ran blocks
    const firstPassBlocks = calls - r.entries.length;
    expect(r.firstPassSeconds!).toBeGreaterThanOrEqual((firstPassBlocks * delay) / 1000 - 0.005);
    expect(r.seconds).toBeLessThanOrEqual(wall);
    // the second pass alone would be short of the wall time by at least the first pass's waits
    expect(r.seconds).toBeGreaterThan(wall - (firstPassBlocks * delay) / 2000);
    expect([r.blocksRun, r.numbersRun]).toEqual([r.entries.length, (1n << 16n) - 1n]);
  });

  it("the command line says so, in text and --json", async () => {
    const text = await cli("verify", "--map", "3x+5", "--from", "1", "--to", "2^16");
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(
      /^[\d.]+ s in two passes \(the first, [\d.]+ s with the preimage skip, met a cycle entrant or an unresolved number; the second iterated every leaf\), [\d,]+ numbers\/s/m,
    );
    const json = await cli("verify", "--map", "3x+5", "--from", "1", "--to", "2^16", "--json");
    const j = parseExactJson(json.stdout) as { seconds: number | bigint; passes: bigint; firstPassSeconds: number | bigint };
    expect(j.passes).toBe(2n);
    expect(Number(j.firstPassSeconds)).toBeGreaterThan(0);
    expect(Number(j.firstPassSeconds)).toBeLessThanOrEqual(Number(j.seconds));
    const one = parseExactJson((await cli("verify", "--from", "1", "--to", "2^16", "--json")).stdout) as {
      passes: bigint;
      firstPassSeconds: null;
    };
    expect([one.passes, one.firstPassSeconds]).toEqual([1n, null]); // 3x+1 from 1: every n descends, no fallback
  });
});

describe("verify: the preimage skip's fallback is decided in the run, block by block", () => {
  // computed in the test above: under 3x+5, 3 enters the cycle of 19, and 3 lies in the first block of classes
  const map = parseMap("3x+5");
  const to = 1n << 16n;

  it("the first block that breaks the skip ends the first pass; onBlock then reports the plan without the skip only", async () => {
    const seen: { preimage: boolean; entrySkipped: bigint; held: boolean; size: number }[] = [];
    const r = await runVerify(
      pool,
      { map, from: 1n, to },
      {
        onBlock: (e, run: VerifyRunState) => {
          seen.push({
            preimage: run.plan.preimage,
            entrySkipped: e.counts.preimage,
            held: run.done.get(e.index) === e,
            size: run.done.size,
          });
        },
      },
    );
    const blocks = planVerify({ map, from: 1n, to }).blocks.length;
    const first = seen.filter((x) => x.preimage);
    const second = seen.filter((x) => !x.preimage);
    // the first pass stopped at once: fewer of its blocks ran than the plan has (the merge's refusal ran them all)
    expect(first.length).toBeGreaterThan(0);
    expect(first.length).toBeLessThan(blocks);
    // every block reported is in the map reported with it; the second pass's blocks skip nothing
    expect(seen.every((x) => x.held)).toBe(true);
    expect(second.map((x) => x.entrySkipped)).toEqual(new Array(blocks).fill(0n));
    expect(second.at(-1)!.size).toBe(blocks);
    expect(seen.slice(first.length).every((x) => !x.preimage)).toBe(true); // no block of the first pass after the switch
    expect([r.passes, r.preimage, r.counts.preimage, r.blocksRun]).toEqual([2, false, 0n, blocks]);
  });

  it("the checkpoint holds the plan without the skip and its blocks only: --resume runs nothing again", async () => {
    const sub = mkdtempSync(join(dir, "fallback-"));
    const ck = join(sub, "ck.json");
    const args = ["verify", "--map", "3x+5", "--from", "1", "--to", "2^16", "--json"];
    const whole = await cli(...args, "--checkpoint", ck);
    expect(whole.code).toBe(0);
    const c = readCheckpoint(readFileSync(ck, "utf8"));
    const plain = planVerify({ map, from: 1n, to, preimage: false });
    expect([c.request.preimage, c.key, c.blocks, c.done.size]).toEqual([false, plain.key, plain.blocks.length, plain.blocks.length]);
    expect([...c.done.values()].every((e) => e.counts.preimage === 0n)).toBe(true);
    const again = await cli("verify", "--resume", ck, "--json");
    expect(again.code).toBe(0);
    const j = parseExactJson(again.stdout) as { blocksRun: bigint; passes: bigint; preimage: boolean };
    expect([j.blocksRun, j.passes, j.preimage]).toEqual([0n, 1n, false]);
    // the same findings as the run that fell back and as --no-preimage
    const strip = (t: string) => t.replace(/,"seconds":[^\n]*/, "");
    expect(strip(again.stdout)).toBe(strip(whole.stdout));
    expect(strip(again.stdout)).toBe(strip((await cli(...args, "--no-preimage")).stdout));
  });
});
