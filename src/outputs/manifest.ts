// Manifests: the JSON written beside every output file (FILE.json), saying what the file holds,
// how to read it, its sha256, and the tool and kernel build that wrote it.
import type { CollatzMap } from "../core/map.js";
import { stepImageOffset } from "../jobs/steps.js";
import type { TableFormat } from "./tables.js";

export interface DataFile {
  readonly file: string;
  readonly bytes: bigint;
  readonly sha256: string;
}

import type { ToolStamp } from "../engine/messages.js";
export type { ToolStamp };

/** The fields every manifest carries: what it is, the map, the data file and its hash, the tool. */
export interface ManifestCommon {
  readonly kind: string;
  readonly map: string;
  readonly q: number;
  readonly r: number;
  readonly format: string;
  readonly data: string;
  readonly bytes: bigint;
  readonly sha256: string;
  readonly tool: { readonly name: "glidepath"; readonly version: string; readonly kernelBuild: string };
  readonly created: string;
}

/**
 * A manifest: the common fields, then the job's own (depth, rows, layout...).
 * @example manifest("glidepath census", map, "arrow", data, tool, { depth: 20 })
 */
export function manifest<E extends object>(
  kind: string,
  map: CollatzMap,
  format: string,
  data: DataFile,
  tool: ToolStamp,
  extra: E,
): ManifestCommon & E {
  return {
    kind,
    map: map.name,
    q: map.q,
    r: map.r,
    format,
    data: data.file,
    bytes: data.bytes,
    sha256: data.sha256,
    tool: { name: "glidepath", ...tool },
    created: new Date().toISOString(),
    ...extra,
  };
}

/** The manifest written beside a class table. */
export function tableManifest(map: CollatzMap, depth: number, rows: bigint, format: TableFormat, data: DataFile, tool: ToolStamp) {
  return manifest("glidepath class table", map, format, data, tool, {
    depth,
    rows,
    element: format === "raw" ? (depth <= 32 ? "u32" : "u64") : format,
    byteOrder: format === "raw" ? "little-endian" : null,
  });
}

/** The manifest of a step table; raw layout: odd_steps (u8 per residue), then image (i64 or u64) 8-aligned. */
export function stepManifest(map: CollatzMap, depth: number, format: "raw" | "arrow", data: DataFile, tool: ToolStamp) {
  const rows = 2 ** depth;
  return manifest("glidepath step table", map, format, data, tool, {
    depth,
    rows,
    arrays:
      format === "raw"
        ? [
            { name: "odd_steps", type: "u8", offset: 0, length: rows },
            { name: "image", type: map.r < 0 ? "i64" : "u64", offset: stepImageOffset(depth), length: rows },
          ]
        : null,
    byteOrder: format === "raw" ? "little-endian" : null,
  });
}
