// The workers' side of a run's path bounds (tables.ts): a chunk of probes iterated exactly in BigInt,
// so that the host (a page's main thread) never runs them.
import { makeMap } from "../../core/map.js";
import type { WorkerContext } from "../../engine/worker.js";
import { probePath } from "./tables.js";

/** Consecutive probes of pathBounds, from position `first` of its list. */
export interface ProbeChunk {
  readonly first: number;
  readonly q: number;
  readonly r: number;
  readonly maxSteps: number;
  readonly probes: bigint[];
}

export const boundsHandlers = {
  /** Each probe's path (probePath), in order. */
  verifyProbePaths(_ctx: WorkerContext, c: ProbeChunk): bigint[] {
    const map = makeMap(c.q, c.r);
    return c.probes.map((n) => probePath(map, n, c.maxSteps));
  },
};
