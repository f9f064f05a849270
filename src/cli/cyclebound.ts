// glidepath cycle-bound: what a verification of [1, X) proves about the length of any other cycle.
import { randomInt } from "node:crypto";
import type { Command } from "commander";
import { UsageError } from "../core/errors.js";
import { toExactJson } from "../core/json.js";
import { parseWhole } from "../core/parse.js";
import { MAX_ODD_BOUND } from "../core/cyclebound.js";
import { cycleWidth, MAX_CYCLE_PERIOD, searchCycles } from "../jobs/cycles/cycles.js";
import { certificateLimit, cycleBoundReport, positiveCycles } from "../jobs/cyclebound.js";
import type { KnownCycle } from "../jobs/cyclebound.js";
import { readCertificate } from "../jobs/verify/certificate.js";
import { checkCertificate } from "../jobs/verify/check.js";
import { cycleBoundJson, cycleBoundText } from "../outputs/cyclebound.js";
import { withPool } from "../node/kernel.js";
import { intOption, jobCommand, mapOption, readText, sha256, workersOption } from "./options.js";
import type { RawOptions } from "./options.js";
import { print } from "./print.js";

interface CycleBoundOptions extends RawOptions {
  readonly to?: string;
  readonly certificate?: string;
  readonly maxOdd?: string;
  readonly list?: string;
  readonly maxPeriod?: string;
}

/** The blocks a certificate's check runs again, as verify --check does by default. */
const CHECK_SAMPLE = 8;
const DEFAULT_PERIOD = 27;
const MAX_LIST = 10_000;

export function cycleBoundCommand(program: Command): Command {
  return jobCommand(
    program,
    "cycle-bound",
    "the least length of any other cycle, given every n below X verified (Steiner, Eliahou): exact, from log2 q's continued fraction",
  )
    .option("--to <X>", "every n in [1, X) verified: bound the cycles with every element >= X (digits or sums of powers: 2^40, 2^62+2^60)")
    .option("--certificate <FILE>", "take X from a certificate of [1, X) (verify --out), after verify --check of it (8 blocks run again)")
    .option("--max-odd <M>", "list and count the admissible pairs with at most M odd elements (default: 10 times the least)")
    .option("--list <N>", `how many admissible pairs to list, least m first: 0 to ${MAX_LIST} (default 20)`)
    .option("--max-period <K>", `the known cycles: every cycle of period <= K, from the cycle search (default ${DEFAULT_PERIOD})`)
    .addHelpText(
      "after",
      `
A cycle of T with ℓ elements (steps of T), m of them odd, all >= X satisfies q^m < 2^ℓ <= (q + r/X)^m
(r > 0; for r < 0 the inequalities turn). glidepath finds the least such m and ℓ exactly and states:
any cycle other than those with an element below X has at least that many. It says nothing about
divergent trajectories.

Examples:
  glidepath cycle-bound --to 2^40                   # 3x+1: 17,087,915 elements (Eliahou 1993)
  glidepath cycle-bound --map 3x-1 --to 10^6 --json
  glidepath cycle-bound --certificate cert.json`,
    )
    .action((o: CycleBoundOptions) => cycleBound(o));
}

async function cycleBound(o: CycleBoundOptions): Promise<void> {
  const workers = workersOption(o.workers);
  const list = intOption("list", o.list, 0, MAX_LIST, 20);
  const maxPeriod = intOption("max-period", o.maxPeriod, 1, MAX_CYCLE_PERIOD, DEFAULT_PERIOD);
  const maxOdd = o.maxOdd === undefined ? undefined : parseWhole("--max-odd", o.maxOdd);
  if (maxOdd !== undefined && (maxOdd < 1n || maxOdd > MAX_ODD_BOUND)) throw new UsageError("--max-odd must be from 1 to 2^256");
  if ((o.to === undefined) === (o.certificate === undefined)) throw new UsageError("give either --to X or --certificate FILE");
  let map = mapOption(o.map);
  let X: bigint;
  let known: KnownCycle[] = [];
  let source: Record<string, unknown>;
  let sourceText: string;
  let knownFrom = `every positive cycle of period <= ${maxPeriod}`;
  if (o.certificate !== undefined) {
    const c = readCertificate(readText(o.certificate));
    // (--map defaults to 3x+1: only another map given differs from the certificate's)
    if (map.name !== "3x+1" && map.name !== c.request.map.name)
      throw new UsageError(`--map ${map.name}: the certificate is of ${c.request.map.name} (give no --map with --certificate)`);
    map = c.request.map;
    const limit = certificateLimit(c);
    const report = await withPool(workers, "cycle-bound: verify --check", (pool) =>
      checkCertificate(c, { pool, sha256, sample: CHECK_SAMPLE, randomBelow: (n) => randomInt(n) }),
    );
    if (report.failure !== null) throw new UsageError(`the certificate ${o.certificate} does not hold: ${report.failure}`);
    X = limit.X;
    known = limit.members;
    knownFrom = `the certificate's cycle members, and every positive cycle of period <= ${maxPeriod}`;
    source = { certificate: { file: o.certificate, from: 1n, to: limit.to, unresolved: limit.unresolved, checkedBlocks: CHECK_SAMPLE } };
    sourceText =
      `the certificate ${o.certificate} of [1, ${limit.to}) holds (verify --check, ${CHECK_SAMPLE} blocks run again)` +
      (limit.unresolved !== null ? `; X is its least unresolved number` : "");
  } else {
    X = parseWhole("--to", o.to);
    if (X < 1n) throw new UsageError(`--to must be at least 1, got ${o.to}`);
    source = { to: X };
    sourceText = "given: every n in [1, X) verified";
  }
  try {
    cycleWidth(map, maxPeriod);
  } catch (e) {
    throw new UsageError(`--max-period: ${(e as Error).message}`);
  }
  const search = await withPool(workers, `cycles ${map.name} <= ${maxPeriod}`, (pool, onProgress) =>
    searchCycles(pool, map, maxPeriod, { onProgress }),
  );
  known = [...known, ...positiveCycles(search)];
  const rep = cycleBoundReport(map, X, known, { ...(maxOdd !== undefined ? { maxOdd } : {}), list });
  print(o.json ? `${toExactJson(cycleBoundJson(rep, source))}\n` : cycleBoundText(rep, sourceText, knownFrom));
}
