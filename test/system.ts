// Tests that need a system program (Chromium now, Slurm later): skipped with one line saying what to
// install when it is absent, and failed when it is absent under CI=true, where .ci/run installs it.
import { accessSync, constants } from "node:fs";

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
