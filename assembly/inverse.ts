// The inverse tree of N: every n whose trajectory reaches N, walked depth first from roots the host
// gives (the nodes of one inverse depth), with per-depth tallies (layout.ts: INVERSE_*).
// Predecessors of y under T: 2y, and x = (2y - r) / q when that is a positive integer (it is then
// odd: 2y - r is odd). Under the standard map (n/2, q n + r): 2y, and x = (y - r) / q when that is a
// positive odd integer. A child equal to N is not a new node (the cycle through N, if N is on one).
// Width: the host proves every node below 2^62 (max(N, |r|) 2^K), so 2y and 2y - r stay in i64.
import {
  INVERSE_BELOW_N, INVERSE_BELOW_X, INVERSE_LEVELS, INVERSE_MAX, INVERSE_MIN, INVERSE_NODES, INVERSE_ODD, INVERSE_TALLY_BYTES,
  INVERSE_BOUND_BITS, INVERSE_ZERO,
} from "./layout";

let Q: i64 = 0;
let R: i64 = 0;
let K: i32 = 0;
let N: u64 = 0;
let X: u64 = 0;
let standard: bool = false;
let base: usize = 0;

@inline function at(table: i32, j: i32): usize {
  return base + ((<usize>table * <usize>INVERSE_LEVELS + <usize>j) << 3);
}

@inline function bump(table: i32, j: i32): void {
  const p = at(table, j);
  store<u64>(p, load<u64>(p) + 1);
}

/** The odd predecessor of y, or 0 when it has none. */
@inline function oddPredecessor(y: u64): u64 {
  const v = standard ? <i64>y - R : (<i64>y << 1) - R;
  if (v <= 0 || v % Q != 0) return 0;
  const x = <u64>(v / Q);
  return standard && (x & 1) == 0 ? 0 : x;
}

function visit(y: u64, j: i32): void {
  bump(INVERSE_NODES, j);
  const x = oddPredecessor(y);
  const odd = x != 0 && x != N; // an odd predecessor that is a new node
  if (odd) bump(INVERSE_ODD, j);
  if (<i64>y % Q == 0) bump(INVERSE_ZERO, j);
  if (y < N) bump(INVERSE_BELOW_N, j);
  if (y < X) bump(INVERSE_BELOW_X, j);
  const pMin = at(INVERSE_MIN, j);
  if (y < load<u64>(pMin)) store<u64>(pMin, y);
  const pMax = at(INVERSE_MAX, j);
  if (y > load<u64>(pMax)) store<u64>(pMax, y);
  if (j == K) return;
  const even = y << 1;
  if (even != N) visit(even, j + 1);
  if (odd) visit(x, j + 1);
}

/**
 * Walks the subtrees of `count` roots (u64 at `roots`), all at inverse depth `rootDepth`, down to
 * depth `depth`; tallies (INVERSE_TALLY_BYTES) are cleared here. Returns the nodes visited.
 */
export function inverseTree(
  q: u32, r: i32, steps: i32, depth: i32, n: u64, below: u64, rootDepth: i32, roots: usize, count: i32, tallies: usize,
): u64 {
  assert(depth >= rootDepth && depth < INVERSE_LEVELS && rootDepth >= 0 && n > 0);
  Q = <i64>q;
  R = <i64>r;
  K = depth;
  N = n;
  X = below;
  standard = steps != 0;
  base = tallies;
  memory.fill(tallies, 0, INVERSE_TALLY_BYTES);
  memory.fill(at(INVERSE_MIN, 0), 0xff, INVERSE_LEVELS << 3);
  for (let i = 0; i < count; i++) {
    const y = load<u64>(roots + (<usize>i << 3));
    assert(y > 0 && y < (<u64>1 << <u64>INVERSE_BOUND_BITS));
    visit(y, rootDepth);
  }
  let total: u64 = 0;
  for (let j = rootDepth; j <= depth; j++) total += load<u64>(at(INVERSE_NODES, j));
  return total;
}
