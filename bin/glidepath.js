#!/usr/bin/env node
// Runs the compiled command line (lib/ is built by `npm install`, see package.json "prepare").
let cli;
try {
  cli = await import("../lib/cli/main.js");
} catch (e) {
  if (e?.code !== "ERR_MODULE_NOT_FOUND") throw e;
  process.stderr.write("glidepath: the command line is not built yet: run npm install (or npm run build) in the glidepath folder\n");
  process.exit(1);
}
process.exitCode = await cli.main(process.argv.slice(2));
