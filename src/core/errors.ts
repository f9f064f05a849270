// The two kinds of refusal. Both mean the request itself cannot be carried out as asked, so the
// command line answers both with one line and exit code 2; anything else thrown is a failure at run
// time (exit code 1).

/** Bad input from the user: malformed values, missing options, unwritable or contradictory outputs. */
export class UsageError extends Error {
  override name = "UsageError";
}

/** A well-formed request beyond a documented limit (exact width, depth, memory). */
export class LimitError extends Error {
  override name = "LimitError";
}

/** The exit code for an error: 2 when the request was refused, 1 when the run failed. */
export function exitCodeOf(e: unknown): 1 | 2 {
  return e instanceof UsageError || e instanceof LimitError ? 2 : 1;
}
