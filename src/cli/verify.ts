// glidepath verify: a convergence-verification run over [FROM, TO) on the kernel pool, with its
// record lists, a certificate (--out), checkpoints (--checkpoint, --resume) and --check.
import { randomInt } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { resolve } from "node:path";
import type { Command } from "commander";
import { UsageError } from "../core/errors.js";
import type { CollatzMap } from "../core/map.js";
import { checkpoint, readCertificate, readCheckpoint, verifyJson } from "../jobs/verify/certificate.js";
import type { TableHashes } from "../jobs/verify/certificate.js";
import { checkCertificate } from "../jobs/verify/check.js";
import type { BlockEntry } from "../jobs/verify/block.js";
import type { VerifyResult } from "../jobs/verify/merge.js";
import { verifyClaim } from "../jobs/verify/claim.js";
import { givenKnown, globalRecords, publishedKnown, readKnownFile } from "../jobs/verify/known.js";
import type { KnownRecords } from "../jobs/verify/known.js";
import {
  DEFAULT_MAX_STEPS,
  DEFAULT_SIEVE_DEPTH,
  DEFAULT_STEP_DEPTH,
  MAX_MAX_STEPS,
  MAX_VERIFY_SIEVE_DEPTH,
  MAX_VERIFY_STEP_DEPTH,
} from "../jobs/verify/plan.js";
import type { VerifyPlan, VerifyRequest } from "../jobs/verify/plan.js";
import { certificateText, runVerification, verificationTables } from "../jobs/verify/run.js";
import { planOf, verifyJob } from "../jobs/verify/verify.js";
import type { VerifyParams } from "../jobs/verify/verify.js";
import { parseRange } from "../core/parse.js";
import type { BatchJob } from "./batch.js";
import { group, plural } from "../outputs/format.js";
import { parseExactJson, toExactJson } from "../core/json.js";
import { removeStaleTemporaries, writeFileAtomic } from "../node/files.js";
import { toolStamp, withPool } from "../node/kernel.js";
import { checkWritableTarget, intOption, jobCommand, mapOption, outputOption, readText, sha256, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print, setInterruptNote } from "./print.js";

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
  readonly full?: boolean;
  readonly delay?: boolean;
  readonly stringIntegers?: boolean;
  readonly sieveTable?: string;
  readonly stepTable?: string;
  readonly periods?: boolean;
  readonly preimage?: boolean;
  readonly known?: string;
  readonly knownPublished?: boolean;
  readonly knownGlide?: string;
  readonly knownPath?: string;
  readonly skipReached?: boolean;
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

/**
 * The table files named on the command line (--sieve-table, --step-table), read and checked against
 * their manifests now; the check of the run's tables against them, for when they are built.
 */
function tableFiles(o: VerifyOptions, plan: VerifyPlan): (h: TableHashes) => void {
  const { map } = plan;
  const sieveFile =
    o.sieveTable === undefined ? null : readTableFile("--sieve-table", o.sieveTable, "glidepath class table", map, plan.sieveDepth);
  const stepFile =
    o.stepTable === undefined ? null : readTableFile("--step-table", o.stepTable, "glidepath step table", map, plan.stepDepth);
  if ((sieveFile || stepFile) && plan.engine !== "kernel") throw new UsageError("table files are for the kernel path (n < 2^127)");
  // the files must hold exactly the tables of this run (equal hashes of equal-length raw files)
  return (h) => {
    if (sieveFile && sieveFile.sha256 !== h.sieve.sha256)
      throw new UsageError(`--sieve-table ${sieveFile.path} is not the depth-${plan.sieveDepth} sieve table of ${map.name}`);
    if (stepFile && stepFile.sha256 !== h.steps.sha256)
      throw new UsageError(`--step-table ${stepFile.path} is not the depth-${plan.stepDepth} step table of ${map.name}`);
  };
}

/** Records shown in the text report (all of them are in --json and the certificate). */
const TEXT_RECORDS = 40;

/** The range and its parameters, for `verify` and `batch verify`. */
function rangeOptions(cmd: Command): Command {
  return cmd
    .option("--from <FROM>", "first number (decimal, or sums and differences of powers such as 2^50+2^32, 2^61-1)")
    .option("--to <TO>", "the end of the range, not included")
    .option(
      "--sieve-depth <K>",
      `sieve depth: 1 to ${MAX_VERIFY_SIEVE_DEPTH} (default ${DEFAULT_SIEVE_DEPTH}; a range from 1 or 2^f to 2^N goes class by class to depth N unless given)`,
    )
    .option("--periods", "run a range from 1 or 2^f to 2^N by the sieve's periods too, not class by class")
    .option("--no-preimage", "by classes: iterate every leaf, also those a smaller number's trajectory reaches")
    .option("--step-depth <k>", `table step depth: 1 to ${MAX_VERIFY_STEP_DEPTH} (default ${DEFAULT_STEP_DEPTH})`)
    .option("--delay", "also the delay of every n (steps to reach 1) and its records: each n iterated to the end, slower")
    .option(
      "--max-steps <S>",
      `steps after which a trajectory is reported unresolved (default ${DEFAULT_MAX_STEPS}; at least the sieve depth)`,
    )
    .option(
      "--known <FILE>",
      "the records known below FROM (a JSON file, README: global records): report which records of the range are new among all n",
    )
    .option("--known-published", "the same from the published lists glidepath ships for 3x+1 (OEIS A060412 and A006884)")
    .option("--known-glide <S>", "the largest glide (standard steps) of any n below FROM; with --known-path")
    .option(
      "--known-path <P>",
      "the largest path (highest value under T before the descent) of any n below FROM, written as FROM is; with --known-glide",
    )
    .option(
      "--skip-reached",
      "with known records, by periods, r > 0: skip the survivors a smaller number reaches within three steps (4/9 of them for 3x+1); records are then those among the numbers not skipped, new records among all n stay exact",
    );
}

/** A verification range on a cluster: shards are runs of its blocks; merge --out writes the certificate. */
export const verifyBatch: BatchJob<VerifyParams, VerifyResult> = {
  job: verifyJob,
  options: rangeOptions,
  params: (o: VerifyOptions) => {
    const req = request(o, mapOption(o.map));
    const plan = planOf(req); // checks it (and is the plan the batch lays out)
    const known = knownOption(o, plan.map, plan.from);
    if (plan.skipReached && known === null) throw new UsageError(SKIP_NEEDS_KNOWN);
    return known === null ? req : { ...req, known };
  },
  json: (result, params) => verifyJson(result, params.known ?? null),
  check: { file: "certificate.json", command: (file) => `glidepath verify --check ${file} --full` },
  out: {
    formats: ["raw"],
    what: "the certificate",
    writes: "the certificate, JSON: name it .json",
    async write(pool, result, out, stamp, _tables, span, params) {
      // the merged plan's tables, hashed: the plan is the one the merge read (planOf)
      const { hashes } = await verificationTables(pool, planOf(params), sha256);
      await writeFileAtomic(out.path, await certificateText(result, hashes, stamp, { ...span, workers: pool.size }, params.known ?? null));
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
    .option("--force", "with --checkpoint: overwrite a file that holds an unfinished checkpoint of another run")
    .option("--sieve-table <FILE>", "check the run's sieve table against this raw file (sieve --out) and its manifest")
    .option("--step-table <FILE>", "check the run's step table against this raw file (steps --out) and its manifest")
    .option("--check <FILE>", "re-derive everything a certificate states (digests, block table, tables, listed numbers, sampled blocks)")
    .option("--sample <N>", "with --check: blocks to run again, chosen at random (default 8)")
    .option("--full", "with --check: run every block again")
    .option("--string-integers", "with --json: write integers as strings (for readers that parse numbers as doubles)")
    .action((o: VerifyOptions) => (o.check !== undefined ? check(o) : verify(o)));
}

const SKIP_NEEDS_KNOWN =
  "--skip-reached needs the records known below FROM (--known FILE, --known-published, or --known-glide with --known-path): only the new records among all n survive the skip";

/** The records known below the range (--known FILE, --known-published, or --known-glide with --known-path), or null. */
function knownOption(o: VerifyOptions, map: CollatzMap, from: bigint): KnownRecords | null {
  const given = [o.known !== undefined, o.knownPublished === true, o.knownGlide !== undefined || o.knownPath !== undefined];
  if (given.filter(Boolean).length > 1)
    throw new UsageError("give the records known below FROM one way: --known FILE, --known-published, or --known-glide with --known-path");
  if (o.known !== undefined) return readKnownFile(readText(o.known), o.known, map, from);
  if (o.knownPublished) return publishedKnown(map, from);
  if (o.knownGlide === undefined && o.knownPath === undefined) return null;
  if (o.knownGlide === undefined || o.knownPath === undefined)
    throw new UsageError("--known-glide and --known-path go together: the largest glide and the largest path below FROM");
  return givenKnown(from, o.knownGlide, o.knownPath);
}

function request(o: VerifyOptions, map: CollatzMap): VerifyRequest {
  const { from, to } = parseRange(o.from, o.to, { from: "--from", to: "--to", range: "[FROM, TO)" });
  return {
    map,
    from,
    to,
    // no depth given: the plan chooses (by classes for [1, 2^N), else the default depth)
    sieveDepth:
      o.sieveDepth === undefined ? undefined : intOption("sieve-depth", o.sieveDepth, 1, MAX_VERIFY_SIEVE_DEPTH, DEFAULT_SIEVE_DEPTH),
    stepDepth: intOption("step-depth", o.stepDepth, 1, MAX_VERIFY_STEP_DEPTH, DEFAULT_STEP_DEPTH),
    maxSteps: intOption("max-steps", o.maxSteps, 1, MAX_MAX_STEPS, DEFAULT_MAX_STEPS),
    delay: o.delay === true,
    ...(o.periods === true ? { classes: false } : {}),
    ...(o.preimage === false ? { preimage: false } : {}),
    ...(o.skipReached === true ? { skipReached: true } : {}),
  };
}

/** JSON text, with every integer as a string when asked (jq and JSON.parse read numbers as doubles). */
function jsonText(value: unknown, strings: boolean | undefined): string {
  if (!strings) return toExactJson(value);
  return JSON.stringify(value, (_k, v: unknown) => (typeof v === "bigint" || typeof v === "number" ? String(v) : v));
}

/**
 * The checkpoint file of a new run: a folder, the certificate's own file, or an unfinished
 * checkpoint of another run (without --force) is refused before anything runs.
 */
function checkCheckpointTarget(path: string, key: string, out: string | undefined, force: boolean | undefined): void {
  if (path.trim() === "") throw new UsageError("--checkpoint needs a file name");
  if (out !== undefined && resolve(out) === resolve(path))
    throw new UsageError("--out and --checkpoint name the same file: give each its own");
  checkWritableTarget(path);
  if (!existsSync(path) || force) return;
  let c: ReturnType<typeof readCheckpoint>;
  try {
    c = readCheckpoint(readFileSync(path, "utf8"));
  } catch {
    throw new UsageError(
      `--checkpoint ${path} exists and is not a checkpoint of this glidepath: choose another file, or --force to overwrite it`,
    );
  }
  if (c.done.size >= c.blocks) return; // a finished run's checkpoint: nothing is lost
  if (c.key === key)
    throw new UsageError(`${path} holds this run, unfinished (${c.done.size} of ${c.blocks} blocks): continue it with --resume ${path}`);
  throw new UsageError(
    `${path} holds an unfinished checkpoint of another run (${c.done.size} of ${c.blocks} blocks): choose another file, or --force to overwrite it`,
  );
}

/** The request of a run, new or resumed: a checkpoint's request and its finished blocks, checked against the plan. */
function startOrResume(o: VerifyOptions) {
  if (o.resume === undefined) {
    const req = request(o, mapOption(o.map));
    return { req, plan: planOf(req), done: new Map<number, BlockEntry>(), resumed: false };
  }
  if (
    o.from !== undefined ||
    o.to !== undefined ||
    o.sieveDepth !== undefined ||
    o.stepDepth !== undefined ||
    o.maxSteps !== undefined ||
    o.delay === true ||
    o.periods === true ||
    o.preimage === false ||
    o.skipReached === true ||
    o.map !== "3x+1"
  )
    throw new UsageError("--resume takes the run's options from the checkpoint: give no --map, --from, --to or depths");
  const c = readCheckpoint(readText(o.resume));
  const plan = planOf(c.request);
  if (plan.key !== c.key || plan.blocks.length !== c.blocks)
    throw new UsageError(`${o.resume} was written by another plan or build of glidepath: it cannot be resumed here`);
  for (const e of c.done.values()) {
    const b = plan.blocks[e.index];
    if (!b || b.first !== e.first || b.last !== e.last || b.kind !== e.kind)
      throw new UsageError(`${o.resume}: its block ${e.index} is not the plan's block ${e.index}: it cannot be resumed`);
  }
  return { req: c.request, plan, done: c.done, resumed: true };
}

async function verify(o: VerifyOptions): Promise<void> {
  const { req, plan, done, resumed } = startOrResume(o); // checks the request before anything is opened
  const checkpointPath = o.checkpoint ?? o.resume;
  const out = outputOption<"raw">({ ...o, format: undefined }, ["raw"], "raw", "the certificate, JSON: name it .json");
  if (checkpointPath !== undefined && !(resumed && checkpointPath === o.resume))
    checkCheckpointTarget(checkpointPath, plan.key, out?.path, o.force);
  else if (checkpointPath !== undefined && out && resolve(out.path) === resolve(checkpointPath))
    throw new UsageError("--out and --checkpoint name the same file: give each its own");
  const checkTables = tableFiles(o, plan);
  const known = knownOption(o, plan.map, plan.from);
  if (plan.skipReached && known === null) throw new UsageError(SKIP_NEEDS_KNOWN);
  const workers = workersOption(o.workers);
  const stamp = await toolStamp();
  const started = new Date().toISOString();
  const note = (o.json ? process.stderr : process.stdout).write.bind(o.json ? process.stderr : process.stdout);
  // the temporaries of a killed run (SIGKILL leaves its .NAME.partial-PID-N: no handler ran)
  for (const path of [checkpointPath, out?.path])
    if (path !== undefined)
      for (const name of removeStaleTemporaries(path)) process.stderr.write(`removed ${name}, left by a process that no longer runs\n`);
  if (resumed)
    process.stderr.write(
      `resumed ${o.resume}: ${plural(done.size, "block")} of ${plan.blocks.length} done, ${plural(plan.blocks.length - done.size, "block")} to go\n`,
    );
  // the blocks the checkpoint holds: after the preimage skip's fallback, those of the plan without it
  let checkpointed: ReadonlyMap<number, BlockEntry> = done;
  const resumeLine = () => {
    const held = checkpointed.size;
    if (!checkpointPath || held === 0) return "no checkpoint was written (give --checkpoint FILE to keep a run's progress)";
    return `the checkpoint ${checkpointPath} holds ${plural(held, "block")} of ${plan.blocks.length}; continue with: glidepath verify --resume ${checkpointPath}`;
  };
  setInterruptNote(checkpointPath ? resumeLine : null);
  if (!o.json) print(`${verifyHeader(plan)}\n`); // the first line at once (a reader such as head -1 has it and may go)
  const { result, hashes } = await withPool(
    workers,
    `verify ${req.map.name}`,
    (pool, onProgress) =>
      runVerification(pool, req, sha256, {
        done,
        onProgress,
        onTables: checkTables,
        // the checkpoint holds the blocks of the plan they belong to (run.plan: the fallback's, once it falls back)
        onBlock: async (_entry, run) => {
          checkpointed = run.done;
          if (checkpointPath)
            await writeFileAtomic(
              checkpointPath,
              `${toExactJson(checkpoint(run.request, run.plan.key, run.plan.blocks.length, run.done))}\n`,
            );
        },
      }),
    "numbers",
  );
  setInterruptNote(null);
  // a certificate that cannot be written (a full disk) loses neither the report nor the checkpoint
  let unwritten: Error | null = null;
  if (out) {
    const text = await certificateText(result, hashes, stamp, { started, finished: new Date().toISOString(), workers }, known);
    try {
      await writeFileAtomic(out.path, text);
    } catch (e) {
      unwritten = e instanceof Error ? e : new Error(String(e));
    }
  }
  print(
    o.json
      ? `${jsonText({ ...verifyJson(result, known), ...processJson(result) }, o.stringIntegers)}\n`
      : verifyText(result, workers, known),
  );
  if (out && !unwritten) note(`wrote the certificate to ${out.path}\n`);
  if (checkpointPath) note(`checkpoint: ${checkpointPath} (complete: ${plural(plan.blocks.length, "block")})\n`);
  if (unwritten)
    throw new Error(
      `${unwritten.message.split("\n")[0]}; the certificate was not written${
        checkpointPath
          ? ` (the checkpoint ${checkpointPath} holds the whole run: glidepath verify --resume ${checkpointPath} --out FILE writes it)`
          : " (with --checkpoint FILE a run keeps its blocks, and --resume FILE --out writes the certificate without running again)"
      }`,
    );
}

/** What --json adds to the run's fields: what this process ran, and in how many passes (`seconds` is this process's time). */
function processJson(r: VerifyResult) {
  return {
    blocksRun: r.blocksRun,
    numbersRun: r.numbersRun,
    passes: r.passes,
    firstPassSeconds: r.firstPassSeconds === null ? null : Number(r.firstPassSeconds.toFixed(3)),
  };
}

/** The report's first line, printed before the run starts. */
function verifyHeader(
  p: Pick<VerifyPlan, "map" | "from" | "to" | "sieveDepth" | "stepDepth" | "method" | "preimage" | "skipReached">,
): string {
  const how =
    p.method === "classes"
      ? `classes settled bit by bit to depth ${p.sieveDepth}${p.preimage ? ", leaves with a smaller preimage skipped" : ""}`
      : `sieve depth ${p.sieveDepth}${p.skipReached ? ", survivors a smaller number reaches skipped" : ""}`;
  return `verification of ${p.map.name} over [${p.from}, ${p.to}): ${group(p.to - p.from)} numbers, ${how}, table steps of ${p.stepDepth}`;
}

/** The report's lines on the records known below FROM and the range's records new among all n. */
function globalText(r: VerifyResult, known: KnownRecords): string[] {
  const g = globalRecords(r, known);
  const at = (n: bigint | null) => (n === null ? "" : `, n = ${n}`);
  return [
    `known below ${r.from}: largest glide ${known.glide.standardSteps} standard steps${at(known.glide.n)}; largest path (under T) ${known.path.peakT}${at(known.path.n)}`,
    `  (assumed, not checked by this run: ${known.source})`,
    ...(r.skipReached
      ? [
          `  (exact although ${group(r.counts.preimage)} survivors were skipped: a number a smaller number reaches beats neither the known values nor every smaller n of the range)`,
        ]
      : []),
    `new glide records among all n (beat the known glide and every smaller n of the range; standard steps): ${g.glideRecords.length}`,
    ...g.glideRecords.slice(0, TEXT_RECORDS).map((x) => `  ${String(x.n).padStart(22)}  ${x.standardSteps}`),
    ...(g.glideRecords.length > TEXT_RECORDS ? [`  ... and ${g.glideRecords.length - TEXT_RECORDS} more (--json lists them all)`] : []),
    `new path records among all n (beat the known path and every smaller n of the range; highest value under T): ${g.pathRecords.length}`,
    ...g.pathRecords.slice(0, TEXT_RECORDS).map((x) => `  ${String(x.n).padStart(22)}  ${x.peakT}`),
    ...(g.pathRecords.length > TEXT_RECORDS ? [`  ... and ${g.pathRecords.length - TEXT_RECORDS} more (--json lists them all)`] : []),
  ];
}

/** The report after its first line. */
function verifyText(r: VerifyResult, workers: number, known: KnownRecords | null): string {
  const c = r.counts;
  // with the skip, the range's records and maxima are those of the numbers it iterated
  const among = r.skipReached ? " among the numbers not skipped" : "";
  // what the run proves, from its counts (the page states the same lines)
  const claim = verifyClaim(r);
  const lines = [
    claim.descent,
    claim.claim,
    ...(claim.notProved ? [claim.notProved] : []),
    claim.assumption,
    "",
    `  sieved (descend at their class's depth)  ${group(c.sieved).padStart(22)}`,
    `  checked (survivors iterated)             ${group(c.checked).padStart(22)}`,
    `  exceptions of the sieve (iterated)       ${group(c.exceptions).padStart(22)}`,
    ...(r.method === "classes" || r.skipReached ? [`  reached from a smaller n (skipped)       ${group(c.preimage).padStart(22)}`] : []),
    `  cycle members                            ${group(c.cycleMembers).padStart(22)}`,
    `  enter a cycle of larger numbers          ${group(c.cycleEntrants).padStart(22)}`,
    `  ${`unresolved after ${plural(r.maxSteps, "step")}`.padEnd(39)}  ${group(c.unresolved).padStart(22)}`,
    "",
    r.maxGlide
      ? `largest glide${among}: ${r.maxGlide.standardSteps} standard steps (${r.maxGlide.steps} steps of T), n = ${r.maxGlide.n}`
      : "largest glide: none (no n in the range descends)",
    r.maxPath ? `largest path${among} (highest value under T, steps of T): ${r.maxPath.peakT}, n = ${r.maxPath.n}` : "largest path: none",
    "",
    `glide records${among} (n whose glide beats every smaller n of the range${r.skipReached ? " not skipped" : ""}; standard steps): ${r.glideRecords.length}`,
    ...r.glideRecords.slice(0, TEXT_RECORDS).map((g) => `  ${String(g.n).padStart(22)}  ${g.standardSteps}`),
    ...(r.glideRecords.length > TEXT_RECORDS ? [`  ... and ${r.glideRecords.length - TEXT_RECORDS} more (--json lists them all)`] : []),
    `path records${among} (n whose highest value under T beats every smaller n of the range${r.skipReached ? " not skipped" : ""}): ${r.pathRecords.length}`,
    ...r.pathRecords.slice(0, TEXT_RECORDS).map((p) => `  ${String(p.n).padStart(22)}  ${p.peakT}`),
    ...(r.pathRecords.length > TEXT_RECORDS ? [`  ... and ${r.pathRecords.length - TEXT_RECORDS} more (--json lists them all)`] : []),
    ...(known ? globalText(r, known) : []),
    ...(r.delay
      ? [
          `delay records (n whose steps to reach 1 beat every smaller n of the range; standard steps): ${r.delay.records.length}` +
            `${r.delay.unreached > 0n ? `; ${group(r.delay.unreached)} n do not reach 1 within ${plural(r.maxSteps, "step")}` : ""}`,
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
    timeLine(r, workers),
    "",
  ];
  return lines.join("\n");
}

/**
 * The time of this process and the numbers it ran (after --resume, not the checkpoint's), with their
 * rate; a second pass (the preimage skip's fallback) is named and counted in the time.
 */
function timeLine(r: VerifyResult, workers: number): string {
  const all = r.entries.length;
  const rate = r.blocksRun === 0 ? "" : `, ${group(BigInt(Math.round(Number(r.numbersRun) / Math.max(r.seconds, 1e-9))))} numbers/s`;
  const passes =
    r.passes === 2
      ? r.method === "periods"
        ? ` in two passes (the first, ${r.firstPassSeconds!.toFixed(2)} s with the skip of numbers a smaller number reaches, met a cycle member, a cycle entrant or an unresolved number; the second iterated every survivor)`
        : ` in two passes (the first, ${r.firstPassSeconds!.toFixed(2)} s with the preimage skip, met a cycle entrant or an unresolved number; the second iterated every leaf)`
      : "";
  const held = all - r.blocksRun;
  const part =
    held === 0
      ? ""
      : r.blocksRun === 0
        ? `: the checkpoint held all ${plural(all, "block")}`
        : ` for ${r.blocksRun} of ${plural(all, "block")} (${group(r.numbersRun)} of ${group(r.counts.numbers)} numbers; the checkpoint held the other ${held})`;
  return (
    `${r.seconds.toFixed(2)} s${passes}${part}${rate} (${plural(workers, "worker")}${held === 0 ? `, ${plural(all, "block")}` : ""}, ${r.engine} engine` +
    `${r.handoffs > 0n ? `, ${group(r.handoffs)} finished in BigInt` : ""})`
  );
}

async function check(o: VerifyOptions): Promise<void> {
  if (
    o.from !== undefined ||
    o.to !== undefined ||
    o.out !== undefined ||
    o.resume !== undefined ||
    o.checkpoint !== undefined ||
    o.known !== undefined ||
    o.knownPublished === true ||
    o.knownGlide !== undefined ||
    o.knownPath !== undefined
  )
    throw new UsageError(
      "--check reads everything from the certificate (the known records too): give no range, --out, checkpoint or --known",
    );
  if (o.full && o.sample !== undefined) throw new UsageError("--full runs every block again: give no --sample with it");
  const c = readCertificate(readText(o.check!));
  const sample = intOption("sample", o.sample, 0, 1_000_000, 8);
  const report = await withPool(workersOption(o.workers), "verify --check", (pool) =>
    checkCertificate(c, { pool, sha256, sample, full: o.full, randomBelow: (n) => randomInt(n) }),
  );
  const holds = report.failure === null;
  const { map, from, to } = c.request;
  if (o.json) print(`${toExactJson({ holds, checked: report.checked, failure: report.failure })}\n`);
  else
    print(
      holds
        ? `the certificate holds: ${map.name} over [${from}, ${to})\n${report.checked.map((l) => `  ${l}`).join("\n")}\n`
        : `the certificate does NOT hold: ${report.failure}\n`,
    );
  if (!holds) throw new Error(`the certificate ${o.check} does not hold`); // exit 1
}
