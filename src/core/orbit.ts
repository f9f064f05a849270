// One orbit in both step conventions: steps of T (n/2, (qn + r)/2) and standard steps (n/2, qn + r),
// with its glide, the step it reaches 1 and its maximum in each. Exact (BigInt); for the page's
// trajectory chart and the path records' standard values.

/** An orbit in one convention: its values from n on, and where its glide, its arrival at 1 and its maximum fall. */
export interface OrbitView {
  readonly values: readonly bigint[];
  /** The first step j >= 1 with a value below n (the glide, or stopping time), or null within the values. */
  readonly glide: number | null;
  /** The first step at which the value is 1 (the delay, or total stopping time), or null within the values. */
  readonly one: number | null;
  /** The largest value and the first step where it is reached. */
  readonly max: bigint;
  readonly maxAt: number;
}

function view(values: readonly bigint[]): OrbitView {
  const n = values[0]!;
  let glide: number | null = null,
    one: number | null = n === 1n ? 0 : null,
    max = n,
    maxAt = 0;
  for (let j = 1; j < values.length; j++) {
    const v = values[j]!;
    if (glide === null && v < n) glide = j;
    if (one === null && v === 1n) one = j;
    if (v > max) {
      max = v;
      maxAt = j;
    }
  }
  return { values, glide, one, max, maxAt };
}

/**
 * An orbit of T (values[j + 1] = T(values[j]), q and r odd) in both conventions. An odd step of T
 * is two standard steps: v -> qv + r -> (qv + r)/2, and qv + r = 2·T(v), so the standard orbit
 * follows from T's values alone, and its maximum is twice T's when that follows an odd step.
 * @example bothConventions([3n, 5n, 8n, 4n, 2n, 1n]).standard.values // [3n, 10n, 5n, 16n, 8n, 4n, 2n, 1n]
 */
export function bothConventions(values: readonly bigint[]): { T: OrbitView; standard: OrbitView } {
  if (values.length === 0) throw new RangeError("an orbit has at least its start");
  const standard: bigint[] = [values[0]!];
  for (let j = 0; j + 1 < values.length; j++) {
    if ((values[j]! & 1n) === 1n) standard.push(2n * values[j + 1]!);
    standard.push(values[j + 1]!);
  }
  return { T: view(values), standard: view(standard) };
}

/**
 * The highest value of n's path in standard steps, from the highest under T (peakT, the path before
 * the descent as a verification records it): a value above n under T follows an odd step, whose
 * standard step went through twice it; a path that never rises above n (n even, or n on a cycle
 * recorded as n itself) peaks at n in both.
 * @example standardPeak(27n, 4616n) // 9232n
 */
export function standardPeak(n: bigint, peakT: bigint): bigint {
  return peakT > n ? 2n * peakT : n;
}
