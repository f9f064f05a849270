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
