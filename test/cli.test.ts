// The command line as a user runs it: reports, class tables, manifests, errors and exit codes.
import { execFile, spawn } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/map.js";
import { parseExactJson } from "../src/json.js";
import { parseCsv } from "../src/tables.js";
import { A076227 } from "./published.js";
import { coefficientStop, T } from "./helpers.js";

const BIN = new URL("../bin/glidepath.js", import.meta.url).pathname;
const run = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), "glidepath-cli-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function cli(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run("node", [BIN, ...args], { maxBuffer: 64 << 20 });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

describe("cli: reports", () => {
  it("sieve --json: exact integers, levels equal A076227 (OEIS, from memory), exception n = 1", async () => {
    const { code, stdout } = await cli("sieve", "--depth", "28", "--json", "--workers", "2");
    expect(code).toBe(0);
    const j = parseExactJson(stdout) as { map: string; depth: bigint; levels: { survivors: bigint; stopped: bigint }[]; exceptions: { n: bigint }[]; nodes: bigint };
    expect(j.map).toBe("3x+1");
    expect(j.levels.map((l) => l.survivors)).toEqual(A076227.slice(0, 29));
    expect(j.exceptions.map((e) => e.n)).toEqual([1n]);
    expect(stdout).not.toMatch(/e\+|\.\d+,"stopped"/); // no float notation for counts
  });

  it("sieve text report (golden file, timings removed)", async () => {
    const { code, stdout } = await cli("sieve", "--depth", "16", "--workers", "1");
    expect(code).toBe(0);
    await expect(stdout.replace(/in [\d.]+ s/, "in <time> s")).toMatchFileSnapshot("golden/sieve-3x+1-depth16.txt");
  });

  it("counts --by-odd --json agrees with counts text and A076227 at depth 32", async () => {
    const { code, stdout } = await cli("counts", "--depth", "32", "--by-odd", "--json");
    expect(code).toBe(0);
    const j = parseExactJson(stdout) as { levels: { survivors: bigint }[]; byOdd: { depth: bigint; odd: bigint; live: bigint }[] };
    expect(j.levels.map((l) => l.survivors)).toEqual(A076227);
    const at32 = j.byOdd.filter((r) => r.depth === 32n).reduce((s, r) => s + r.live, 0n);
    expect(at32).toBe(A076227[32]);
  });
});

describe("cli: class tables", () => {
  it("raw table at depth 18: sorted, equal to the brute-force survivor set, sha256 as in the manifest", async () => {
    const out = join(dir, "s18.u32");
    const { code } = await cli("sieve", "--map", "3x-1", "--depth", "18", "--out", out);
    expect(code).toBe(0);
    const data = readFileSync(out);
    const manifest = parseExactJson(readFileSync(`${out}.json`, "utf8")) as Record<string, unknown>;
    expect(manifest.sha256).toBe(createHash("sha256").update(data).digest("hex"));
    expect(manifest).toMatchObject({ map: "3x-1", depth: 18n, element: "u32", byteOrder: "little-endian", format: "raw" });
    const residues = Array.from(new Uint32Array(data.buffer, data.byteOffset, data.byteLength / 4));
    expect(BigInt(residues.length)).toBe(manifest.rows);
    const map = parseMap("3x-1");
    const brute: number[] = [];
    for (let a = 0; a < 1 << 18; a++) if (coefficientStop(map, BigInt(a), 18) === null) brute.push(a);
    expect(residues).toEqual(brute); // ascending, same set
  });

  it("CSV round-trips: parsed rows are sorted and each (m, b) is the class's affine form (BigInt check)", async () => {
    const out = join(dir, "s16.csv");
    const { code } = await cli("sieve", "--map", "5x+1", "--depth", "16", "--out", out, "--format", "csv");
    expect(code).toBe(0);
    const rows = parseCsv(readFileSync(out, "utf8"));
    for (let i = 1; i < rows.length; i++) expect(rows[i - 1]!.residue < rows[i]!.residue).toBe(true);
    for (const row of rows) {
      let v = row.residue + (1n << 16n) * 3n;
      for (let s = 0; s < 16; s++) v = T(5n, 1n, v);
      expect(v).toBe(5n ** BigInt(row.odd) * 3n + row.image);
    }
    const raw = join(dir, "s16.u32");
    await cli("sieve", "--map", "5x+1", "--depth", "16", "--out", raw);
    const data = readFileSync(raw);
    expect(Array.from(new Uint32Array(data.buffer, data.byteOffset, data.byteLength / 4)).map(BigInt)).toEqual(rows.map((r) => r.residue));
  });

  it("an interrupted export leaves no file under the output's name and no temporary file", async () => {
    const sub = mkdtempSync(join(dir, "int-"));
    const out = join(sub, "s32.u32");
    const child = spawn("node", [BIN, "sieve", "--depth", "32", "--out", out, "--workers", "1"], { stdio: "ignore" });
    const exited = new Promise<number | null>((res) => child.on("exit", (code, sig) => res(code ?? (sig ? -1 : null))));
    while (readdirSync(sub).length === 0) await new Promise((r) => setTimeout(r, 5));
    child.kill("SIGTERM");
    expect(await exited).toBe(143);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(sub)).toEqual([]);
  });
});

describe("cli: structure commands", () => {
  it("class 3 mod 16 --json: stopping time 4, affine form 9x + 2 (common practice)", async () => {
    const { code, stdout } = await cli("class", "3", "mod", "16", "--json");
    expect(code).toBe(0);
    const j = parseExactJson(stdout) as { kind: string; card: { form: { residue: bigint; odd: bigint; image: bigint; stoppingTime: bigint } } };
    expect(j.kind).toBe("class");
    expect(j.card.form).toMatchObject({ residue: 3n, odd: 2n, image: 2n, stoppingTime: 4n });
  });
  it("periodic 1(10) is the 2-adic point 1/3 (not an integer); 110 is -5 on a cycle", async () => {
    expect((await cli("periodic", "1(10)")).stdout).toMatch(/2-adic point: 1\/3/);
    expect((await cli("periodic", "110")).stdout).toMatch(/-5 -> -7 -> -10/);
  });
  it("cycles --out FILE.arrow and census --out FILE.arrow write readable Arrow files", async () => {
    const { tableFromIPC } = await import("apache-arrow");
    const cy = join(dir, "cycles.arrow");
    expect((await cli("cycles", "--map", "5x+1", "--max-period", "14", "--out", cy)).code).toBe(0);
    const t = tableFromIPC(readFileSync(cy));
    // 5x+1: 1 (period 5), 13 (7), 17 (7), and the negative cycle of -1 (common practice)
    expect(t.getChild("representative")!.toArray()).toEqual(["1", "13", "17", "-1"]);
    const ce = join(dir, "census.arrow");
    expect((await cli("census", "--depth", "12", "--out", ce)).code).toBe(0);
    expect(tableFromIPC(readFileSync(ce)).numRows).toBeGreaterThan(0);
  });
  it("steps raw table: the manifest's sha256 matches, and the arrays give T^k (BigInt check)", async () => {
    const out = join(dir, "steps10.bin");
    expect((await cli("steps", "--map", "3x-1", "--depth", "10", "--out", out)).code).toBe(0);
    const data = readFileSync(out);
    const man = parseExactJson(readFileSync(`${out}.json`, "utf8")) as { sha256: string; arrays: { name: string; offset: bigint; length: bigint; type: string }[] };
    expect(man.sha256).toBe(createHash("sha256").update(data).digest("hex"));
    const img = man.arrays[1]!;
    expect(img.type).toBe("i64");
    const images = new BigInt64Array(data.buffer.slice(data.byteOffset + Number(img.offset), data.byteOffset + Number(img.offset) + 8 * 1024));
    for (const a of [0, 1, 7, 27, 1023]) {
      let v = BigInt(a) + 1024n * 5n;
      for (let s = 0; s < 10; s++) v = T(3n, -1n, v);
      expect(v).toBe(3n ** BigInt(data[a]!) * 5n + images[a]!);
    }
  });
});

describe("cli: errors give one line and the documented exit code", () => {
  const cases: [string[], number, RegExp][] = [
    [["sieve", "--map", "4x+1", "--depth", "10"], 2, /q must be odd/],
    [["sieve", "--map", "3x+2", "--depth", "10"], 2, /r must be odd/],
    [["sieve", "--map", "1x+1", "--depth", "10"], 2, /q must be between 3 and 99/],
    [["sieve", "--map", "101x+1", "--depth", "10"], 2, /q must be between 3 and 99/],
    [["sieve", "--map", "3x+1048577", "--depth", "10"], 2, /\|r\| must be below 2\^20/],
    [["sieve", "--map", "3x + 1", "--depth", "10"], 2, /not of the form/],
    [["sieve", "--map", "3x", "--depth", "10"], 2, /not of the form/],
    [["sieve", "--map", "x+1", "--depth", "10"], 2, /not of the form/],
    [["sieve", "--map", "3y+1", "--depth", "10"], 2, /not of the form/],
    [["sieve"], 2, /--depth is required/],
    [["sieve", "--depth", "abc"], 2, /--depth must be a whole number/],
    [["sieve", "--depth=-3"], 2, /--depth must be a whole number/],
    [["sieve", "--depth", "64"], 2, /--depth must be between 0 and 63/],
    [["sieve", "--depth", "41"], 1, /depth 41 is beyond the exact 64-bit range for 3x\+1 \(at most 40/],
    [["sieve", "--map", "5x+1", "--depth", "28"], 1, /at most 27/],
    [["sieve", "--depth", "10", "--workers", "0"], 2, /--workers must be between 1 and 256/],
    [["sieve", "--depth", "10", "--bogus"], 2, /Unknown option '--bogus'/],
    [["sieve", "--depth", "10", "--format", "csv"], 2, /--format needs --out/],
    [["sieve", "--depth", "10", "--out", "x.bin", "--format", "xml"], 2, /--format must be raw, csv or arrow/],
    [["sieve", "--depth", "30", "--out", "x.csv"], 2, /over the 1,000,000-row guard/],
    [["sieve", "--depth", "10", "--out", "/nonexistent-dir/x.u32"], 1, /cannot write \/nonexistent-dir\/x.u32: ENOENT/],
    [["counts", "--depth", "10001"], 2, /--depth must be between 0 and 10000/],
    [["counts", "--depth", "5", "extra"], 2, /Unexpected argument 'extra'/],
    [["frobnicate"], 2, /unknown command "frobnicate"/],
    [["class", "w:1021"], 2, /must contain only 0 and 1/],
    [["class", "w:"], 2, /parity word is empty/],
    [["class", "16", "mod", "2^4"], 2, /residue 16 is not in \[0, 2\^4\)/],
    [["class", "5", "mod", "24"], 2, /not a power of two/],
    [["class"], 2, /give an input/],
    [["class", "--map", "3x+4", "7"], 2, /r must be odd/],
    [["periodic", "1(2)"], 2, /is not a parity word/],
    [["census", "--depth", "33"], 2, /--depth must be between 1 and 32/],
    [["census", "--depth", "10", "--format", "csv", "--out", "x"], 2, /--format must be arrow here/],
    [["cycles", "--max-period", "64"], 2, /--max-period must be between 1 and 63/],
    [["cycles", "--map", "99x+1", "--max-period", "30"], 1, /beyond the exact 128-bit range for 99x\+1/],
    [["conjugacy", "--depth", "27"], 2, /--depth must be between 1 and 26/],
    [["steps", "--depth", "25", "--out", "x"], 2, /--depth must be between 1 and 24/],
    [["steps", "--depth", "10"], 2, /--out FILE is required/],
    [["steps", "--depth", "10", "--out", "/nonexistent-dir/s"], 1, /cannot write/],
  ];
  for (const [args, code, msg] of cases) {
    it(`${args.join(" ")} -> exit ${code}`, async () => {
      const r = await cli(...args);
      expect(r.code).toBe(code);
      expect(r.stdout).toBe("");
      const lines = r.stderr.split("\n").filter((l) => l.length > 0);
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(/^glidepath: /);
      expect(lines[0]).toMatch(msg);
    });
  }
});
