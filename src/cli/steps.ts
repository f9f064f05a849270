// glidepath steps: the k-step acceleration table (m, b) for every residue mod 2^k.
import { basename } from "node:path";
import { UsageError } from "../errors.js";
import { toExactJson } from "../json.js";
import { stepTable, MAX_STEP_DEPTH } from "../steps.js";
import { stepImageOffset, stepManifest } from "../tables.js";
import { stepTableArrow } from "../arrow.js";
import { intOption, mapOption, parseOptions, workersOption } from "./args.js";
import { AtomicFile, writeFileAtomic } from "./files.js";
import { kernelBuildId, withPool } from "./node-kernel.js";
import { toolVersion } from "./version.js";

export const STEPS_USAGE = "glidepath steps [--map 3x+1] --depth k --out FILE [--format raw|arrow] [--workers N]";

export async function stepsCommand(argv: string[]): Promise<void> {
  const o = parseOptions(argv, { map: { type: "string" }, depth: { type: "string" }, out: { type: "string" }, format: { type: "string" }, workers: { type: "string" } });
  const map = mapOption(o.map);
  const depth = intOption("depth", o.depth, 1, MAX_STEP_DEPTH);
  const workers = workersOption(o.workers);
  if (typeof o.out !== "string") throw new UsageError("--out FILE is required");
  const format = o.format === undefined ? (o.out.endsWith(".arrow") ? "arrow" : "raw") : o.format;
  if (format !== "raw" && format !== "arrow") throw new UsageError(`--format must be raw or arrow, got "${String(format)}"`);
  const file = await AtomicFile.create(o.out);
  try {
    const t = await withPool(workers, `steps ${map.name} 2^${depth}`, (pool, onProgress) => stepTable(pool, map, depth, { onProgress }));
    if (format === "arrow") await file.write(stepTableArrow(t));
    else {
      await file.write(t.odd);
      await file.write(new Uint8Array(stepImageOffset(depth) - t.odd.length));
      await file.write(new Uint8Array(t.image.buffer, t.image.byteOffset, t.image.byteLength));
    }
    const sha256 = await file.commit();
    const manifest = stepManifest(map, depth, format, { file: basename(file.path), bytes: file.bytes, sha256 }, { version: toolVersion(), kernelBuild: await kernelBuildId() });
    await writeFileAtomic(`${file.path}.json`, toExactJson(manifest, 2) + "\n");
    process.stdout.write(`step table of ${map.name} for k = ${depth}: ${2 ** depth} residues -> ${file.path} (${format}, manifest ${file.path}.json)\n`);
  } catch (e) {
    await file.abort();
    throw e;
  }
}
