#!/usr/bin/env node
// Runs the compiled command line (lib/ is built by `npm install`, see package.json "prepare").
import { main } from "../lib/cli/main.js";

process.exitCode = await main(process.argv.slice(2));
