import { readFileSync } from "node:fs";

/** The package version (package.json sits two levels above both src/node and lib/node). */
export function toolVersion(): string {
  const pkg = JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string };
  return pkg.version;
}
