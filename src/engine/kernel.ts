// Loads the AssemblyScript kernels once and wraps their numeric exports in typed calls.
// Isomorphic: the caller supplies the compiled module (Node reads the file, the browser fetches it).
import type { CollatzMap } from "../core/map.js";
import { dropDepth } from "../core/map.js";
import { bitLength, inverseMod2k } from "../core/arith.js";

/** The raw exports of build/{debug,release}.wasm (assembly/index.ts). */
interface KernelExports {
  readonly memory: WebAssembly.Memory;
  reserve(bytes: number): number;
  enumerate(
    q: number, r: number, depth: number, mode: number, prefixBits: number, prefix: bigint,
    tables: number, tallies: number, leaves: number, leavesCap: number, emitLeaves: number,
    exceptions: number, exceptionsCap: number, walkTallies: number,
  ): bigint;
  census(
    q: number, r: number, depth: number, prefixBits: number, prefix: bigint,
    tables: number, tallies: number, channels: number, channelCap: number, vectors: number,
  ): bigint;
  cycleSearch(
    q: number, r: number, depth: number, wide: number, prefixBits: number, prefix: bigint,
    tables: number, dTable: number, candidates: number, candidatesCap: number, walkTallies: number,
  ): bigint;
}

export type Mode = "survivors" | "full";
export const TALLY_STRIDE = 64;
/** Leaves per streamed chunk (fixed size, as the kernel's buffer). */
export const LEAF_CHUNK = 1 << 16;
const EXC_CHUNK = 1 << 10;

/** One shard: every class extending `prefix` mod 2^prefixBits, enumerated to `depth`. */
export interface ShardRequest {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  readonly mode: Mode;
  readonly prefixBits: number;
  readonly prefix: bigint;
  /** Stream the leaves (a, m, b) at `depth`; tallies and exceptions always come back. */
  readonly leaves: boolean;
  /** Only the residues a of the leaves (b and m come back empty): for class tables. */
  readonly residuesOnly?: boolean;
  /**
   * false: tally only levels deeper than prefixBits (the plan counted levels 0..prefixBits in a top
   * run); true: also the ancestors this shard owns, so the 2^prefixBits shards sum to the whole run.
   */
  readonly walkTallies: boolean;
}

/** Leaves in struct-of-arrays form; b holds the raw 64 bits, signed when r < 0; b and m are empty
 * when only residues were asked for. */
export interface LeafChunk {
  readonly a: BigUint64Array;
  readonly b: BigInt64Array | BigUint64Array;
  readonly m: Uint8Array;
}

export interface ShardResult {
  readonly nodes: bigint;
  /** live[j * 64 + m], j = 0..depth: classes at depth j whose coefficient has not dropped below 1. */
  readonly live: BigUint64Array;
  /** stopped[j * 64 + m]: classes whose coefficient q^m / 2^j first drops below 1 at depth j. */
  readonly stopped: BigUint64Array;
  /** Dropping classes with b >= a, 4 entries each: a, b (raw bits), j, m. */
  readonly exceptionClasses: BigUint64Array;
}

/** One shard of the cycle search: every node of depth 1..depth below the prefix is a candidate. */
export interface CycleShard {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  /** Signed 128-bit arithmetic (the host proved 64 bits insufficient and 128 sufficient). */
  readonly wide: boolean;
  readonly prefixBits: number;
  readonly prefix: bigint;
  readonly walkTallies: boolean;
}

export interface CycleShardResult {
  readonly nodes: bigint;
  /** 4 u64 per candidate: a, b low word, b high word (b signed 128-bit), (j << 32) | m. */
  readonly candidates: BigUint64Array;
}

/** One shard of the census: every vector extending the prefix, tallies of assembly/census.ts. */
export interface CensusShard {
  readonly q: number;
  readonly r: number;
  readonly depth: number;
  readonly prefixBits: number;
  readonly prefix: bigint;
  /** Also stream (a, parity vector as bits) for every leaf (the conjugacy permutation). */
  readonly vectors: boolean;
}

export interface CensusShardResult {
  readonly nodes: bigint;
  /** [j * 64 + m], j = 0..depth. */
  readonly live: BigUint64Array;
  readonly stopped: BigUint64Array;
  /** Parents: nodes at depth j < depth with m odd steps (each has two children). */
  readonly vectors: BigUint64Array;
  readonly peak: BigUint64Array;
  /** bins[k + 512]: least members with floor(4 log2(T^K(a)/a)) = k (f64-decided away from edges). */
  readonly bins: BigUint64Array;
  /** [nonpositive images, differing members, early descents, -, then per m the least members
   * a >= 1 binned on the slow path]; the others with m odd steps belong in the bin of the
   * coefficient q^m/2^K (coefficientBins). */
  readonly counts: BigUint64Array;
  /** 4 u64 per entry, (a, b raw bits, -, -): least members whose bin the host decides exactly. */
  readonly ambiguous: BigUint64Array;
  /** 4 u64 per entry, (a, kind, -, -): kind 1 early descent, 2 no descent at the drop. */
  readonly differ: BigUint64Array;
  /** 4 u64 per entry, (member, T^j(member) raw bits, j, -): may hold the largest ratio. */
  readonly ratio: BigUint64Array;
  /** (a, parity vector as bits) as u32 pairs, when asked for (depth <= 32). */
  readonly leafVectors?: Uint32Array;
}

export const BIN_OFFSET = 512;
export const BIN_COUNT = 1024;

export interface KernelInstance {
  /** Runs one shard; leaves go to `onLeaves` chunk by chunk (copies, safe to keep). */
  enumerate(req: ShardRequest, onLeaves?: (chunk: LeafChunk) => void): ShardResult;
  /** Runs one shard of the cycle search. */
  cycles(req: CycleShard): CycleShardResult;
  /** Runs one shard of the census. */
  census(req: CensusShard): CensusShardResult;
}

const moduleCache = new Map<string, Promise<WebAssembly.Module>>();
let ownInstance: { module: WebAssembly.Module; kernel: Promise<KernelInstance> } | null = null;

/** This thread's own instance of a module (the top runs of a plan), made once per module. */
export function threadKernel(module: WebAssembly.Module): Promise<KernelInstance> {
  if (ownInstance?.module !== module) ownInstance = { module, kernel: instantiateKernel(module) };
  return ownInstance.kernel;
}

/** Compiles wasm bytes once per key. @example await compileKernel("release", bytes) */
export function compileKernel(key: string, bytes: BufferSource): Promise<WebAssembly.Module> {
  let mod = moduleCache.get(key);
  if (!mod) {
    mod = WebAssembly.compile(bytes);
    moduleCache.set(key, mod);
  }
  return mod;
}

/** Instantiates a compiled kernel module with its buffers reserved once. */
export async function instantiateKernel(module: WebAssembly.Module): Promise<KernelInstance> {
  let sink: ((channel: number, count: number) => void) | null = null;
  const imports = {
    env: {
      flush: (channel: number, count: number) => sink?.(channel, count),
      abort: (_msg: number, _file: number, line: number, col: number) => {
        throw new Error(`kernel assertion failed at line ${line}:${col}`);
      },
    },
  };
  const instance = await WebAssembly.instantiate(module, imports);
  const k = instance.exports as unknown as KernelExports;
  const tables = k.reserve(768);
  const tallies = k.reserve(2 * TALLY_STRIDE * TALLY_STRIDE * 8);
  const leaves = k.reserve(LEAF_CHUNK * 17);
  const exceptions = k.reserve(EXC_CHUNK * 32);
  const qTables = k.reserve(1024);
  const dTable = k.reserve(TALLY_STRIDE * TALLY_STRIDE * 32);
  let dTableKey = "";
  const censusTables = k.reserve(2048);
  const censusTallies = k.reserve(4 * TALLY_STRIDE * TALLY_STRIDE * 8 + BIN_COUNT * 8 + 68 * 8);
  const censusChannels = k.reserve(4 * EXC_CHUNK * 32 + 1024 * 16 + 64 * 8);
  let censusKey = "";

  return {
    enumerate(req, onLeaves) {
      const { q, r, depth } = req;
      const mem = k.memory.buffer;
      writeDropTables(mem, tables, q, depth);
      const excParts: BigUint64Array[] = [];
      sink = (channel, count) => {
        const buf = k.memory.buffer;
        if (channel === 0) {
          if (!onLeaves) return;
          const n = req.residuesOnly ? 0 : count;
          onLeaves({
            a: new BigUint64Array(buf, leaves, count).slice(),
            b: (r < 0 ? new BigInt64Array(buf, leaves + LEAF_CHUNK * 8, n) : new BigUint64Array(buf, leaves + LEAF_CHUNK * 8, n)).slice(),
            m: new Uint8Array(buf, leaves + LEAF_CHUNK * 16, n).slice(),
          });
        } else {
          excParts.push(new BigUint64Array(buf, exceptions, count * 4).slice());
        }
      };
      try {
        const nodes = k.enumerate(
          q, r, depth, req.mode === "full" ? 1 : 0, req.prefixBits, req.prefix,
          tables, tallies, leaves, LEAF_CHUNK, req.leaves && onLeaves ? 1 : 0, exceptions, EXC_CHUNK, req.walkTallies ? 1 : 0,
        );
        const rows = (depth + 1) * TALLY_STRIDE;
        const buf = k.memory.buffer;
        return {
          nodes: BigInt.asUintN(64, nodes),
          live: new BigUint64Array(buf, tallies, rows).slice(),
          stopped: new BigUint64Array(buf, tallies + TALLY_STRIDE * TALLY_STRIDE * 8, rows).slice(),
          exceptionClasses: concatU64(excParts),
        };
      } finally {
        sink = null;
      }
    },

    census(req) {
      const { q, r, depth } = req;
      const mem = k.memory.buffer;
      if (censusKey !== `${q},${r},${depth}`) {
        // the same for every shard of a run: written once
        writeDropTables(mem, censusTables, q, depth);
        const binMin = new BigUint64Array(mem, censusTables + 768, 64);
        const base = new Int32Array(mem, censusTables + 1280, 64);
        const bins = coefficientBins(q, r, depth);
        binMin.fill((1n << 64n) - 1n);
        base.set(bins.map((x) => x.k));
        binMin.set(bins.map((x) => x.min));
        writeRatioBounds(new Float64Array(mem, censusChannels + 4 * EXC_CHUNK * 32 + 1024 * 16, 64), q, r, depth);
        censusKey = `${q},${r},${depth}`;
      }
      const region = (i: number) => censusChannels + i * EXC_CHUNK * 32;
      const memOf = () => k.memory.buffer;
      const ch = { 3: collector(memOf, region(0)), 4: collector(memOf, region(1)), 5: collector(memOf, region(2)), 0: pairCollector(memOf, region(3)) };
      sink = (channel, count) => ch[channel as 0 | 3 | 4 | 5]?.take(count);
      try {
        const nodes = k.census(q, r, depth, req.prefixBits, req.prefix, censusTables, censusTallies, censusChannels, EXC_CHUNK, req.vectors ? 1 : 0);
        const buf = k.memory.buffer;
        const rows = (depth + 1) * TALLY_STRIDE;
        const table = (i: number) => new BigUint64Array(buf, censusTallies + i * TALLY_STRIDE * TALLY_STRIDE * 8, rows).slice();
        const binsAt = censusTallies + 4 * TALLY_STRIDE * TALLY_STRIDE * 8;
        return {
          nodes: BigInt.asUintN(64, nodes),
          live: table(0), stopped: table(1), vectors: table(2), peak: table(3),
          bins: new BigUint64Array(buf, binsAt, BIN_COUNT).slice(),
          counts: new BigUint64Array(buf, binsAt + BIN_COUNT * 8, 68).slice(),
          ambiguous: ch[3].all(), differ: ch[4].all(), ratio: ch[5].all(),
          ...(req.vectors ? { leafVectors: ch[0].all() } : {}),
        };
      } finally {
        sink = null;
      }
    },

    cycles(req) {
      const { q, r, depth, wide } = req;
      const key = `${q},${depth},${wide}`;
      if (key !== dTableKey) {
        writeCycleTables(k.memory.buffer, qTables, dTable, q, depth, wide ? 128 : 64);
        dTableKey = key;
      }
      const parts: BigUint64Array[] = [];
      sink = (channel, count) => {
        if (channel === 2) parts.push(new BigUint64Array(k.memory.buffer, exceptions, count * 4).slice());
      };
      try {
        const nodes = k.cycleSearch(q, r, depth, wide ? 1 : 0, req.prefixBits, req.prefix, qTables, dTable, exceptions, EXC_CHUNK, req.walkTallies ? 1 : 0);
        return { nodes: BigInt.asUintN(64, nodes), candidates: concatU64(parts) };
      } finally {
        sink = null;
      }
    },
  };
}

/**
 * q^m (u64) at [0, 512) and bitlen(q^m) (i32) at [512, 768) for m <= depth; entries past depth are
 * never read by a kernel (their drop depth is set out of reach all the same).
 */
function writeDropTables(mem: ArrayBuffer, at: number, q: number, depth: number): void {
  const qpow = new BigUint64Array(mem, at, 64);
  const thr = new Int32Array(mem, at + 512, 64).fill(0x7fffffff);
  let p = 1n;
  for (let m = 0; m <= depth; m++) {
    // within the proven width: m <= depth <= kernelDepthLimit
    qpow[m] = BigInt.asUintN(64, p);
    thr[m] = dropDepth(q, m);
    p *= BigInt(q);
  }
}

/** Per m = 0..depth, the bin of the coefficient q^m/2^depth and the fast-path bound (coefficientBin). */
export function coefficientBins(q: number, r: number, depth: number): { k: number; min: bigint }[] {
  return Array.from({ length: depth + 1 }, (_, m) => coefficientBin(q, r, m, depth));
}

function isqrt(n: bigint): bigint {
  if (n < 2n) return n;
  let x = 1n << BigInt(Math.ceil(bitLength(n) / 2));
  for (;;) {
    const y = (x + n / x) >> 1n;
    if (y >= x) return x;
    x = y;
  }
}

/**
 * The quarter-unit bin k of the coefficient q^m/2^K (k = floor(4 log2(q^m / 2^K)), exactly:
 * bitlen(q^(4m)) - 1 - 4K), and a bound `min` such that every least member a > min of a class with
 * m odd steps has T^K(a)/a in bin k. T^K(a)/a = q^m/2^K + c/(2^K a) with c = r S, 0 <= S <= S_max
 * = (q^m - 2^m) 2^(K-m) / (q - 2). For r > 0, b/a only rises above q^m/2^K, and stays below the
 * edge 2^((k+1)/4) while c/a < G = 2^((k+1)/4 + K) - q^m; G is bounded below by the integer 4th root
 * of 2^(k+1+4K) minus q^m (floor(sqrt(floor(sqrt(N)))) = floor(N^(1/4))). For r < 0 the same with
 * the lower edge 2^(k/4). A bound of 2^64 - 1 turns the fast path off for that m.
 */
function coefficientBin(q: number, r: number, m: number, K: number): { k: number; min: bigint } {
  const qm = BigInt(q) ** BigInt(m);
  const k = bitLength(qm ** 4n) - 1 - 4 * K;
  const never = (1n << 64n) - 1n;
  const cMax = (BigInt(Math.abs(r)) * (qm - (1n << BigInt(m))) * (1n << BigInt(K - m)) + BigInt(q - 3)) / BigInt(q - 2) + 1n;
  let gap: bigint;
  if (r > 0) {
    const e = k + 1 + 4 * K;
    if (e < 0) return { k, min: never };
    gap = isqrt(isqrt(1n << BigInt(e))) - qm; // <= the true gap
  } else {
    const e = k + 4 * K;
    if (e < 0) return { k, min: never };
    const root = isqrt(isqrt(1n << BigInt(e)));
    // the true lower edge 2^(e/4) is at most root + 1
    gap = qm - (root + 1n);
  }
  if (gap < 1n) return { k, min: never };
  const min = cMax / gap + 1n;
  return { k, min: min >= never ? never : min };
}

/**
 * bound[m] >= T^j(u)/u for every member u >= 1 of a class with m odd steps at any depth j >= m:
 * T^j(u) = (q^m u + r S) / 2^j with 0 <= S / 2^j <= E(m) = ((q/2)^m - 1) / (q - 2), so the ratio is
 * at most (q/2)^m + max(r, 0) E(m). Rounded up generously (x (1 + 2^-30)): it only lets the kernel
 * skip candidates that cannot win.
 */
function writeRatioBounds(out: Float64Array, q: number, r: number, depth: number): void {
  for (let m = 0; m <= depth; m++) {
    const e = (Math.pow(q / 2, m) - 1) / (q - 2);
    out[m] = (Math.pow(q / 2, m) + Math.max(r, 0) * e) * (1 + 2 ** -30) + 1e-300;
  }
}

/** Channel chunks (4 u64 per entry) copied out of wasm memory. */
function collector(mem: () => ArrayBuffer, base: number) {
  const parts: BigUint64Array[] = [];
  return {
    take(count: number) {
      parts.push(new BigUint64Array(mem(), base, count * 4).slice());
    },
    all: () => concatU64(parts),
  };
}

/** Channel-0 chunks of (a, vector) with both below 2^32, as u32 pairs. */
function pairCollector(mem: () => ArrayBuffer, base: number) {
  const parts: Uint32Array[] = [];
  return {
    take(count: number) {
      const words = new Uint32Array(mem(), base, count * 8);
      const out = new Uint32Array(count * 2);
      for (let i = 0; i < count; i++) {
        out[2 * i] = words[8 * i]!;
        out[2 * i + 1] = words[8 * i + 2]!;
      }
      parts.push(out);
    },
    all: () => concat(parts, (n) => new Uint32Array(n)),
  };
}

/**
 * q^m as two u64 words, and per (j, m) with 1 <= j <= depth the exact divisibility data for
 * |D| = |2^j - q^m| (odd): its inverse mod 2^w and floor((2^w - 1) / |D|), low word then high word.
 */
function writeCycleTables(mem: ArrayBuffer, qTables: number, dTable: number, q: number, depth: number, w: 64 | 128): void {
  const lo = new BigUint64Array(mem, qTables, 64);
  const hi = new BigUint64Array(mem, qTables + 512, 64);
  const d = new BigUint64Array(mem, dTable, TALLY_STRIDE * TALLY_STRIDE * 4);
  const mask64 = (1n << 64n) - 1n;
  const mod = 1n << BigInt(w);
  let p = 1n;
  for (let m = 0; m <= depth; m++) {
    lo[m] = p & mask64;
    hi[m] = (p >> 64n) & mask64;
    p *= BigInt(q);
  }
  for (let j = 1; j <= depth; j++) {
    let qm = 1n;
    for (let m = 0; m <= j; m++) {
      let D = (1n << BigInt(j)) - qm;
      if (D < 0n) D = -D;
      const inv = inverseMod2k(D, w);
      const lim = (mod - 1n) / D;
      const at = ((j << 6) + m) * 4;
      d[at] = inv & mask64;
      d[at + 1] = inv >> 64n;
      d[at + 2] = lim & mask64;
      d[at + 3] = lim >> 64n;
      qm *= BigInt(q);
    }
  }
}

/** Joins chunks of one typed-array kind into one array of that kind. */
function concat<T extends BigUint64Array | Uint32Array>(parts: T[], make: (length: number) => T): T {
  const out = make(parts.reduce((s, x) => s + x.length, 0));
  let o = 0;
  for (const x of parts) {
    (out as Uint32Array).set(x as Uint32Array, o);
    o += x.length;
  }
  return out;
}

function concatU64(parts: BigUint64Array[]): BigUint64Array {
  return concat(parts, (n) => new BigUint64Array(n));
}

export type { CollatzMap };
