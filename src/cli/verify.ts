// glidepath verify: a convergence-verification run over [FROM, TO) on the kernel pool, with its
// record lists, a certificate (--out), checkpoints (--checkpoint, --resume) and --check.
import { createHash, randomBytes } from "node:crypto";
import { readFileSync } from "node:fs";
import type { Command } from "commander";
import { UsageError } from "../core/errors.js";
import type { CollatzMap } from "../core/map.js";
import { certificate, checkCertificate, checkpoint, readCertificate, readCheckpoint, tableHashes } from "../jobs/verify/certificate.js";
import type { TableHashes } from "../jobs/verify/certificate.js";
import {
  DEFAULT_MAX_STEPS,
  MAX_VERIFY_SIEVE_DEPTH,
  MAX_VERIFY_STEP_DEPTH,
  parseBound,
  planVerify,
  runVerify,
  verifyJob,
  verifyTables,
} from "../jobs/verify/verify.js";
import type { StoredBlock, VerifyParams, VerifyRequest, VerifyResult } from "../jobs/verify/verify.js";
import type { BatchJob } from "./cluster.js";
import { group, plural } from "../outputs/format.js";
import { parseExactJson, toExactJson } from "../outputs/json.js";
import { verifyJson } from "../outputs/summary.js";
import { writeFileAtomic } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, outputOption, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print } from "./print.js";

interface VerifyOptions extends RawOptions {
  readonly from?: string;
  readonly to?: string;
  readonly sieveDepth?: string;
  readonly stepDepth?: string;
  readonly maxSteps?: string;
  readonly checkpoint?: string;
  readonly resume?: string;
  readonly check?: string;
  readonly sample?: string;
  readonly delay?: boolean;
  readonly sieveTable?: string;
  readonly stepTable?: string;
}

/** A table file named on the command line, read with its manifest (FILE.json) and checked against it. */
interface TableFile {
  readonly path: string;
  readonly sha256: string;
}

function readTableFile(option: string, path: string, kind: string, map: CollatzMap, depth: number): TableFile {
  let data: Buffer;
  let manifest: Record<string, unknown>;
  try {
    data = readFileSync(path);
    manifest = parseExactJson(readFileSync(`${path}.json`, "utf8")) as Record<string, unknown>;
  } catch (e) {
    throw new UsageError(
      `${option} ${path}: cannot read it and its manifest ${path}.json (${(e as NodeJS.ErrnoException).code ?? String(e)})`,
    );
  }
  const fileSha = sha256(data);
  const want = { kind, map: map.name, depth: BigInt(depth), format: "raw" };
  for (const [k, v] of Object.entries(want))
    if (manifest[k] !== v)
      throw new UsageError(`${option} ${path}: its manifest says ${k} ${String(manifest[k])}, this run needs ${String(v)}`);
  if (manifest.sha256 !== fileSha)
    throw new UsageError(`${option} ${path}: its sha256 is ${fileSha}, its manifest says ${String(manifest.sha256)}`);
  return { path, sha256: fileSha };
}

/** Records shown in the text report (all of them are in --json and the certificate). */
const TEXT_RECORDS = 40;

/** The range and its parameters, for `verify` and `batch verify`. */
function rangeOptions(cmd: Command): Command {
  return cmd
    .option("--from <FROM>", "first number (decimal, or a sum of powers such as 2^50+2^32)")
    .option("--to <TO>", "the end of the range, not included")
    .option("--sieve-depth <K>", `sieve depth: 1 to ${MAX_VERIFY_SIEVE_DEPTH} (default 26)`)
    .option("--step-depth <k>", `table step depth: 1 to ${MAX_VERIFY_STEP_DEPTH} (default 16)`)
    .option("--delay", "also the delay of every n (steps to reach 1) and its records: each n iterated to the end, slower")
    .option("--max-steps <S>", `steps after which a trajectory is reported unresolved (default ${DEFAULT_MAX_STEPS})`);
}

/** A verification range on a cluster: shards are runs of its blocks; merge --out writes the certificate. */
export const verifyBatch: BatchJob<VerifyParams, VerifyResult> = {
  job: verifyJob,
  options: rangeOptions,
  params: (o: VerifyOptions) => {
    const req = request(o, mapOption(o.map));
    planVerify(req); // checks it
    return req;
  },
  json: verifyJson,
  out: {
    formats: ["raw"],
    what: "the certificate",
    async write(pool, result, out, stamp) {
      const { map, from, to, sieveDepth, stepDepth, maxSteps } = result;
      const plan = planVerify({ map, from, to, sieveDepth, stepDepth, maxSteps });
      const hashes = plan.engine === "kernel" ? await tableHashes(await verifyTables(pool, plan), sha256) : null;
      const now = new Date().toISOString();
      const cert = certificate(result, hashes, stamp, { started: now, finished: now, workers: pool.size });
      await writeFileAtomic(out.path, `${toExactJson(cert, 2)}\n`);
    },
  },
};

export function verifyCommand(program: Command): Command {
  return rangeOptions(
    jobCommand(
      program,
      "verify",
      "check that every n in [FROM, TO) reaches a value below n; glide and path records; certificates and checkpoints",
    ),
  )
    .option("--out <FILE>", "write the certificate (JSON)")
    .option("--checkpoint <FILE>", "keep the run's state in FILE after every block (resume with --resume FILE)")
    .option("--resume <FILE>", "continue the run a checkpoint describes (its options are the checkpoint's)")
    .option("--sieve-table <FILE>", "check the run's sieve table against this raw file (sieve --out) and its manifest")
    .option("--step-table <FILE>", "check the run's step table against this raw file (steps --out) and its manifest")
    .option("--check <FILE>", "re-derive what a certificate says (table hashes, counts, records, a sample) and say whether it holds")
    .option("--sample <N>", "with --check: random n of the range to iterate again (default 1000)")
    .action((o: VerifyOptions) => (o.check !== undefined ? check(o) : verify(o)));
}

function request(o: VerifyOptions, map: CollatzMap): VerifyRequest {
  return {
    map,
    from: parseBound("--from", o.from),
    to: parseBound("--to", o.to),
    sieveDepth: intOption("sieve-depth", o.sieveDepth, 1, MAX_VERIFY_SIEVE_DEPTH, 26),
    stepDepth: intOption("step-depth", o.stepDepth, 1, MAX_VERIFY_STEP_DEPTH, 16),
    maxSteps: intOption("max-steps", o.maxSteps, 1, 100_000_000, DEFAULT_MAX_STEPS),
    delay: o.delay === true,
  };
}

/** sha256 (hex) with Node's crypto. */
const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

async function verify(o: VerifyOptions): Promise<void> {
  let req: VerifyRequest;
  let done = new Map<number, StoredBlock>();
  let checkpointPath = o.checkpoint;
  let resumed: { key: string; blocks: number } | null = null;
  if (o.resume !== undefined) {
    if (
      o.from !== undefined ||
      o.to !== undefined ||
      o.sieveDepth !== undefined ||
      o.stepDepth !== undefined ||
      o.maxSteps !== undefined ||
      o.delay === true ||
      o.map !== "3x+1"
    )
      throw new UsageError("--resume takes the run's options from the checkpoint: give no --map, --from, --to or depths");
    let text: string;
    try {
      text = readFileSync(o.resume, "utf8");
    } catch (e) {
      throw new UsageError(`cannot read ${o.resume}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
    }
    const c = readCheckpoint(text);
    req = c.request;
    resumed = c;
    done = c.done;
    checkpointPath ??= o.resume;
  } else req = request(o, mapOption(o.map));
  const plan = planVerify(req); // checks the request before anything is opened
  if (resumed && (plan.key !== resumed.key || plan.blocks.length !== resumed.blocks))
    throw new UsageError(`${o.resume} was written by another plan or build of glidepath: it cannot be resumed here`);
  const sieveFile =
    o.sieveTable === undefined ? null : readTableFile("--sieve-table", o.sieveTable, "glidepath class table", req.map, plan.sieveDepth);
  const stepFile =
    o.stepTable === undefined ? null : readTableFile("--step-table", o.stepTable, "glidepath step table", req.map, plan.stepDepth);
  if ((sieveFile || stepFile) && plan.engine !== "kernel") throw new UsageError("table files are for the kernel path (r > 0, n < 2^64)");
  const workers = workersOption(o.workers);
  const out = outputOption<"raw">({ ...o, format: undefined }, ["raw"], "raw");
  const stamp = await toolStamp();
  const started = new Date().toISOString();
  let hashes: TableHashes | null = null;
  const result = await withPool(
    workers,
    `verify ${req.map.name}`,
    async (pool, onProgress) => {
      const tables = plan.engine === "kernel" ? await verifyTables(pool, plan) : undefined;
      const h = tables ? await tableHashes(tables, sha256) : null;
      hashes = h;
      // the files must hold exactly the tables of this run (equal hashes of equal-length raw files)
      if (sieveFile && h && sieveFile.sha256 !== h.sieve.sha256)
        throw new UsageError(`--sieve-table ${sieveFile.path} is not the depth-${plan.sieveDepth} sieve table of ${req.map.name}`);
      if (stepFile && h && stepFile.sha256 !== h.steps.sha256)
        throw new UsageError(`--step-table ${stepFile.path} is not the depth-${plan.stepDepth} step table of ${req.map.name}`);
      return runVerify(pool, req, {
        tables,
        done,
        onProgress,
        onBlock: async (res) => {
          done.set(res.index, res);
          if (checkpointPath)
            await writeFileAtomic(checkpointPath, `${toExactJson(checkpoint(req, plan.key, plan.blocks.length, done))}\n`);
        },
      });
    },
    "numbers",
  );
  if (out) {
    const cert = certificate(result, hashes, stamp, { started, finished: new Date().toISOString(), workers });
    await writeFileAtomic(out.path, `${toExactJson(cert, 2)}\n`);
  }
  print(o.json ? `${toExactJson(verifyJson(result))}\n` : verifyText(result, workers));
  if (out) (o.json ? process.stderr : process.stdout).write(`wrote the certificate to ${out.path}\n`);
  if (checkpointPath && o.resume === undefined)
    (o.json ? process.stderr : process.stdout).write(`checkpoint: ${checkpointPath} (complete)\n`);
}

function verifyText(r: VerifyResult, workers: number): string {
  const c = r.counts;
  const rate = Number(c.numbers) / Math.max(r.seconds, 1e-9);
  const lines = [
    `verification of ${r.map.name} over [${r.from}, ${r.to}): ${group(c.numbers)} numbers, sieve depth ${r.sieveDepth}, table steps of ${r.stepDepth}`,
    `every n reaches a value below n, except the cycle members, cycle entrants and unresolved numbers listed below`,
    "",
    `  sieved (descend at their class's depth)  ${group(c.sieved).padStart(22)}`,
    `  checked (survivors iterated)             ${group(c.checked).padStart(22)}`,
    `  exceptions of the sieve (iterated)       ${group(c.exceptions).padStart(22)}`,
    `  cycle members                            ${group(c.cycleMembers).padStart(22)}`,
    `  enter a cycle of larger numbers          ${group(c.cycleEntrants).padStart(22)}`,
    `  ${`unresolved after ${group(r.maxSteps)} steps`.padEnd(39)}  ${group(c.unresolved).padStart(22)}`,
    "",
    r.maxGlide
      ? `largest glide: ${r.maxGlide.standardSteps} standard steps (${r.maxGlide.steps} steps of T), n = ${r.maxGlide.n}`
      : "largest glide: none (no n in the range descends)",
    r.maxPath ? `largest path: ${r.maxPath.value}, n = ${r.maxPath.n}` : "largest path: none",
    "",
    `glide records (n whose glide beats every smaller n of the range; standard steps): ${r.glideRecords.length}`,
    ...r.glideRecords.slice(0, TEXT_RECORDS).map((g) => `  ${String(g.n).padStart(22)}  ${g.standardSteps}`),
    ...(r.glideRecords.length > TEXT_RECORDS ? [`  ... and ${r.glideRecords.length - TEXT_RECORDS} more (--json lists them all)`] : []),
    `path records: ${r.pathRecords.length}`,
    ...r.pathRecords.slice(0, TEXT_RECORDS).map((p) => `  ${String(p.n).padStart(22)}  ${p.value}`),
    ...(r.pathRecords.length > TEXT_RECORDS ? [`  ... and ${r.pathRecords.length - TEXT_RECORDS} more (--json lists them all)`] : []),
    ...(r.delay
      ? [
          `delay records (n whose steps to reach 1 beat every smaller n of the range; standard steps): ${r.delay.records.length}` +
            `${r.delay.unreached > 0n ? `; ${group(r.delay.unreached)} n do not reach 1 within ${group(r.maxSteps)} steps` : ""}`,
          ...r.delay.records.slice(0, TEXT_RECORDS).map((g) => `  ${String(g.n).padStart(22)}  ${g.standardSteps}`),
          ...(r.delay.records.length > TEXT_RECORDS
            ? [`  ... and ${r.delay.records.length - TEXT_RECORDS} more (--json lists them all)`]
            : []),
        ]
      : []),
    ...(r.cycleMembers.length ? [`cycle members: ${r.cycleMembers.map((m) => `${m.n} (period ${m.period})`).join(", ")}`] : []),
    ...(r.cycleEntrants.length
      ? [
          `entering a cycle: ${r.cycleEntrants
            .slice(0, 20)
            .map((e) => `${e.n} (the cycle of ${e.cycleMin})`)
            .join(", ")}${r.cycleEntrants.length > 20 ? `, ... and ${r.cycleEntrants.length - 20} more` : ""}`,
        ]
      : []),
    ...(r.unresolvedList.length
      ? [
          `unresolved: ${r.unresolvedList.slice(0, 50).join(", ")}${r.unresolvedList.length > 50 ? `, ... and ${r.unresolvedList.length - 50} more` : ""}`,
        ]
      : []),
    "",
    `${r.seconds.toFixed(2)} s, ${group(BigInt(Math.round(rate)))} numbers/s (${plural(workers, "worker")}, ${r.blocks} blocks, ${r.engine} engine` +
      `${r.handoffs > 0n ? `, ${group(r.handoffs)} finished in BigInt` : ""})`,
    "",
  ];
  return lines.join("\n");
}

async function check(o: VerifyOptions): Promise<void> {
  if (o.from !== undefined || o.to !== undefined || o.out !== undefined || o.resume !== undefined || o.checkpoint !== undefined)
    throw new UsageError("--check reads everything from the certificate: give no range, --out or checkpoint");
  let text: string;
  try {
    text = readFileSync(o.check!, "utf8");
  } catch (e) {
    throw new UsageError(`cannot read ${o.check}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
  }
  const c = readCertificate(text);
  const sampleSize = intOption("sample", o.sample, 0, 1_000_000, 1000);
  const span = c.to - c.from;
  const sample: bigint[] = [];
  for (let i = 0; i < sampleSize && span > 0n; i++) sample.push(c.from + (BigInt(`0x${randomBytes(16).toString("hex")}`) % span));
  const report = checkCertificate(c, sample);
  const findings = [...report.findings];
  if (c.tables) {
    const plan = planVerify({ map: c.map, from: c.from, to: c.to, sieveDepth: c.sieveDepth, stepDepth: c.stepDepth, maxSteps: c.maxSteps });
    const hashes = await withPool(workersOption(o.workers), "verify --check tables", async (pool) =>
      tableHashes(await verifyTables(pool, plan), sha256),
    );
    if (hashes.sieve.sha256 !== c.tables.sieve.sha256)
      findings.push(`the sieve table's sha256 is ${hashes.sieve.sha256}, the certificate says ${c.tables.sieve.sha256}`);
    if (hashes.steps.sha256 !== c.tables.steps.sha256)
      findings.push(`the step table's sha256 is ${hashes.steps.sha256}, the certificate says ${c.tables.steps.sha256}`);
  }
  const holds = findings.length === 0;
  if (o.json) print(`${toExactJson({ holds, findings, iterated: report.sampled })}\n`);
  else {
    print(
      holds
        ? `the certificate holds: ${c.map.name} over [${c.from}, ${c.to}); tables rebuilt and their hashes equal; counts add up; ` +
            `${report.sampled} numbers iterated again in BigInt (every record, cycle member and unresolved n, and ${sample.length} at random) agree\n`
        : `the certificate does NOT hold:\n${findings.map((f) => `  ${f}`).join("\n")}\n`,
    );
  }
  if (!holds) throw new Error(`the certificate ${o.check} does not hold`);
}
