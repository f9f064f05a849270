// The command line: dispatch, one-line errors, exit codes (2 usage, 1 run time), signal cleanup.
import { LimitError, UsageError } from "../errors.js";
import { countsCommand, COUNTS_USAGE } from "./counts.js";
import { removePendingFiles } from "./files.js";
import { classCommand, CLASS_USAGE, periodicCommand, PERIODIC_USAGE } from "./inspect.js";
import { sieveCommand, SIEVE_USAGE } from "./sieve.js";
import { stepsCommand, STEPS_USAGE } from "./steps.js";
import { censusCommand, CENSUS_USAGE, conjugacyCommand, CONJUGACY_USAGE, cyclesCommand, CYCLES_USAGE } from "./structure.js";
import { toolVersion } from "./version.js";

const HELP = `glidepath ${"{version}"}: parity vectors, residue-class sieves and 2-adic structure of T(n) = n/2 | (q n + r)/2

  ${SIEVE_USAGE}
      enumerate the classes mod 2^K whose coefficient q^m/2^j has not dropped below 1 (WebAssembly
      kernel in worker threads); report survivors, stopped classes and exceptions; export the table
  ${COUNTS_USAGE}
      the same counts by exact dynamic programming (BigInt), any depth up to 10,000
  ${CLASS_USAGE}
      the class card: residue, parity word, affine form T^k(a + 2^k x) = q^m x + b, stopping times,
      2-adic digits; for a number, its trajectory to the cycle it reaches
  ${PERIODIC_USAGE}
      the 2-adic point whose parity vector is w (or u then w) repeated forever, and its cycle
  ${CENSUS_USAGE}
      all 2^K parity vectors: alive and dropping classes by (j, m), peak coefficients, the distribution
      of log2(T^K(a)/a), least members whose descent differs from the coefficient stopping time
  ${CYCLES_USAGE}
      every integer cycle (positive and negative) of period <= K, complete by construction
  ${CONJUGACY_USAGE}
      cycle structure of the permutation a -> Q_K(a) (the first K parities as a number)
  ${STEPS_USAGE}
      the table (m, b) with T^k(a + 2^k x) = q^m x + b for every a mod 2^k

Maps are written qx+r or qx-r with q odd (3..99) and r odd, |r| < 2^20; the default is 3x+1.
Exit codes: 0 done, 1 failed at run time, 2 bad usage.
`;

export async function main(argv: string[]): Promise<number> {
  for (const sig of ["SIGINT", "SIGTERM"] as const) {
    process.on(sig, () => {
      removePendingFiles();
      process.exit(sig === "SIGINT" ? 130 : 143);
    });
  }
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case "sieve":
        await sieveCommand(rest);
        return 0;
      case "counts":
        countsCommand(rest);
        return 0;
      case "class":
        classCommand(rest);
        return 0;
      case "periodic":
        periodicCommand(rest);
        return 0;
      case "census":
        await censusCommand(rest);
        return 0;
      case "cycles":
        await cyclesCommand(rest);
        return 0;
      case "conjugacy":
        await conjugacyCommand(rest);
        return 0;
      case "steps":
        await stepsCommand(rest);
        return 0;
      case "help":
      case "--help":
      case "-h":
      case undefined:
        process.stdout.write(HELP.replace("{version}", toolVersion()));
        return command === undefined ? 2 : 0;
      case "--version":
        process.stdout.write(toolVersion() + "\n");
        return 0;
      default:
        throw new UsageError(`unknown command "${command}" (try: glidepath help)`);
    }
  } catch (e) {
    const usage = e instanceof UsageError;
    const msg = e instanceof Error ? e.message : String(e);
    process.stderr.write(`glidepath: ${msg.split("\n")[0]}\n`);
    if (!usage && !(e instanceof LimitError) && process.env.GLIDEPATH_DEBUG) process.stderr.write(`${(e as Error).stack}\n`);
    return usage ? 2 : 1;
  }
}
