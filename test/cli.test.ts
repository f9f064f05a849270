// The command line as a user runs it: reports, class tables, manifests, errors and exit codes.
import { execFile, spawn, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, describe, expect, it } from "vitest";
import { parseMap } from "../src/core/map.js";
import { parseExactJson } from "../src/core/json.js";
import { parseCsv } from "../src/outputs/tables.js";
import { A076227 } from "../src/core/published.js";
import { coefficientStop, T } from "./helpers.js";

const BIN = new URL("../bin/glidepath.js", import.meta.url).pathname;
const run = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), "glidepath-cli-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function cli(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return cli2(BIN, ...args);
}

async function cli2(bin: string, ...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    // killed before the test's own timeout, so that a command that runs on never outlives the test run
    const { stdout, stderr } = await run("node", [bin, ...args], { maxBuffer: 64 << 20, timeout: 100_000, killSignal: "SIGKILL" });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

describe("cli: reports", () => {
  it("sieve --json: exact integers, levels equal OEIS A076227 (published entry), exception n = 1", async () => {
    const { code, stdout } = await cli("sieve", "--depth", "28", "--json", "--workers", "2");
    expect(code).toBe(0);
    const j = parseExactJson(stdout) as {
      map: string;
      depth: bigint;
      levels: { survivors: bigint; stopped: bigint }[];
      exceptions: { n: bigint }[];
      nodes: bigint;
    };
    expect(j.map).toBe("3x+1");
    expect(j.levels.map((l) => l.survivors)).toEqual(A076227.slice(0, 29));
    expect(j.exceptions.map((e) => e.n)).toEqual([1n]);
    expect(stdout).not.toMatch(/e\+|\.\d+,"stopped"/); // no float notation for counts
  });

  it("sieve text report (golden file, timings removed)", async () => {
    const { code, stdout } = await cli("sieve", "--depth", "16", "--workers", "1");
    expect(code).toBe(0);
    await expect(stdout.replace(/in [\d.]+ s/, "in <time> s")).toMatchFileSnapshot("golden/sieve-3x+1-depth16.txt");
    // beyond the snapshot: the counts are OEIS A076227's, the densities exact quotients rounded here
    const rows = [...stdout.matchAll(/^ +(\d+) +([\d,]+) +([\d,]+) {2}(\d\.\d{8})/gm)];
    expect(rows.map((r) => BigInt(r[2]!.replaceAll(",", "")))).toEqual(A076227.slice(0, 17));
    rows.forEach((r, j) => {
      const scaled = (A076227[j]! * 10n ** 8n * 2n + (1n << BigInt(j))) / (1n << BigInt(j + 1)); // half up
      expect(r[4]).toBe(`${scaled / 10n ** 8n}.${(scaled % 10n ** 8n).toString().padStart(8, "0")}`);
    });
  });

  it("counts --by-odd --json agrees with counts text and A076227 at depth 32", async () => {
    const { code, stdout } = await cli("counts", "--depth", "32", "--by-odd", "--json");
    expect(code).toBe(0);
    const j = parseExactJson(stdout) as {
      levels: { survivors: bigint; stopped: bigint }[];
      byOdd: { depth: bigint; odd: bigint; live: bigint; stopped: bigint }[];
    };
    expect(j.levels.map((l) => l.survivors)).toEqual(A076227);
    const at32 = j.byOdd.filter((r) => r.depth === 32n).reduce((s, r) => s + r.live, 0n);
    expect(at32).toBe(A076227[32]);
    // the text mode, parsed back: the same levels and the same (j, m) entries
    const text = await cli("counts", "--depth", "32", "--by-odd");
    expect(text.code).toBe(0);
    const rows = [...text.stdout.matchAll(/^ +(\d+) +([\d,]+) +([\d,]+) {2}(\d\.\d{8})/gm)];
    expect(rows.map((r) => BigInt(r[2]!.replaceAll(",", "")))).toEqual(A076227);
    expect(rows.map((r) => BigInt(r[3]!.replaceAll(",", "")))).toEqual(j.levels.map((l) => l.stopped));
    // densities: survivors / 2^j rounded half up to 8 decimals, computed here from the published counts
    rows.forEach((r, i) => {
      const exact = (A076227[i]! * 10n ** 8n * 2n + (1n << BigInt(i))) / (1n << BigInt(i + 1));
      expect(r[4]!.replace(".", "")).toBe(exact.toString().padStart(9, "0"));
    });
    const odd = [...text.stdout.matchAll(/^ {2}j=(\d+) m=(\d+) live=(\d+)(?: stopped=(\d+))?$/gm)];
    expect(odd.map((r) => [BigInt(r[1]!), BigInt(r[2]!), BigInt(r[3]!), BigInt(r[4] ?? 0)])).toEqual(
      j.byOdd.map((r) => [r.depth, r.odd, r.live, r.stopped]),
    );
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

describe("cli: conventions", () => {
  it("help is printed on stdout with exit 0 when asked for, for the program and every command", async () => {
    for (const args of [["--help"], ["-h"], ["help"], ["sieve", "--help"], ["sieve", "-h"], ["help", "census"], ["counts", "--help"]]) {
      const r = await cli(...args);
      expect(r.code, args.join(" ")).toBe(0);
      expect(r.stderr).toBe("");
      expect(r.stdout).toMatch(/^Usage: glidepath/);
    }
    expect((await cli("--version")).stdout).toMatch(/^\d+\.\d+\.\d+\n$/);
  });

  it("a closed pipe ends quietly: no stack, exit 0", async () => {
    for (const cmd of ["counts --depth 3000 | head -3", "sieve --map 3x+1048575 --depth 12 --json | head -c 10"]) {
      const { stdout, stderr } = await run("bash", ["-c", `set -o pipefail; node ${BIN} ${cmd}; echo "rc=$?" >&2`]);
      expect(stdout.length).toBeGreaterThan(0);
      expect(stderr.trim()).toBe("rc=0");
    }
  });

  it("Ctrl-C ends a long exact count at once (the counter yields to the event loop)", async () => {
    const child = spawn("node", [BIN, "counts", "--depth", "10000", "--by-odd"], { stdio: ["ignore", "ignore", "pipe"] });
    let err = "";
    child.stderr.on("data", (d: Buffer) => (err += d.toString()));
    const exited = new Promise<number | null>((res) => child.on("exit", (code) => res(code)));
    await new Promise((r) => setTimeout(r, 1500));
    const sent = performance.now();
    child.kill("SIGINT");
    expect(await exited).toBe(130);
    expect(performance.now() - sent).toBeLessThan(2000); // generous: the counter yields every ~20 ms
    expect(err).toMatch(/glidepath: interrupted/);
  });

  it("a data file and its manifest are placed together: a manifest that cannot be placed leaves neither", async () => {
    const sub = mkdtempSync(join(dir, "pair-"));
    const out = join(sub, "t.u32");
    mkdirSync(`${out}.json`); // the manifest's name is taken by a folder
    const r = await cli("sieve", "--depth", "12", "--out", out);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/t.u32.json: it is a directory/);
    expect(readdirSync(sub)).toEqual(["t.u32.json"]);
  });

  it("every output gets a manifest and a confirmation line", async () => {
    const ce = join(dir, "confirm.arrow");
    const r = await cli("census", "--depth", "10", "--out", ce);
    expect(r.stdout).toMatch(/wrote census tallies \(arrow\) to .*confirm.arrow \(manifest .*confirm.arrow.json\)/);
    const man = parseExactJson(readFileSync(`${ce}.json`, "utf8")) as { kind: string; sha256: string; depth: bigint };
    expect(man).toMatchObject({ kind: "glidepath census", depth: 10n });
    expect(man.sha256).toBe(createHash("sha256").update(readFileSync(ce)).digest("hex"));
    const js = await cli("cycles", "--max-period", "10", "--out", join(dir, "cy.arrow"), "--json");
    expect(() => parseExactJson(js.stdout)).not.toThrow(); // stdout stays one JSON document
    // 3x+1 to period 10: the cycles of 1, -1 and -5 (common practice; the cycle of -17 is longer)
    expect(js.stderr).toMatch(/wrote 3 cycles \(arrow\)/);
  });

  it("the command line before the build says to run npm install in one line", async () => {
    const copy = mkdtempSync(join(dir, "unbuilt-"));
    mkdirSync(join(copy, "bin"));
    copyFileSync(BIN, join(copy, "bin", "glidepath.js"));
    const r = await cli2(join(copy, "bin", "glidepath.js"), "sieve", "--depth", "4");
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/run npm install/);
  });
});

describe("cli: structure commands", () => {
  it("class 7 under 3x+5: its class stops at depth 24, where the sieve cuts it (an exception there)", async () => {
    // 3x+5 sieve: 7 is an exception of the class 7 mod 2^24 (a brute force in test/kernel.test.ts)
    const { stdout } = await cli("class", "7", "--map", "3x+5");
    expect(stdout).toMatch(/coefficient stopping time 24 /);
    const brute = coefficientStop(parseMap("3x+5"), 7n, 100);
    expect(brute?.j).toBe(24);
  });
  it("class 27 mod 128: the least member's first descent is found past the word (step 59, A006877 lore: 27 rises to 9232)", async () => {
    const { stdout } = await cli("class", "27", "mod", "128", "--json");
    const j = parseExactJson(stdout) as { card: { leastMember: { descent: bigint } } };
    let v = 27n,
      steps = 0n;
    do {
      v = T(3n, 1n, v);
      steps++;
    } while (v >= 27n);
    expect(j.card.leastMember.descent).toBe(steps); // plain iteration here: 59 steps of T
    expect(steps).toBe(59n);
  });
  it("class 3 mod 16 --json: stopping time 4, affine form 9x + 2 (common practice)", async () => {
    const { code, stdout } = await cli("class", "3", "mod", "16", "--json");
    expect(code).toBe(0);
    const j = parseExactJson(stdout) as {
      kind: string;
      card: { form: { residue: bigint; odd: bigint; image: bigint; stoppingTime: bigint } };
    };
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
    const man = parseExactJson(readFileSync(`${out}.json`, "utf8")) as {
      sha256: string;
      arrays: { name: string; offset: bigint; length: bigint; type: string }[];
    };
    expect(man.sha256).toBe(createHash("sha256").update(data).digest("hex"));
    const img = man.arrays[1]!;
    expect(img.type).toBe("i64");
    const images = new BigInt64Array(
      data.buffer.slice(data.byteOffset + Number(img.offset), data.byteOffset + Number(img.offset) + 8 * 1024),
    );
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
    [["sieve", "--map", "3x * 1", "--depth", "10"], 2, /not of the form/],
    [["sieve", "--map", "3x", "--depth", "10"], 2, /not of the form/],
    [["sieve", "--map", "x+1", "--depth", "10"], 2, /not of the form/],
    [["sieve", "--map", "3y+1", "--depth", "10"], 2, /not of the form/],
    [["sieve"], 2, /--depth is required/],
    [["sieve", "--depth", "abc"], 2, /--depth must be a whole number/],
    [["sieve", "--depth=-3"], 2, /--depth must be a whole number/],
    [["sieve", "--depth", "64"], 2, /--depth must be from 0 to 63/],
    [["sieve", "--depth", "-1"], 2, /--depth must be a whole number/],
    [["sieve", "--map", "-3x+1", "--depth", "4"], 2, /not of the form/],
    [["sieve", "--depth", "41"], 2, /depth 41 is beyond the exact 64-bit range for 3x\+1 \(at most 40/],
    [["sieve", "--map", "5x+1", "--depth", "28"], 2, /at most 27/],
    [["sieve", "--depth", "10", "--workers", "0"], 2, /--workers must be from 1 to 256/],
    [["sieve", "--depth", "10", "--bogus"], 2, /unknown option '--bogus'/],
    [["sieve", "--depth", "10", "--format", "csv"], 2, /--format needs --out/],
    [["sieve", "--depth", "10", "--out", "x.bin", "--format", "xml"], 2, /--format must be raw or csv or arrow here/],
    [["sieve", "--depth", "30", "--out", "x.csv"], 2, /over the 1,000,000-row guard/],
    [
      ["sieve", "--depth", "10", "--out", "/nonexistent-dir/x.u32"],
      2,
      /cannot write \/nonexistent-dir\/x.u32: the folder \/nonexistent-dir does not exist/,
    ],
    [["sieve", "--depth", "10", "--out", "/tmp"], 2, /cannot write \/tmp: it is a directory/],
    [["sieve", "--depth", "10", "--out", "x.csv", "--format", "arrow"], 2, /x.csv is named as csv but --format is arrow/],
    [["counts", "--depth", "10001"], 2, /--depth must be from 0 to 10000/],
    [["counts", "--depth", "5", "extra"], 2, /too many arguments for 'counts'/],
    [["frobnicate"], 2, /unknown command 'frobnicate'/],
    [["help", "frobnicate"], 2, /unknown command "frobnicate"/],
    [[], 2, /usage: glidepath <command>/],
    [["class", "w:1021"], 2, /must contain only 0 and 1/],
    [["class", "w:"], 2, /parity word is empty/],
    [["class", "16", "mod", "2^4"], 2, /residue 16 is not in \[0, 2\^4\)/],
    [["class", "5", "mod", "24"], 2, /not a power of two/],
    [["class"], 2, /missing required argument 'input'/],
    [["class", "--map", "3x+4", "7"], 2, /r must be odd/],
    [["periodic", "1(2)"], 2, /is not a parity word/],
    [["census", "--depth", "33"], 2, /--depth must be from 1 to 32/],
    [["census", "--depth", "10", "--format", "csv", "--out", "x"], 2, /--format must be arrow here/],
    [["census", "--depth", "10", "--out", "c.csv"], 2, /c.csv is named as csv, which this command does not write/],
    [["steps", "--depth", "10", "--out", "st.csv"], 2, /st.csv is named as csv, which this command does not write/],
    [["cycles", "--max-period", "64"], 2, /--max-period must be from 1 to 63/],
    [["cycles", "--map", "99x+1", "--max-period", "30"], 2, /beyond the exact 128-bit range for 99x\+1/],
    [["conjugacy", "--depth", "27"], 2, /--depth must be from 1 to 26/],
    [["steps", "--depth", "25", "--out", "x"], 2, /--depth must be from 1 to 24/],
    [["steps", "--depth", "10"], 2, /--out FILE is required/],
    [["steps", "--depth", "10", "--out", "/nonexistent-dir/s"], 2, /cannot write/],
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

describe("cli: verify", () => {
  it("SIGINT at a random moment, then --resume: the same result as an uninterrupted run; without a checkpoint, no certificate", async () => {
    const sub = mkdtempSync(join(dir, "verify-"));
    const ck = join(sub, "run.ck.json");
    const cert = join(sub, "cert.json");
    const args = ["verify", "--from", "2^40", "--to", "2^40+2^31", "--sieve-depth", "20", "--json"];
    const child = spawn("node", [BIN, ...args, "--checkpoint", ck, "--out", cert], { stdio: "ignore" });
    const exited = new Promise<number | null>((res) => child.on("exit", (code) => res(code)));
    while (!existsSync(ck)) await new Promise((r) => setTimeout(r, 20));
    await new Promise((r) => setTimeout(r, Math.floor(Math.random() * 800)));
    child.kill("SIGINT");
    expect(await exited).toBe(130);
    expect(existsSync(cert)).toBe(false); // no partial certificate
    const resumed = await cli("verify", "--resume", ck, "--json");
    expect(resumed.code).toBe(0);
    const straight = await cli(...args);
    // this process's time and share differ between the two runs (blocksRun, numbersRun: the resumed part)
    const strip = (s: string) => s.replace(/,"seconds":[\d.]+,"blocksRun":\d+,"numbersRun":\d+/, "");
    expect(strip(resumed.stdout)).toBe(strip(straight.stdout));
    expect(readdirSync(sub).filter((f) => f.includes("partial"))).toEqual([]);
  });

  it("--out writes a certificate that --check accepts, saying what it checked; an edited count is refused in one line, exit 1", async () => {
    const cert = join(dir, "v.cert.json");
    const r = await cli("verify", "--from", "1", "--to", "2^18", "--sieve-depth", "12", "--out", cert);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/glide records/);
    expect(r.stdout).toMatch(/wrote the certificate to/);
    const ok = await cli("verify", "--check", cert, "--sample", "3");
    expect(ok.code).toBe(0);
    expect(ok.stdout).toMatch(/^the certificate holds/);
    expect(ok.stdout).toMatch(/digest over the whole document/);
    expect(ok.stdout).toMatch(/3 of \d+ blocks run again at random/);
    const full = await cli("verify", "--check", cert, "--full", "--json");
    expect(parseExactJson(full.stdout)).toMatchObject({ holds: true, failure: null });
    const text = readFileSync(cert, "utf8");
    const j = parseExactJson(text) as { version: bigint; counts: { checked: bigint }; glideRecords: { n: bigint }[] };
    expect(j.version).toBe(2n);
    expect(j.glideRecords.map((g) => g.n).slice(0, 5)).toEqual([2n, 3n, 7n, 27n, 703n]); // OEIS A060412
    const bad = join(dir, "v.bad.json");
    writeFileSync(bad, text.replace(`"checked": ${j.counts.checked}`, `"checked": ${j.counts.checked + 1n}`));
    const refused = await cli("verify", "--check", bad);
    expect(refused.code).toBe(1);
    expect(refused.stdout.trim().split("\n")).toHaveLength(1);
    expect(refused.stdout).toMatch(/does NOT hold: digest: [0-9a-f]{64} in the certificate; its content gives [0-9a-f]{64}/);
    writeFileSync(bad, text.replace(`"checked": ${j.counts.checked}`, `"checked": "${j.counts.checked}"`));
    const typed = await cli("verify", "--check", bad);
    expect(typed.code).toBe(2);
    expect(typed.stderr).toMatch(/counts.checked must be a whole number written as digits, got the string/);
    writeFileSync(bad, '{"kind": "glidepath class table"}');
    expect((await cli("verify", "--check", bad)).stderr).toMatch(/not a glidepath verification certificate/);
  });

  it("a checkpoint of another unfinished run is not overwritten without --force; --out and --checkpoint may not name one file", async () => {
    const sub = mkdtempSync(join(dir, "ck-"));
    const ck = join(sub, "run.ck.json");
    const args = ["verify", "--from", "2^40", "--to", "2^40+2^31", "--sieve-depth", "20", "--json"];
    const child = spawn("node", [BIN, ...args, "--checkpoint", ck], { stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr.on("data", (d: Buffer) => {
      stderr += d.toString();
    });
    const exited = new Promise<number | null>((res) => child.on("exit", (code) => res(code)));
    while (!existsSync(ck)) await new Promise((r) => setTimeout(r, 20));
    child.kill("SIGINT");
    expect(await exited).toBe(130);
    expect(stderr).toMatch(new RegExp(`the checkpoint ${ck} holds \\d+ blocks? of \\d+; continue with: glidepath verify --resume ${ck}`));
    const other = await cli("verify", "--from", "1", "--to", "2^20", "--checkpoint", ck);
    expect(other.code).toBe(2);
    expect(other.stderr).toMatch(/holds an unfinished checkpoint of another run .* --force/);
    const same = await cli(...args, "--checkpoint", ck);
    expect(same.stderr).toMatch(/holds this run, unfinished .* --resume/);
    const resumed = await cli("verify", "--resume", ck, "--json");
    expect(resumed.code).toBe(0);
    expect(resumed.stderr).toMatch(/resumed .*: \d+ blocks? of \d+ done, \d+ blocks? to go/);
    expect((await cli("verify", "--from", "1", "--to", "2^20", "--checkpoint", ck)).code).toBe(0); // a finished one may go
    expect((await cli("verify", "--from", "1", "--to", "10", "--checkpoint", ck, "--out", ck)).stderr).toMatch(/name the same file/);
    expect((await cli("verify", "--from", "1", "--to", "10", "--checkpoint", sub)).stderr).toMatch(/it is a directory/);
  });

  it("verify from 1 to 2^N goes class by class (--periods, --no-preimage), and its checkpoint resumes after Ctrl-C", async () => {
    const json = async (...args: string[]) => JSON.parse((await cli("verify", "--from", "1", "--to", "2^22", "--json", ...args)).stdout);
    const classes = await json();
    expect([classes.method, classes.preimage, classes.sieveDepth]).toEqual(["classes", true, 22]);
    const periods = await json("--periods");
    expect([periods.method, periods.sieveDepth]).toEqual(["periods", 26]);
    expect(periods.glideRecords).toEqual(classes.glideRecords);
    expect(periods.pathRecords).toEqual(classes.pathRecords);
    const all = await json("--no-preimage");
    expect([all.preimage, all.counts.preimage]).toEqual([false, 0]);
    expect(all.counts.checked).toBe(classes.counts.checked + classes.counts.preimage);
    expect((await cli("verify", "--from", "1", "--to", "2^22")).stdout).toMatch(/classes settled bit by bit to depth 22/);
    const sub = mkdtempSync(join(dir, "ck-classes-"));
    const ck = join(sub, "run.ck.json");
    const child = spawn("node", [BIN, "verify", "--from", "1", "--to", "2^32", "--checkpoint", ck], { stdio: "ignore" });
    const exited = new Promise<number | null>((res) => child.on("exit", (code) => res(code)));
    while (!existsSync(ck)) await new Promise((r) => setTimeout(r, 20));
    child.kill("SIGINT");
    expect(await exited).toBe(130);
    const resumed = JSON.parse((await cli("verify", "--resume", ck, "--json")).stdout);
    expect(resumed.method).toBe("classes");
    expect(resumed.maxGlide.n).toBe(2788008987); // OEIS A060412: the last glide record below 2^32 (from memory)
  });

  it("verify | head -1: the run stops when the reader has gone; --string-integers writes every integer as a string", async () => {
    const t0 = performance.now();
    const r = spawnSync("sh", ["-c", `node ${BIN} verify --from 2^40 --to 2^40+2^36 | head -1`], { encoding: "utf8" });
    expect(r.stdout).toMatch(/^verification of 3x\+1 over \[1099511627776, 1168231104512\): 68,719,476,736 numbers/);
    expect(performance.now() - t0).toBeLessThan(20_000); // the whole range takes minutes
    const s = await cli("verify", "--from", "2^60", "--to", "2^60+100", "--sieve-depth", "4", "--json", "--string-integers");
    const j = JSON.parse(s.stdout) as { from: string; counts: { numbers: string } };
    expect(j.from).toBe("1152921504606846976"); // JSON.parse would round 2^60 + ... as a double; a string keeps it
    expect(j.counts.numbers).toBe("100");
  });

  it("verify --known-published: the new records among all n in the report, --json and the certificate, which --check re-derives", async () => {
    const cert = join(dir, "global.cert.json");
    const args = ["verify", "--from", "10^6", "--to", "10^6+2^17", "--sieve-depth", "10", "--workers", "2"];
    const text = await cli(...args, "--known-published", "--out", cert);
    expect(text.code).toBe(0);
    // OEIS A060412 (1027431, 1126015) and A006884 (1042431) in the range, beyond the last terms below 10^6 (626331, 704511; from memory)
    expect(text.stdout).toMatch(
      /known below 1000000: largest glide \d+ standard steps, n = 626331; largest path \(under T\) \d+, n = 704511/,
    );
    expect(text.stdout).toMatch(/new glide records among all n .*: 2\n +1027431 +\d+\n +1126015 +365\n/);
    expect(text.stdout).toMatch(/new path records among all n .*: 1\n +1042431 +\d+\n/);
    const j = parseExactJson((await cli(...args, "--known-glide", "287", "--known-path", "28495741760", "--json")).stdout) as {
      known: { below: bigint; source: string };
      globalRecords: { glideRecords: { n: bigint }[]; pathRecords: { n: bigint }[] };
    };
    expect(j.known.below).toBe(1000000n);
    expect(j.globalRecords.glideRecords.map((g) => g.n)).toEqual([1027431n, 1126015n]);
    expect(j.globalRecords.pathRecords.map((g) => g.n)).toEqual([1042431n]);
    const ok = await cli("verify", "--check", cert, "--sample", "2");
    expect(ok.stdout).toMatch(/the new records among all n \(2 glide, 1 path\)/);
    // an edited claim, every digest recomputed: one line, exit 1
    const { digestOf } = await import("../src/jobs/verify/certificate.js");
    const { toExactJson } = await import("../src/core/json.js");
    const d = parseExactJson(readFileSync(cert, "utf8")) as Record<string, unknown> & { globalRecords: { pathRecords: unknown[] } };
    d.globalRecords.pathRecords = [];
    delete d.digest;
    d.digest = await digestOf(d);
    writeFileSync(cert, toExactJson(d, 2));
    const refused = await cli("verify", "--check", cert);
    expect(refused.code).toBe(1);
    expect(refused.stdout.trim().split("\n")).toHaveLength(1);
    expect(refused.stdout).toMatch(
      /^the certificate does NOT hold: globalRecords\.pathRecords: 0 entries in the certificate; the range's records above the known values gives 1 entries/,
    );
  });

  const knownBad = join(dir, "known-bad.json");
  writeFileSync(knownBad, '{"kind": "glidepath known records", "version": 1, "records": [{"map": "3x+1", "below": 1000}');
  const knownNegative = join(dir, "known-negative.json");
  writeFileSync(
    knownNegative,
    '{"kind": "glidepath known records", "version": 1, "records": [{"map": "3x+1", "below": 1000, "glide": {"n": null, "standardSteps": -3}, "path": {"n": null, "peakT": 5}, "source": "x"}]}',
  );
  const bad: [string[], number, RegExp][] = [
    [["verify", "--from", "1000", "--to", "2000", "--known", knownBad], 2, /^glidepath: --known .*known-bad\.json: not JSON\n$/],
    [
      ["verify", "--from", "1000", "--to", "2000", "--known", knownNegative],
      2,
      /records\[0\]\.glide\.standardSteps must be a whole number/,
    ],
    [
      ["verify", "--from", "1000", "--to", "2000", "--known-glide", "-3", "--known-path", "5"],
      2,
      /--known-glide must be a whole number \(0 or more\), got "-3"/,
    ],
    [["verify", "--from", "1000", "--to", "2000", "--known-glide", "3"], 2, /--known-glide and --known-path go together/],
    [
      ["verify", "--map", "3x+5", "--from", "1000", "--to", "2000", "--known-published"],
      2,
      /the published record lists are of 3x\+1, not 3x\+5/,
    ],
    [["verify", "--from", "2^50", "--to", "2^50+10", "--known-published"], 2, /cover n up to \d+; FROM = 1125899906842624 lies beyond/],
    [["verify", "--from", "10", "--to", "10"], 2, /--to must be above --from/],
    [["verify", "--from", "-5", "--to", "10"], 2, /--from must be a whole number/],
    [["verify", "--from", "1.5", "--to", "10"], 2, /--from must be a whole number/],
    [["verify", "--from", "0", "--to", "10"], 2, /--from must be at least 1/],
    [["verify", "--map", "3y+1", "--from", "1", "--to", "10"], 2, /not of the form/],
    [["verify", "--from", "1", "--to", "10", "--sieve-depth", "31"], 2, /--sieve-depth must be from 1 to 30/],
    [["verify", "--from", "2^127", "--to", "2^127+2^30"], 2, /numbers at or above 2\^127 are verified in BigInt/],
    [["verify", "--check", "/nonexistent.json"], 2, /cannot read/],
    [["verify", "--resume", "/nonexistent.json"], 2, /cannot read/],
    [["verify", "--resume", "/tmp"], 2, /cannot read \/tmp: it is a folder/],
    [["verify", "--from", "1", "--to", "10", "--out", ""], 2, /--out needs a file name/],
    [["verify", "--from", "1", "--to", "10", "--checkpoint", ""], 2, /--checkpoint needs a file name/],
  ];
  for (const [args, code, msg] of bad) {
    it(`${args.join(" ")} -> exit ${code}, one line, no certificate`, async () => {
      const out = join(dir, "never.json");
      const own = ["--check", "--resume", "--out", "--checkpoint"].some((a) => args.includes(a));
      const r = await cli(...args, ...(own ? [] : ["--out", out]));
      expect(r.code).toBe(code);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(r.stderr).toMatch(msg);
      expect(existsSync(out)).toBe(false);
    });
  }
});

describe("cli: verify with table files", () => {
  it("checks the run's sieve and step tables against sieve --out and steps --out files and their manifests", async () => {
    const sub = mkdtempSync(join(dir, "tables-"));
    const sieve = join(sub, "s16.u32");
    const steps = join(sub, "st12.bin");
    expect((await cli("sieve", "--depth", "16", "--out", sieve)).code).toBe(0);
    expect((await cli("steps", "--depth", "12", "--out", steps)).code).toBe(0);
    const args = ["verify", "--from", "2^30", "--to", "2^30+2^22", "--sieve-depth", "16", "--step-depth", "12", "--json"];
    const plain = await cli(...args);
    const withFiles = await cli(...args, "--sieve-table", sieve, "--step-table", steps);
    expect(withFiles.code).toBe(0);
    const strip = (s: string) => s.replace(/,"seconds":[\d.]+/, "");
    expect(strip(withFiles.stdout)).toBe(strip(plain.stdout));
    // a file whose manifest is for another depth, a changed byte, and another map's table under a consistent manifest
    expect((await cli(...args.map((a) => (a === "16" ? "18" : a)), "--sieve-table", sieve)).stderr).toMatch(
      /manifest says depth 16, this run needs 18/,
    );
    const bytes = readFileSync(sieve);
    bytes[5] = bytes[5]! ^ 1;
    const changed = join(sub, "changed.u32");
    writeFileSync(changed, bytes);
    writeFileSync(`${changed}.json`, readFileSync(`${sieve}.json`));
    const r1 = await cli(...args, "--sieve-table", changed);
    expect(r1.code).toBe(2);
    expect(r1.stderr).toMatch(/its sha256 is .*, its manifest says/);
    const other = join(sub, "other.u32");
    expect((await cli("sieve", "--map", "3x-1", "--depth", "16", "--out", other)).code).toBe(0);
    const man = readFileSync(`${other}.json`, "utf8").replace('"map": "3x-1"', '"map": "3x+1"');
    writeFileSync(`${other}.json`, man);
    const r2 = await cli(...args, "--sieve-table", other);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/is not the depth-16 sieve table of 3x\+1/);
  });
});

describe("cli: tree", () => {
  it("tree 1 --json: the levels are OEIS A060322 (terms 0..16); --out writes edges that are each one step of T", async () => {
    const csv = join(dir, "tree.csv");
    const { code, stdout } = await cli("tree", "1", "--depth", "16", "--json", "--out", csv);
    expect(code).toBe(0);
    const j = parseExactJson(stdout.split("\n")[0]!) as { levels: { nodes: bigint }[]; total: bigint };
    // OEIS A060322 (published entry)
    expect(j.levels.map((l) => l.nodes)).toEqual([1, 1, 1, 1, 2, 3, 4, 5, 6, 8, 12, 18, 24, 31, 39, 50, 68].map(BigInt));
    const text = readFileSync(csv, "utf8");
    const rows = text.trim().split("\n");
    expect(rows[0]).toBe("node,parent,depth,kind");
    expect(BigInt(rows.length - 1)).toBe(j.total + 1n);
    for (const row of rows.slice(2)) {
      const [node, parent, , kind] = row.split(",");
      expect(T(3n, 1n, BigInt(node!))).toBe(BigInt(parent!)); // a plain BigInt step
      expect(kind).toBe(BigInt(node!) % 2n === 0n ? "even" : "odd");
    }
    const manifest = JSON.parse(readFileSync(`${csv}.json`, "utf8")) as { sha256: string; rows: number };
    expect(manifest.sha256).toBe(createHash("sha256").update(readFileSync(csv)).digest("hex"));
    expect(manifest.rows).toBe(rows.length - 1);
  });

  it("tree --out F.arrow: the same edges as CSV, read back with apache-arrow", async () => {
    const arrow = join(dir, "tree.arrow");
    expect((await cli("tree", "7", "--depth", "20", "--steps", "standard", "--out", arrow)).code).toBe(0);
    const { tableFromIPC } = await import("apache-arrow");
    const t = tableFromIPC(readFileSync(arrow));
    const csv = join(dir, "tree7.csv");
    await cli("tree", "7", "--depth", "20", "--steps", "standard", "--out", csv);
    const rows = readFileSync(csv, "utf8").trim().split("\n").slice(1);
    expect(t.numRows).toBe(rows.length);
    expect(
      `${t.getChild("node")!.get(5)},${t.getChild("parent")!.get(5)},${t.getChild("depth")!.get(5)},${t.getChild("kind")!.get(5)}`,
    ).toBe(rows[5]);
  });

  for (const [args, msg] of [
    [["tree", "0"], /N must be a positive integer/],
    [["tree", "9"], /multiple of q = 3/],
    [["tree", "abc"], /N must be a whole number/],
    [["tree", "1", "--depth", "101"], /--depth must be from 0 to 100/],
    [["tree", "1", "--steps", "odd"], /--steps must be T or standard/],
    [["tree", "1", "--depth", "50", "--out", join(dir, "big.csv")], /over the 1,000,000-row guard/],
  ] as const) {
    it(`${args.join(" ")} -> exit 2, one line, no file`, async () => {
      const r = await cli(...args);
      expect(r.code).toBe(2);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(r.stderr).toMatch(msg);
      expect(existsSync(join(dir, "big.csv"))).toBe(false);
    });
  }
});
