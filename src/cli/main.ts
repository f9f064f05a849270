// The command line: one table of commands (each in its own file), parsed by commander; one-line
// errors with one exit-code rule (0 done, 1 failed at run time, 2 the request was refused: bad usage
// or beyond a documented limit); help on stdout when asked for; quiet ends on a closed pipe and on
// Ctrl-C or SIGTERM (temporary files removed).
import { Command, CommanderError } from "commander";
import { exitCodeOf } from "../core/errors.js";
import { removePendingFiles } from "../node/files.js";
import { watchStdoutReader } from "../node/pipe.js";
import { toolVersion } from "../node/version.js";
import { censusCommand } from "./census.js";
import { clusterCommands } from "./cluster.js";
import { classCommand } from "./class.js";
import { conjugacyCommand } from "./conjugacy.js";
import { countsCommand } from "./counts.js";
import { cyclesCommand } from "./cycles.js";
import { cycleBoundCommand } from "./cyclebound.js";
import { treeCommand } from "./tree.js";
import { periodicCommand } from "./periodic.js";
import { sieveCommand } from "./sieve.js";
import { stepsCommand } from "./steps.js";
import { verifyCommand } from "./verify.js";
import { interruptLine } from "./print.js";

/** Each entry adds one command (its options, help text and action) to the program. */
const COMMANDS: readonly ((program: Command) => Command)[] = [
  sieveCommand,
  countsCommand,
  classCommand,
  periodicCommand,
  censusCommand,
  cyclesCommand,
  conjugacyCommand,
  stepsCommand,
  verifyCommand,
  cycleBoundCommand,
  treeCommand,
  clusterCommands,
];

const ABOUT = "parity vectors, residue-class sieves and 2-adic structure of T(n) = n/2 | (q n + r)/2";
const FOOTER = `
Maps are written qx+r or qx-r with q odd (3..99) and r odd, |r| < 2^20; the default is 3x+1.
Exit codes: 0 done, 1 failed at run time, 2 the request was refused (bad usage or beyond a limit).
Run glidepath <command> --help for a command's options.`;

function program(): Command {
  const p = new Command("glidepath")
    .description(ABOUT)
    .version(toolVersion(), "--version", "print the version")
    .helpOption("-h, --help", "print this help")
    .helpCommand(false)
    .exitOverride()
    .configureOutput({
      writeOut: (s) => process.stdout.write(s),
      writeErr: (s) => process.stderr.write(s),
      outputError: () => {}, // reported by main() as one line
    })
    .addHelpText("after", FOOTER);
  for (const add of COMMANDS) add(p);
  p.command("help")
    .description("print this help, or a command's")
    .argument("[command]", "the command to explain")
    .action((name: string | undefined) => {
      if (name === undefined) return void p.outputHelp();
      const cmd = p.commands.find((c) => c.name() === name);
      if (!cmd || cmd.name() === "help")
        throw new CommanderError(2, "glidepath.unknownCommand", `unknown command "${name}" (glidepath --help lists them)`);
      cmd.outputHelp();
    });
  return p;
}

let handlersInstalled = false;

/** Ctrl-C, SIGTERM and a closed stdout end the process at once, leaving no partial file. */
function installHandlers(): void {
  if (handlersInstalled) return;
  handlersInstalled = true;
  for (const sig of ["SIGINT", "SIGTERM"] as const) {
    process.on(sig, () => {
      removePendingFiles();
      process.stderr.write(`\nglidepath: ${sig === "SIGINT" ? "interrupted" : "terminated"}; ${interruptLine()}\n`);
      process.exit(sig === "SIGINT" ? 130 : 143);
    });
  }
  // a reader that goes away while the run writes nothing yet (verify | head -1 after the first line)
  watchStdoutReader(() => {
    removePendingFiles();
    process.exit(0);
  });
  process.stdout.on("error", (e: NodeJS.ErrnoException) => {
    if (e.code !== "EPIPE") throw e;
    // the reader (head, less) has gone: stop quietly
    removePendingFiles();
    process.exit(0);
  });
}

/** Runs the command line; resolves to the exit code. */
export async function main(argv: string[]): Promise<number> {
  installHandlers();
  if (argv.length === 0) {
    process.stderr.write("glidepath: usage: glidepath <command> [options]   (glidepath --help lists the commands)\n");
    return 2;
  }
  try {
    await program().parseAsync(argv, { from: "user" });
    return 0;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === "commander.helpDisplayed" || e.code === "commander.version") return 0;
      const msg = e.message.replace(/^error: /, "");
      const cmd = argv.find((a) => !a.startsWith("-"));
      const unknown = e.code === "glidepath.unknownCommand" || e.code === "commander.unknownCommand";
      process.stderr.write(`glidepath: ${msg}${unknown || !cmd ? "" : ` (see glidepath ${cmd} --help)`}\n`);
      return 2;
    }
    const msg = e instanceof Error ? e.message : String(e);
    process.stderr.write(`glidepath: ${msg.split("\n")[0]}\n`);
    if (exitCodeOf(e) === 1 && process.env.GLIDEPATH_DEBUG) process.stderr.write(`${(e as Error).stack}\n`);
    return exitCodeOf(e);
  }
}
