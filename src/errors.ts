/** Bad input from the user: the CLI prints the message alone and exits with code 2. */
export class UsageError extends Error {
  override name = "UsageError";
}

/** A request that is well formed but cannot be carried out exactly (width, memory): exit code 1. */
export class LimitError extends Error {
  override name = "LimitError";
}
