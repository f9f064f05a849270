// A capped list that keeps the smallest entries, whatever order they arrive in (deterministic).

/**
 * Keeps the `limit` entries of least key (ties: the first added); memory stays within 2 * limit.
 * @example const s = new Smallest<bigint>(2, (x) => x); [5n, 1n, 3n].forEach((x) => s.add(x)); s.sorted() // [1n, 3n]
 */
export class Smallest<T> {
  private items: T[] = [];
  private cut: bigint | null = null;

  constructor(
    readonly limit: number,
    private readonly key: (item: T) => bigint,
  ) {}

  add(item: T): void {
    this.items.push(item);
    if (this.items.length >= 2 * this.limit + 64) this.trim();
  }

  /**
   * Entries with a key at or above this can no longer be kept (the limit-th smallest key known so
   * far), or null while fewer than `limit` are known: a caller producing keys in order may stop there.
   */
  bound(): bigint | null {
    return this.cut;
  }

  /** The kept entries, ascending by key. */
  sorted(): T[] {
    this.trim();
    return this.items;
  }

  private trim(): void {
    const k = this.key;
    this.items.sort((u, v) => {
      const a = k(u),
        b = k(v);
      return a < b ? -1 : a > b ? 1 : 0;
    });
    if (this.items.length > this.limit) this.items.length = this.limit;
    if (this.limit > 0 && this.items.length === this.limit) this.cut = k(this.items[this.limit - 1]!);
  }
}
