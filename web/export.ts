// Downloads of what a view shows: each file with its manifest (FILE.json, the CLI's manifest:
// outputs/manifest.ts), the formats from src/outputs; here only the buttons and the hand-over.
import type { CollatzMap } from "../src/core/map.js";
import { toExactJson } from "../src/core/json.js";
import { manifest } from "../src/outputs/manifest.js";
import pkg from "../package.json";
import { $, download } from "./dom.js";
import { kernelBuildId, sha256 } from "./engine.js";

export type ExportFormat = "csv" | "json" | "arrow";

const TYPES: Record<ExportFormat, string> = { csv: "text/csv", json: "application/json", arrow: "application/vnd.apache.arrow.file" };

/** One download a view offers: its file (map and parameters in the name), its bytes, its manifest's kind and fields. */
export interface ExportFile {
  readonly format: ExportFormat;
  /** The file's name without its extension, e.g. census-3x+1-16 (the extension is the format's). */
  readonly name: string;
  readonly data: () => string | Uint8Array | Promise<string | Uint8Array>;
  /** The manifest's kind ("glidepath census") and its fields past the common ones (depth, rows...). */
  readonly kind: string;
  readonly map: CollatzMap;
  readonly extra: object;
}

/** A file's name from its parts: map, numbers and words joined by "-" (e.g. verify-3x+1-1-1048576). */
export const fileName = (...parts: (string | number | bigint)[]) => parts.map(String).join("-");

/**
 * Hands a file and its manifest over as two downloads: NAME.EXT and NAME.EXT.json (map, format,
 * bytes, sha256, tool, kernel build, time, and the file's own fields).
 */
export async function exportFile(f: ExportFile): Promise<void> {
  const data = await f.data();
  const bytes = typeof data === "string" ? new TextEncoder().encode(data) : data;
  const file = `${f.name}.${f.format}`;
  const tool = { version: pkg.version, kernelBuild: await kernelBuildId() };
  const m = manifest(f.kind, f.map, f.format, { file, bytes: BigInt(bytes.byteLength), sha256: await sha256(bytes) }, tool, f.extra);
  download(file, [bytes as Uint8Array<ArrayBuffer>], TYPES[f.format]);
  download(`${file}.json`, [`${toExactJson(m, 2)}\n`], "application/json");
}

/**
 * Puts a row of download buttons into the element `id` (replacing those of an earlier result) after
 * `title`: one a format, each named with `what` for screen readers; a failure is said beside them.
 */
export function offerExports(id: string, title: string, what: string, files: readonly ExportFile[]): void {
  const bar = $(id);
  bar.style.cssText = "display:flex;flex-wrap:wrap;gap:6px;align-items:center;margin:6px 0";
  // (no .hint class: in a fitted column a hint takes no width of its own and would wrap word by word)
  const muted = "color:var(--muted);font-size:12px";
  const label = document.createElement("span");
  label.style.cssText = muted;
  label.textContent = `${title}:`;
  const said = document.createElement("span");
  said.style.cssText = muted;
  said.setAttribute("role", "status");
  const buttons = files.map((f) => {
    const b = document.createElement("button");
    b.type = "button";
    b.id = `${id}-${f.format}`;
    b.textContent = f.format === "arrow" ? "Arrow" : f.format.toUpperCase();
    b.setAttribute("aria-label", `Download ${what} as ${b.textContent}, with its manifest`);
    b.addEventListener("click", () => {
      said.textContent = "";
      exportFile(f).then(
        () => {
          said.textContent = `${f.name}.${f.format} and its manifest`;
        },
        (e: unknown) => {
          said.textContent = `The export failed: ${(e as Error).message}`;
        },
      );
    });
    return b;
  });
  bar.replaceChildren(label, ...buttons, said);
}
