// A capped list that keeps the smallest entries, whatever order they arrive in (deterministic).

/**
 * Keeps the `limit` entries of least key (ties: the first added); memory stays within 2 * limit.
 * @example const s = new Smallest<bigint>(2, (x) => x); [5n, 1n, 3n].forEach((x) => s.add(x)); s.sorted() // [1n, 3n]
 */
export class Smallest<T> {
  private items: T[] = [];

  constructor(
    readonly limit: number,
    private readonly key: (item: T) => bigint,
  ) {}

  add(item: T): void {
    this.items.push(item);
    if (this.items.length >= 2 * this.limit + 64) this.trim();
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
  }
}
