// The page's worker count, read from the run view's field: 1 to 16, refused (not clamped) otherwise.
import { $, fieldError } from "./dom.js";

export const MAX_PAGE_WORKERS = 16;

/**
 * The worker count in the field, or null with the reason beside it (and in `message`, the element
 * of the view that asked, when that is another view).
 */
export function readWorkers(message?: string): number | null {
  const text = ($("run-workers") as HTMLInputElement).value.trim();
  const n = Number(text);
  const ok = /^\d+$/.test(text) && n >= 1 && n <= MAX_PAGE_WORKERS;
  const why = ok ? "" : `workers must be a whole number from 1 to ${MAX_PAGE_WORKERS}`;
  fieldError("run-workers", why);
  if (message) $(message).textContent = why && `${why} (set in the Sieve and census view)`;
  return ok ? n : null;
}
