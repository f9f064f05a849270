// A class table exported in a worker (the page's CSV and Arrow downloads): the rows' (m, b) come
// from each residue, in BigInt, off the page's main thread.
import type { Remote } from "comlink";
import { makeMap } from "../core/map.js";
import { classFromResidue } from "../core/padic.js";
import type { WorkerApi, WorkerContext } from "../engine/worker.js";
import type { TableExport } from "../jobs/sieve/messages.js";
import { classTableArrow } from "./arrow.js";
import { csvLines } from "./tables.js";
import type { CsvRow } from "./tables.js";

export const exportHandlers = {
  /** A class table export made in a worker: the rows' (m, b) come from each residue, in BigInt. */
  exportTable(_ctx: WorkerContext, req: TableExport): Uint8Array {
    const map = makeMap(req.q, req.r);
    const rows: CsvRow[] = Array.from(req.residues, (a) => {
      const c = classFromResidue(map, BigInt(a), req.depth);
      return { residue: c.residue, odd: c.odd, image: c.image };
    });
    return req.format === "arrow"
      ? classTableArrow(rows, map, req.depth, req.tool)
      : new TextEncoder().encode([...csvLines(rows)].join(""));
  },
};

/** A worker as the page's table export sees it. */
export type ExportApi = Remote<WorkerApi<typeof exportHandlers>>;
