// Tests that need a system program (Chromium now, Slurm later): skipped with one line saying what to
// install when it is absent, and failed when it is absent under CI=true, where .ci/run installs it.
import { execFileSync } from "node:child_process";
import { accessSync, constants, existsSync, readFileSync } from "node:fs";
import { hostname } from "node:os";

/**
 * Whether the program at `path` can be run; logs the skip once when not, and throws under CI.
 * @example const hasChromium = requireProgram("Chromium", "/usr/bin/chromium", "apt-get install -y chromium");
 */
export function requireProgram(name: string, path: string, install: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return true;
  } catch {
    if (process.env.CI === "true") throw new Error(`${name} is missing at ${path} under CI: .ci/run must install it (${install})`);
    console.warn(`skipping the ${name} tests: ${path} is missing (install it with: ${install})`);
    return false;
  }
}

/** The private Slurm's state folder (test/cluster/slurm.sh). */
const SLURM_STATE = process.env.GLIDEPATH_SLURM_STATE ?? "/var/tmp/glidepath-slurm";

/**
 * The environment that points Slurm's commands at the private single-node Slurm that
 * test/cluster/slurm.sh started, or null (the real-Slurm tests are skipped). They run only when
 * asked for (CI=true, or GLIDEPATH_SLURM_TESTS=1), and only against that controller: its pid file
 * names a live slurmctld, and the controller answering on its slurm.conf is this host's, in the
 * test cluster. When asked for and that is not so, they fail with the line that says what to start.
 */
export function privateSlurm(): Record<string, string> | null {
  const asked = process.env.CI === "true" || process.env.GLIDEPATH_SLURM_TESTS === "1";
  const how = "sudo bash test/cluster/slurm.sh start, then GLIDEPATH_SLURM_TESTS=1 npm test (stop it with slurm.sh stop)";
  if (!asked) {
    console.warn(`skipping the real-Slurm tests: they run against a private single-node Slurm only when asked (${how})`);
    return null;
  }
  const conf = `${SLURM_STATE}/slurm.conf`;
  const fail = (why: string): never => {
    throw new Error(`the real-Slurm tests were asked for, but ${why}: ${how}`);
  };
  let pid = "";
  try {
    pid = readFileSync(`${SLURM_STATE}/slurmctld.pid`, "utf8").trim();
  } catch {
    fail(`no private Slurm was started (${SLURM_STATE}/slurmctld.pid is missing)`);
  }
  if (!/^\d+$/.test(pid) || !existsSync(`/proc/${pid}`) || readFileSync(`/proc/${pid}/comm`, "utf8").trim() !== "slurmctld")
    fail(`the private slurmctld (pid ${pid}) is not running`);
  const env = { SLURM_CONF: conf };
  let config = "";
  try {
    config = execFileSync("scontrol", ["show", "config"], { env: { ...process.env, ...env }, encoding: "utf8", timeout: 20_000 });
  } catch (e) {
    fail(`scontrol cannot reach the private controller (${(e as Error).message.split("\n")[0]})`);
  }
  const value = (key: string) => new RegExp(`^${key.replace(/[[\]]/g, "\\$&")}\\s*=\\s*(\\S+)`, "m").exec(config)?.[1];
  const host = hostname().split(".")[0];
  if (value("ClusterName") !== "glidepath-test" || value("SlurmctldHost[0]") !== host || value("SLURM_CONF") !== conf)
    fail(`the controller answering on ${conf} is not the private test cluster on ${host}`);
  return env;
}
