// The last range from 1 that the Verify view verified, per map: what other views may state as proved
// (the Cycles view's line on cycle lengths). Only a finished run is noted, never the form's fields.
import type { VerifyResult } from "../src/jobs/verify/merge.js";
import { runLimit } from "../src/jobs/cyclebound.js";

/** X of the last run from 1 of each map (every n below X is verified: its `to`, or its least unresolved n). */
const limits = new Map<string, { X: bigint; to: bigint }>();

/** Notes a finished run (a run not from 1 notes nothing). */
export function noteVerified(r: VerifyResult): void {
  const X = runLimit(r);
  if (X !== null) limits.set(r.map.name, { X, to: r.to });
}

/** The verified limit of the map's last run from 1 in this page, or null. */
export function verifiedLimit(mapName: string): { X: bigint; to: bigint } | null {
  return limits.get(mapName) ?? null;
}
