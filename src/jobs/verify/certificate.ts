// Certificates of verification runs (format version 2), and checkpoints of runs in progress: plain
// JSON with exact integers, written by the CLI and the web app, read back strictly (one line naming
// the field that is wrong) by `verify --check` and `verify --resume`. A certificate carries the
// run's block table, each entry with a digest, and a digest over the whole document.
import { UsageError } from "../../core/errors.js";
import type { CollatzMap } from "../../core/map.js";
import { parseMap } from "../../core/map.js";
import { sha256Hex } from "../../engine/plan.js";
import type { ToolStamp } from "../../engine/messages.js";
import type { FieldCodec } from "../../engine/codec.js";
import { parseExactJson, toExactJson } from "../../core/json.js";
import type { BlockEntry, CycleEntrant, CycleMember, GlideRecord, PathRecord } from "./block.js";
import type { VerifyResult } from "./merge.js";
import type { VerifyRequest } from "./plan.js";
import type { VerifyTableData } from "./tables.js";
import { globalJson, globalRecords, knownJson } from "./known.js";
import type { GlobalRecords, KnownRecords } from "./known.js";

export const CERTIFICATE_KIND = "glidepath verification certificate";
export const CHECKPOINT_KIND = "glidepath verification checkpoint";
/** The certificate format's version: 2 adds the block table and the digests. */
export const CERTIFICATE_VERSION = 2;

/** The hashes of the tables a run used (sha256 of their raw files, as `sieve --out` and `steps --out` write them). */
export interface TableHashes {
  readonly sieve: { readonly rows: number; readonly sha256: string };
  readonly steps: { readonly rows: number; readonly sha256: string };
}

/**
 * The hashes a certificate carries for a run's tables, with the platform's sha256 (hex).
 * @example await tableHashes(data, (b) => createHash("sha256").update(b).digest("hex"))
 */
export async function tableHashes(data: VerifyTableData, sha256: (bytes: Uint8Array) => string | Promise<string>): Promise<TableHashes> {
  return {
    sieve: { rows: data.tables.residues.length, sha256: await sha256(data.sieveBytes) },
    steps: { rows: 2 ** data.tables.stepDepth, sha256: await sha256(data.stepBytes) },
  };
}

const glideJson = (g: GlideRecord) => ({ n: g.n, standardSteps: g.standardSteps, steps: g.steps });
const pathJson = (p: PathRecord) => ({ n: p.n, peakT: p.peakT });
const memberJson = (m: CycleMember) => ({ n: m.n, period: m.period });
const entrantJson = (e: CycleEntrant) => ({ n: e.n, cycleMin: e.cycleMin, period: e.period });

/** A block entry as the block table holds it (without its digest), in a fixed key order. */
export function entryJson(e: BlockEntry) {
  return {
    index: e.index,
    kind: e.kind,
    first: e.first,
    last: e.last,
    counts: {
      checked: e.counts.checked,
      sievedByDepth: e.counts.sievedByDepth,
      exceptions: e.counts.exceptions,
      cycleMembers: e.counts.cycleMembers,
      cycleEntrants: e.counts.cycleEntrants,
      unresolved: e.counts.unresolved,
      // (runs by classes, and blocks that skipped survivors: entries of other runs keep their digests)
      ...(e.kind === "classes" || e.counts.preimage > 0n ? { preimage: e.counts.preimage } : {}),
    },
    glideRecords: e.glideRecords.map(glideJson),
    pathRecords: e.pathRecords.map(pathJson),
    cycleMembers: e.cycleMembers.map(memberJson),
    cycleEntrants: e.cycleEntrants.map(entrantJson),
    unresolved: e.unresolved,
    delay: e.delay && { records: e.delay.records.map(glideJson), unreached: e.delay.unreached, unreachedList: e.delay.unreachedList },
    handoffs: e.handoffs,
  };
}

/** The sha256 (hex) of a value's exact JSON: the digest of an entry or a document (without its own digest). */
export function digestOf(value: unknown): Promise<string> {
  return sha256Hex(toExactJson(value));
}

/** The counts of a run as `--json` and the certificate write them. */
export function verifyCountsJson(r: VerifyResult) {
  const c = r.counts;
  return {
    numbers: c.numbers,
    checked: c.checked,
    sieved: c.sieved,
    sievedByDepth: c.sievedByDepth.flatMap((count, depth) => (count > 0n ? [{ depth, count }] : [])),
    exceptions: c.exceptions,
    cycleMembers: c.cycleMembers,
    cycleEntrants: c.cycleEntrants,
    unresolved: c.unresolved,
    ...(r.method === "classes" || r.skipReached ? { preimage: c.preimage } : {}),
  };
}

/** What a run found, with the key names `--json` and the certificate share. */
export function verifyFindings(r: VerifyResult) {
  return {
    counts: verifyCountsJson(r),
    maxGlide: r.maxGlide && glideJson(r.maxGlide),
    maxPath: r.maxPath && pathJson(r.maxPath),
    glideRecords: r.glideRecords.map(glideJson),
    pathRecords: r.pathRecords.map(pathJson),
    cycleMembers: r.cycleMembers.map(memberJson),
    cycleEntrants: r.cycleEntrants.map(entrantJson),
    unresolved: r.unresolvedList,
    delay: r.delay && {
      records: r.delay.records.map(glideJson),
      max: r.delay.max && glideJson(r.delay.max),
      unreached: r.delay.unreached,
      unreachedList: r.delay.unreachedList,
    },
    handoffs: r.handoffs,
    blockCount: r.entries.length,
  };
}

/**
 * The records known below the range and the range's records new among all n (null and null without
 * known values): the fields `known` and `globalRecords` of `--json` and the certificate.
 */
export function globalFindings(r: Pick<VerifyResult, "glideRecords" | "pathRecords">, known: KnownRecords | null) {
  return { known: known && knownJson(known), globalRecords: known && globalJson(globalRecords(r, known)) };
}

/** The fields of `glidepath verify --json`: the certificate's, less the block table and provenance, plus the time. */
export function verifyJson(r: VerifyResult, known: KnownRecords | null = null) {
  return {
    ...paramsJson(r),
    ...(r.skipReached ? { skipped: SKIP_WORDS } : {}),
    engine: r.engine,
    ...verifyFindings(r),
    ...globalFindings(r, known),
    seconds: Number(r.seconds.toFixed(3)),
  };
}

/** What `--json` says of a run with the skip of slices (README: global records). */
export const SKIP_WORDS =
  "counts.preimage survivors that a smaller number reaches within three steps (every value between above it) were not iterated: maxGlide, maxPath, glideRecords and pathRecords are those among the numbers not skipped; globalRecords, the new records among all n, are exact (no skipped number is one)";

/** The run's parameters as a certificate names them (verify --check compares each with the plan). */
export function paramsJson(
  r: Pick<
    VerifyResult,
    "map" | "from" | "to" | "sieveDepth" | "stepDepth" | "maxSteps" | "blockTarget" | "method" | "preimage" | "skipReached"
  >,
) {
  return {
    map: r.map.name,
    q: r.map.q,
    r: r.map.r,
    from: r.from,
    to: r.to,
    sieveDepth: r.sieveDepth,
    stepDepth: r.stepDepth,
    maxSteps: r.maxSteps,
    blockTarget: r.blockTarget,
    // which sieves ran: the depth-K sieve by periods, or classes settled bit by bit to depth N (and the preimage skip)
    method: r.method,
    preimage: r.preimage,
    // (written only when on: the records are then those among the numbers not skipped)
    ...(r.skipReached ? { skipReached: true } : {}),
  };
}

/**
 * The certificate of a finished run: what was checked, how, what was found, block by block, and by
 * which build, with a digest per block entry and one over the whole document; with `known` (the
 * records below FROM), also those values and the range's records new among all n.
 * @example await certificate(result, hashes, stamp, { started, finished, workers: 2 })
 */
export async function certificate(
  r: VerifyResult,
  tables: TableHashes | null,
  tool: ToolStamp,
  run: { started: string; finished: string; workers: number },
  known: KnownRecords | null = null,
) {
  const blockTable = await Promise.all(
    r.entries.map(async (e) => {
      const body = entryJson(e);
      return { ...body, digest: await digestOf(body) };
    }),
  );
  const body = {
    kind: CERTIFICATE_KIND,
    version: CERTIFICATE_VERSION,
    ...paramsJson(r),
    engine: r.engine,
    tables,
    ...verifyFindings(r),
    ...globalFindings(r, known),
    blockTable,
    tool: { name: "glidepath", ...tool },
    started: run.started,
    finished: run.finished,
    workers: run.workers,
  };
  return { ...body, digest: await digestOf(body) };
}

export type Certificate = Awaited<ReturnType<typeof certificate>>;

/** A checkpoint: the request, its plan key, and every completed block's finished entry. */
export function checkpoint(req: VerifyRequest, key: string, blocks: number, done: ReadonlyMap<number, BlockEntry>) {
  return {
    kind: CHECKPOINT_KIND,
    version: CERTIFICATE_VERSION,
    key,
    request: {
      map: req.map.name,
      from: req.from,
      to: req.to,
      sieveDepth: req.sieveDepth ?? null,
      stepDepth: req.stepDepth,
      maxSteps: req.maxSteps,
      delay: req.delay === true,
      blockTarget: req.blocks ?? null,
      classes: req.classes ?? null,
      preimage: req.preimage ?? null,
      ...(req.skipReached ? { skipReached: true } : {}),
    },
    blocks,
    done: [...done.values()].sort((u, v) => u.index - v.index).map(entryJson),
  };
}

// ---- strict reading: every field checked for its type, one line naming the field that is wrong ----

type Json = Record<string, unknown>;

function field(o: unknown, key: string, path: string): unknown {
  if (o === null || typeof o !== "object" || Array.isArray(o)) throw new UsageError(`${path || "the file"} is not an object`);
  if (!(key in (o as Json))) throw new UsageError(`${path ? `${path}.` : ""}${key} is missing`);
  return (o as Json)[key];
}

const where = (path: string, key: string) => (path ? `${path}.${key}` : key);

function big(o: unknown, key: string, path = "", min = 0n): bigint {
  const v = field(o, key, path);
  if (typeof v !== "bigint") throw new UsageError(`${where(path, key)} must be a whole number written as digits, got ${describe(v)}`);
  if (v < min) throw new UsageError(`${where(path, key)} must be at least ${min}, got ${v}`);
  return v;
}

/** A whole number that may be negative (a map's r). */
function signed(o: unknown, key: string, path = ""): bigint {
  const v = field(o, key, path);
  if (typeof v !== "bigint") throw new UsageError(`${where(path, key)} must be a whole number written as digits, got ${describe(v)}`);
  return v;
}

function boolean(o: unknown, key: string, path = ""): boolean {
  const v = field(o, key, path);
  if (typeof v !== "boolean") throw new UsageError(`${where(path, key)} must be true or false, got ${describe(v)}`);
  return v;
}

/** A field that is null or read by `read`. */
function nullable<T>(o: unknown, key: string, path: string, read: (x: unknown, p: string) => T): T | null {
  const v = field(o, key, path);
  return v === null ? null : read(v, where(path, key));
}

function int(o: unknown, key: string, path = "", min = 0): number {
  const v = big(o, key, path, BigInt(min));
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) throw new UsageError(`${where(path, key)} is too large: ${v}`);
  return Number(v);
}

function text(o: unknown, key: string, path = ""): string {
  const v = field(o, key, path);
  if (typeof v !== "string") throw new UsageError(`${where(path, key)} must be a string, got ${describe(v)}`);
  return v;
}

function list(o: unknown, key: string, path = ""): unknown[] {
  const v = field(o, key, path);
  if (!Array.isArray(v)) throw new UsageError(`${where(path, key)} must be a list, got ${describe(v)}`);
  return v;
}

function bigList(o: unknown, key: string, path = ""): bigint[] {
  return list(o, key, path).map((x, i) => {
    if (typeof x !== "bigint" || x < 0n) throw new UsageError(`${where(path, key)}[${i}] must be a whole number, got ${describe(x)}`);
    return x;
  });
}

function describe(v: unknown): string {
  if (typeof v === "string") return `the string "${v.length > 40 ? `${v.slice(0, 40)}...` : v}"`;
  if (v === null) return "null";
  if (Array.isArray(v)) return "a list";
  if (typeof v === "object") return "an object";
  return `${typeof v} ${String(v)}`;
}

const readGlide = (x: unknown, p: string): GlideRecord => ({
  n: big(x, "n", p, 1n),
  standardSteps: int(x, "standardSteps", p),
  steps: int(x, "steps", p),
});
const readPath = (x: unknown, p: string): PathRecord => ({ n: big(x, "n", p, 1n), peakT: big(x, "peakT", p, 1n) });
const readMember = (x: unknown, p: string): CycleMember => ({ n: big(x, "n", p, 1n), period: int(x, "period", p, 1) });
const readEntrant = (x: unknown, p: string): CycleEntrant => ({
  n: big(x, "n", p, 1n),
  cycleMin: big(x, "cycleMin", p, 1n),
  period: int(x, "period", p, 1),
});

function readList<T>(o: unknown, key: string, path: string, read: (x: unknown, p: string) => T): T[] {
  return list(o, key, path).map((x, i) => read(x, `${where(path, key)}[${i}]`));
}

/** A block entry read back strictly. */
export function readEntry(x: unknown, path: string): BlockEntry {
  const kind = text(x, "kind", path);
  if (kind !== "aligned" && kind !== "range" && kind !== "delay" && kind !== "classes")
    throw new UsageError(`${path}.kind must be aligned, range, delay or classes, got "${kind}"`);
  const c = field(x, "counts", path);
  const cp = `${path}.counts`;
  const d = field(x, "delay", path);
  return {
    index: int(x, "index", path),
    kind,
    first: big(x, "first", path, kind === "classes" ? 0n : 1n),
    last: big(x, "last", path, kind === "classes" ? 0n : 1n),
    counts: {
      checked: big(c, "checked", cp),
      sievedByDepth: bigList(c, "sievedByDepth", cp),
      exceptions: big(c, "exceptions", cp),
      cycleMembers: big(c, "cycleMembers", cp),
      cycleEntrants: big(c, "cycleEntrants", cp),
      unresolved: big(c, "unresolved", cp),
      preimage: kind === "classes" || "preimage" in (c as Json) ? big(c, "preimage", cp) : 0n,
    },
    glideRecords: readList(x, "glideRecords", path, readGlide),
    pathRecords: readList(x, "pathRecords", path, readPath),
    cycleMembers: readList(x, "cycleMembers", path, readMember),
    cycleEntrants: readList(x, "cycleEntrants", path, readEntrant),
    unresolved: bigList(x, "unresolved", path),
    delay:
      d === null
        ? null
        : {
            records: readList(d, "records", `${path}.delay`, readGlide),
            unreached: big(d, "unreached", `${path}.delay`),
            unreachedList: bigList(d, "unreachedList", `${path}.delay`),
          },
    handoffs: big(x, "handoffs", path),
  };
}

function parseDocument(text: string, what: string): Json {
  let j: unknown;
  try {
    j = parseExactJson(text);
  } catch {
    throw new UsageError(`the ${what} is not JSON`);
  }
  if (j === null || typeof j !== "object" || Array.isArray(j)) throw new UsageError(`the ${what} is not a JSON object`);
  return j as Json;
}

/** The skip of slices, a field written only when on: true, or absent. */
function skipReached(j: unknown, path: string): boolean {
  if (!("skipReached" in (j as Json))) return false;
  if ((j as Json).skipReached !== true) throw new UsageError(`${where(path, "skipReached")} must be true or absent`);
  return true;
}

/** The request a checkpoint or certificate names, read strictly. */
function readRequest(j: unknown, path: string, delaySection = false): VerifyRequest {
  const mapText = text(j, "map", path);
  let map: CollatzMap;
  try {
    map = parseMap(mapText);
  } catch {
    throw new UsageError(`${where(path, "map")} is not a map: "${mapText}"`);
  }
  // a checkpoint's request says delay: true or false; a certificate has a delay section or null
  const delay = delaySection ? field(j, "delay", path) !== null : field(j, "delay", path);
  if (typeof delay !== "boolean") throw new UsageError(`${where(path, "delay")} must be true or false`);
  // the method: a certificate names it; a checkpoint keeps the request's choice (null: the default)
  const o = j as Json;
  const bool = (key: string) => {
    const v = o[key] ?? null;
    if (v !== null && typeof v !== "boolean") throw new UsageError(`${where(path, key)} must be true, false or null`);
    return v === null ? undefined : v;
  };
  let classes = bool("classes");
  if ("method" in o) {
    const method = text(j, "method", path);
    if (method !== "classes" && method !== "periods")
      throw new UsageError(`${where(path, "method")} must be classes or periods, got "${method}"`);
    classes = method === "classes";
  }
  return {
    map,
    from: big(j, "from", path, 1n),
    to: big(j, "to", path, 1n),
    classes,
    preimage: bool("preimage"),
    ...(skipReached(j, path) ? { skipReached: true } : {}),
    sieveDepth: classes === true || o.sieveDepth === null ? undefined : int(j, "sieveDepth", path, 1),
    stepDepth: int(j, "stepDepth", path, 1),
    maxSteps: int(j, "maxSteps", path, 1),
    delay,
    blocks: field(j, "blockTarget", path) === null ? undefined : int(j, "blockTarget", path, 1),
  };
}

/** Reads a checkpoint back: the request and the completed blocks. One clear line when it is not one. */
export function readCheckpoint(source: string): { request: VerifyRequest; key: string; blocks: number; done: Map<number, BlockEntry> } {
  const j = parseDocument(source, "checkpoint");
  if (j.kind === CERTIFICATE_KIND) throw new UsageError("this is a certificate of a finished run, not a checkpoint: check it with --check");
  if (j.kind !== CHECKPOINT_KIND) throw new UsageError(`not a glidepath verification checkpoint (kind: ${String(j.kind)})`);
  if (j.version !== BigInt(CERTIFICATE_VERSION))
    throw new UsageError(`checkpoint version ${String(j.version ?? 1)}: this glidepath resumes version ${CERTIFICATE_VERSION} only`);
  const done = new Map<number, BlockEntry>();
  for (const [i, x] of list(j, "done").entries()) {
    const e = readEntry(x, `done[${i}]`);
    done.set(e.index, e);
  }
  return { request: readRequest(j.request, "request"), key: text(j, "key"), blocks: int(j, "blocks"), done };
}

/** A certificate read back strictly: its parameters, what it states, and its block table with the digests as written. */
export interface ReadCertificate {
  readonly request: VerifyRequest;
  readonly engine: string;
  readonly tables: TableHashes | null;
  /** What it states it found, read strictly (verify --check compares it with the merge of the block table). */
  readonly findings: ReturnType<typeof verifyFindings>;
  /** The records it assumed below FROM, and the new records it claims (null without known values). */
  readonly known: KnownRecords | null;
  readonly globalRecords: GlobalRecords | null;
  /** The document as parsed (exact integers), for the field-by-field comparison and the digest. */
  readonly document: Json;
  readonly entries: BlockEntry[];
  readonly entryDigests: string[];
}

/** The fields of a version 2 certificate, in the order it writes them: any other field is refused. */
const CERTIFICATE_FIELDS = [
  "kind",
  "version",
  "map",
  "q",
  "r",
  "from",
  "to",
  "sieveDepth",
  "stepDepth",
  "maxSteps",
  "blockTarget",
  "method",
  "preimage",
  "engine",
  "tables",
  "counts",
  "maxGlide",
  "maxPath",
  "glideRecords",
  "pathRecords",
  "cycleMembers",
  "cycleEntrants",
  "unresolved",
  "delay",
  "handoffs",
  "blockCount",
  "known",
  "globalRecords",
  "blockTable",
  "tool",
  "started",
  "finished",
  "workers",
  "digest",
] as const;

/** The one field a version 2 certificate writes only when on (after preimage): the skip of slices. */
const OPTIONAL_FIELD = "skipReached";

/** The findings of a certificate read strictly, in the shape verifyFindings writes (compared with the block table's). */
function readFindings(j: Json) {
  const counts = field(j, "counts", "");
  const count = (k: string) => big(counts, k, "counts");
  const d = field(j, "delay", "");
  return {
    counts: {
      numbers: count("numbers"),
      checked: count("checked"),
      sieved: count("sieved"),
      sievedByDepth: readList(counts, "sievedByDepth", "counts", (x, p) => ({ depth: int(x, "depth", p), count: big(x, "count", p) })),
      exceptions: count("exceptions"),
      cycleMembers: count("cycleMembers"),
      cycleEntrants: count("cycleEntrants"),
      unresolved: count("unresolved"),
      ...("preimage" in (counts as Json) ? { preimage: count("preimage") } : {}),
    },
    maxGlide: nullable(j, "maxGlide", "", readGlide),
    maxPath: nullable(j, "maxPath", "", readPath),
    glideRecords: readList(j, "glideRecords", "", readGlide),
    pathRecords: readList(j, "pathRecords", "", readPath),
    cycleMembers: readList(j, "cycleMembers", "", readMember),
    cycleEntrants: readList(j, "cycleEntrants", "", readEntrant),
    unresolved: bigList(j, "unresolved", ""),
    delay:
      d === null
        ? null
        : {
            records: readList(d, "records", "delay", readGlide),
            max: nullable(d, "max", "delay", readGlide),
            unreached: big(d, "unreached", "delay"),
            unreachedList: bigList(d, "unreachedList", "delay"),
          },
    handoffs: big(j, "handoffs"),
    blockCount: int(j, "blockCount"),
  };
}

/** The known values a certificate assumed, read strictly (each n may be null: values given without their n). */
function readKnown(x: unknown, p: string): KnownRecords {
  const g = field(x, "glide", p);
  const h = field(x, "path", p);
  const maybeN = (o: unknown, at: string) => (field(o, "n", at) === null ? null : big(o, "n", at, 1n));
  return {
    below: big(x, "below", p, 1n),
    glide: { n: maybeN(g, `${p}.glide`), standardSteps: int(g, "standardSteps", `${p}.glide`) },
    path: { n: maybeN(h, `${p}.path`), peakT: big(h, "peakT", `${p}.path`) },
    source: text(x, "source", p),
  };
}

/**
 * The known values as a cluster run's plan.json keeps them (so `merge` reports the new records), and
 * back, read as strictly as a certificate's: a value that is not the records known below FROM is an
 * error saying so.
 */
export const knownField: FieldCodec<KnownRecords> = {
  encode: (k) => ({ ...knownJson(k), glide: { n: k.glide.n, standardSteps: BigInt(k.glide.standardSteps) } }),
  decode: (v) => {
    try {
      return readKnown(v, "known");
    } catch (e) {
      throw new Error(`must be the records known below FROM: ${e instanceof Error ? e.message : String(e)}`);
    }
  },
};

/** The new records a certificate claims, read strictly. */
const readGlobal = (x: unknown, p: string): GlobalRecords => ({
  glideRecords: readList(x, "glideRecords", p, readGlide),
  pathRecords: readList(x, "pathRecords", p, readPath),
});

/** Parses a certificate file; one clear line naming the field when it is not one. */
export function readCertificate(source: string): ReadCertificate {
  const j = parseDocument(source, "certificate");
  if (j.kind === CHECKPOINT_KIND) throw new UsageError("this is a checkpoint, not a certificate: finish the run with --resume");
  if (j.kind !== CERTIFICATE_KIND) throw new UsageError(`not a glidepath verification certificate (kind: ${String(j.kind)})`);
  const version = field(j, "version", "");
  if (version !== BigInt(CERTIFICATE_VERSION))
    throw new UsageError(
      `certificate version ${typeof version === "bigint" ? version : describe(version)}: this glidepath checks version ${CERTIFICATE_VERSION} (re-run the range to get one)`,
    );
  for (const k of CERTIFICATE_FIELDS) field(j, k, "");
  const extra = Object.keys(j).find((k) => !(CERTIFICATE_FIELDS as readonly string[]).includes(k) && k !== OPTIONAL_FIELD);
  if (extra !== undefined) throw new UsageError(`${extra} is not a field of a version ${CERTIFICATE_VERSION} certificate`);
  const t = field(j, "tables", "");
  const table = (key: string) => ({
    rows: int(field(t, key, "tables"), "rows", `tables.${key}`),
    sha256: text(field(t, key, "tables"), "sha256", `tables.${key}`),
  });
  const entries: BlockEntry[] = [];
  const entryDigests: string[] = [];
  for (const [i, x] of list(j, "blockTable").entries()) {
    entries.push(readEntry(x, `blockTable[${i}]`));
    entryDigests.push(text(x, "digest", `blockTable[${i}]`));
  }
  text(j, "digest");
  // the parameters: each of its type here, each compared with the plan by --check
  signed(j, "r");
  int(j, "q", "", 1);
  int(j, "sieveDepth", "", 1);
  boolean(j, "preimage");
  // provenance: stated, not re-derivable (the digest covers them)
  const tool = field(j, "tool", "");
  if (text(tool, "name", "tool") !== "glidepath")
    throw new UsageError(`tool.name must be "glidepath", got "${text(tool, "name", "tool")}"`);
  text(tool, "version", "tool");
  text(tool, "kernelBuild", "tool");
  text(j, "started");
  text(j, "finished");
  int(j, "workers", "", 1);
  return {
    request: readRequest(j, "", true),
    engine: text(j, "engine"),
    tables: t === null ? null : { sieve: table("sieve"), steps: table("steps") },
    findings: readFindings(j),
    known: nullable(j, "known", "", readKnown),
    globalRecords: nullable(j, "globalRecords", "", readGlobal),
    document: j,
    entries,
    entryDigests,
  };
}
