// The page's worker count, read from the run view's field: 1 to 16, refused (not clamped) otherwise.
import { parseCount } from "../src/core/parse.js";
import { $, parseField } from "./dom.js";

export const MAX_PAGE_WORKERS = 16;

/**
 * The worker count in the field, or null with the reason beside it (and in `message`, the element
 * of the view that asked, when that is another view).
 */
export function readWorkers(message?: string): number | null {
  const n = parseField("run-workers", (t) => parseCount("workers", t, 1, MAX_PAGE_WORKERS));
  const why = n === null ? $("run-workers-error").textContent : "";
  if (message) $(message).textContent = why && `${why} (set in the Sieve and census view)`;
  return n;
}
