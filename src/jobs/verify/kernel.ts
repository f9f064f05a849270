// The verification kernel's adapter: the run's tables written into a worker's kernel once
// (verifyPrepare), then one block at a time, one typed call per block kind (verifyAligned,
// verifyClasses, verifyRange, verifyDelays), results copied out.
import type { FlushSink, Kernel } from "../../engine/loader.js";
import type { WorkerContext } from "../../engine/worker.js";
import { collector } from "../../engine/loader.js";
import type { VerifyBlock, VerifyBlockResult, VerifyTables } from "./messages.js";
import { writeDropTables } from "../../engine/tables.js";
import { stepImageOffset } from "../steps.js";
import { makeMap } from "../../core/map.js";
import { bigintBlock, finishKernelBlock } from "./block.js";
import { MAX_VERIFY_SIEVE_DEPTH, MAX_VERIFY_STEP_DEPTH } from "./plan.js";
import type { BlockEntry } from "./block.js";

/** Writes the run's tables into the kernel (once per run and worker; `tables.key` names the run). */
export function verifyPrepare(kernel: Kernel, t: VerifyTables): void {
  const L = (name: string) => kernel.layout(name);
  if (L("VERIFY_MAX_DEPTH") !== MAX_VERIFY_SIEVE_DEPTH || L("VERIFY_MAX_STEP_DEPTH") !== MAX_VERIFY_STEP_DEPTH)
    throw new Error("internal error: the kernel's verification depth limits (assembly/layout.ts) are not the host's (plan.ts)");
  const S = t.residues.length;
  const size = 2 ** (t.stepDepth + 1) - 2; // the step tables of depths 1..KS, built by the kernel
  const peakBytes = L("VERIFY_PEAK_BYTES");
  const tables = kernel.region("tables", L("TABLE_BYTES"));
  // residues u32, odd steps u8, images u64, peaks and troughs (u8 i, u8 m)
  const a = kernel.region("verify.residues", Uint32Array.BYTES_PER_ELEMENT * S);
  const m = kernel.region("verify.odd", S);
  const b = kernel.region("verify.image", BigUint64Array.BYTES_PER_ELEMENT * S);
  const peak = kernel.region("verify.peak", peakBytes * S);
  const sm = kernel.region("verify.stepOdd", size);
  const sb = kernel.region("verify.stepImage", BigUint64Array.BYTES_PER_ELEMENT * size);
  const speak = kernel.region("verify.stepPeak", peakBytes * size);
  const trough = kernel.region("verify.stepTrough", peakBytes * 2 ** t.stepDepth);
  kernel.region("verify.counts", L("VERIFY_COUNTS") * 8);
  kernel.region("verify.scratch", L("VERIFY_SCRATCH_BYTES"));
  const slacks = kernel.region("verify.slacks", 8 * t.slacks.length);
  new BigUint64Array(kernel.memory, slacks, t.slacks.length).set(t.slacks);
  const depth = Math.max(t.depth, t.stepDepth);
  kernel.tablesFor("tables", `drop ${t.q} ${depth}`, () => writeDropTables(kernel, tables, t.q, depth));
  new Uint32Array(kernel.memory, a, S).set(t.residues);
  if (t.classes) {
    const c = t.classes;
    new BigUint64Array(kernel.memory, kernel.region("verify.classBounds", 8 * c.bounds.length), c.bounds.length).set(c.bounds);
    new BigUint64Array(kernel.memory, kernel.region("verify.classSlacks", 8 * c.slacks.length), c.slacks.length).set(c.slacks);
    kernel.region("verify.glideMin", L("VERIFY_GLIDE_MIN_BYTES") * c.glideCap);
  }
  // (a run by classes has no sieve table: its depth N only sizes the per-m tables above)
  const sieveDepth = Math.min(t.depth, MAX_VERIFY_SIEVE_DEPTH);
  kernel.call("verifyPrepare", [t.q, t.r, sieveDepth, t.stepDepth, tables, S, a, m, b, peak, sm, sb, speak, trough]);
  sameStepTable(kernel.memory, t, sm, sb);
}

/**
 * The kernel's table of depth KS (odd steps and images, built by verifyPrepare) against the host's
 * (the bytes a certificate hashes, built by the step-table kernel): a run starts only when they are
 * equal entry by entry, so the hash names the table that did the work.
 */
function sameStepTable(memory: ArrayBuffer, t: VerifyTables, sm: number, sb: number): void {
  const rows = 2 ** t.stepDepth;
  const base = rows - 2; // the depth-KS rows follow those of depths 1..KS-1
  const odd = new Uint8Array(memory, sm + base, rows);
  const image = new BigUint64Array(memory, sb + 8 * base, rows);
  const host = new DataView(t.steps.buffer, t.steps.byteOffset, t.steps.byteLength);
  const at = stepImageOffset(t.stepDepth);
  if (t.steps.byteLength !== at + 8 * rows) throw new Error("internal error: the host's step table has the wrong size");
  for (let c = 0; c < rows; c++)
    if (odd[c] !== t.steps[c] || image[c] !== host.getBigUint64(at + 8 * c, true))
      throw new Error(`internal error: the kernel's step table differs from the host's at residue ${c} of depth ${t.stepDepth}`);
}

/**
 * Runs one block and finishes it (handoffs and unresolved n in BigInt): on the kernel with the
 * run's tables, or walked in BigInt on the BigInt engine (no tables).
 */
export function verifyBlockEntry(kernel: Kernel, tables: VerifyTables | null, block: VerifyBlock): BlockEntry {
  const map = makeMap(block.q, block.r);
  if (block.engine === "bigint")
    return bigintBlock({ map, sieveDepth: block.sieveDepth, maxSteps: block.maxSteps, stoppedClasses: [] }, block);
  if (!tables || tables.key !== block.key) throw new Error("internal error: a verification block before its run's tables");
  const raw = verifyBlock(kernel, tables, block);
  const L = (name: string) => kernel.layout(name);
  return finishKernelBlock(
    { map, sieveDepth: tables.depth, maxSteps: block.maxSteps, stoppedClasses: Array.from(tables.stoppedClasses) },
    block,
    raw,
    {
      checked: L("VERIFY_COUNT_CHECKED"),
      exceptions: L("VERIFY_COUNT_EXCEPTIONS"),
      unresolved: L("VERIFY_COUNT_UNRESOLVED"),
      sieved: L("VERIFY_COUNT_SIEVED"),
      preimage: L("VERIFY_COUNT_PREIMAGE"),
    },
  );
}

/** A number below 2^128 as the kernel takes it: its low and high 64-bit words. */
function words(x: bigint): [bigint, bigint] {
  if (x < 0n || x >> 128n !== 0n) throw new Error(`internal error: ${x} is not a 128-bit word pair`);
  return [BigInt.asUintN(64, x), x >> 64n];
}

/** What every block call shares: the map, its limits, the tables and the output regions. */
interface BlockCommon {
  readonly q: number;
  readonly r: number;
  readonly maxSteps: number;
  readonly limitBits: number;
  readonly tables: number;
  readonly counts: number;
  readonly scratch: number;
}

/** verifyAligned (assembly/verify/periods.ts): whole periods h0 <= h < h0 + periods of the depth-K sieve. */
interface AlignedCall extends BlockCommon {
  readonly depth: number;
  readonly stepDepth: number;
  readonly survivors: number;
  readonly h0: bigint;
  readonly periods: bigint;
  readonly exceptions: number;
  readonly exceptionCount: number;
  /** Survivors a smaller number reaches are counted, not walked (README: global records). */
  readonly skipReached: boolean;
  readonly sievedGlide: number;
  readonly sievedPeak: number;
  readonly sievedSlack: bigint;
  readonly survivorSlack: bigint;
  readonly slacks: number;
}

/** verifyClasses (assembly/verify/classes.ts): the roots first..last mod 2^rootDepth settled to depth N. */
interface ClassesCall extends BlockCommon {
  readonly N: number;
  readonly rootDepth: number;
  readonly first: bigint;
  readonly last: bigint;
  readonly from: bigint;
  readonly preimage: boolean;
  readonly stepDepth: number;
  readonly bounds: number;
  readonly classSlacks: number;
  readonly slacks: number;
  readonly glideMin: number;
  readonly glideCap: number;
}

/** verifyRange (assembly/verify/periods.ts): first..last anywhere in the periods of the depth-K sieve. */
interface RangeCall extends Omit<AlignedCall, "h0" | "periods"> {
  readonly first: bigint;
  readonly last: bigint;
}

/** verifyDelays (assembly/verify/delays.ts): every n of first..last to 1. */
interface SpanCall extends BlockCommon {
  /** the table step depth */
  readonly depth: number;
  readonly first: bigint;
  readonly last: bigint;
}

/** The kernel's exports in their argument order, one typed call per block kind. */
const blockCalls = {
  aligned: (kernel: Kernel, a: AlignedCall, sink: FlushSink) =>
    kernel.call(
      "verifyAligned",
      // biome-ignore format: the export's argument order, as assembly/verify/periods.ts declares it
      [a.q, a.r, a.depth, a.stepDepth, a.maxSteps, a.limitBits, a.tables, a.survivors, ...words(a.h0), a.periods,
        a.exceptions, a.exceptionCount, a.sievedGlide, a.sievedPeak, a.sievedSlack, a.survivorSlack, a.slacks, a.counts, a.scratch,
        a.skipReached ? 1 : 0],
      sink,
    ),
  classes: (kernel: Kernel, c: ClassesCall, sink: FlushSink) =>
    kernel.call(
      "verifyClasses",
      // biome-ignore format: the export's argument order, as assembly/verify/classes.ts declares it
      [c.q, c.r, c.N, c.rootDepth, c.first, c.last, c.from, c.preimage ? 1 : 0, c.stepDepth, c.maxSteps, c.limitBits,
        c.tables, c.bounds, c.classSlacks, c.slacks, c.glideMin, c.glideCap, c.counts, c.scratch],
      sink,
    ),
  range: (kernel: Kernel, a: RangeCall, sink: FlushSink) =>
    kernel.call(
      "verifyRange",
      // biome-ignore format: the export's argument order, as assembly/verify/periods.ts declares it
      [a.q, a.r, a.depth, a.stepDepth, a.maxSteps, a.limitBits, a.tables, a.survivors, ...words(a.first), ...words(a.last),
        a.exceptions, a.exceptionCount, a.sievedGlide, a.sievedPeak, a.sievedSlack, a.survivorSlack, a.slacks, a.counts, a.scratch,
        a.skipReached ? 1 : 0],
      sink,
    ),
  delay: (kernel: Kernel, s: SpanCall, sink: FlushSink) =>
    kernel.call(
      "verifyDelays",
      [s.q, s.r, s.depth, s.maxSteps, s.limitBits, s.tables, ...words(s.first), ...words(s.last), s.counts, s.scratch],
      sink,
    ),
};

/** The block's call of its kind, on the run's tables. */
function callBlock(kernel: Kernel, t: VerifyTables, block: VerifyBlock, common: BlockCommon, sink: FlushSink): number | bigint {
  const slacks = kernel.region("verify.slacks", 8 * t.slacks.length);
  const span = { ...common, first: block.first, last: block.last };
  switch (block.kind) {
    case "aligned":
    case "range": {
      const exceptions = kernel.region("verify.exceptions", 8 * Math.max(1, block.exceptions.length));
      new BigUint64Array(kernel.memory, exceptions, block.exceptions.length).set(block.exceptions);
      const sieve = {
        ...common,
        depth: t.depth,
        stepDepth: t.stepDepth,
        survivors: t.residues.length,
        exceptions,
        exceptionCount: block.exceptions.length,
        skipReached: block.skipReached,
        sievedGlide: t.sievedGlide,
        sievedPeak: t.sievedPeak,
        sievedSlack: t.sievedSlack,
        survivorSlack: t.survivorSlack,
        slacks,
      };
      if (block.kind === "range") return blockCalls.range(kernel, { ...sieve, first: block.first, last: block.last }, sink);
      return blockCalls.aligned(kernel, { ...sieve, h0: block.h0, periods: block.periods }, sink);
    }
    case "classes": {
      const c = t.classes;
      if (!c) throw new Error("internal error: a block of classes before its run's class tables");
      const classes: ClassesCall = {
        ...span,
        N: t.depth,
        rootDepth: block.rootDepth,
        from: c.from,
        preimage: c.preimage,
        stepDepth: t.stepDepth,
        bounds: kernel.region("verify.classBounds", 8 * c.bounds.length),
        classSlacks: kernel.region("verify.classSlacks", 8 * c.slacks.length),
        slacks,
        glideMin: kernel.region("verify.glideMin", kernel.layout("VERIFY_GLIDE_MIN_BYTES") * c.glideCap),
        glideCap: c.glideCap,
      };
      return blockCalls.classes(kernel, classes, sink);
    }
    case "delay":
      return blockCalls.delay(kernel, { ...span, depth: t.stepDepth }, sink);
  }
}

/**
 * The channels a block streams, in channel order from CHANNEL_GLIDE_RECORDS (assembly/layout.ts: the
 * kernel's VERIFY_CHANNELS; test/layout.test.ts checks the two agree).
 */
export const VERIFY_CHANNEL_NAMES = [
  "CHANNEL_GLIDE_RECORDS",
  "CHANNEL_PATH_RECORDS",
  "CHANNEL_HANDOFFS",
  "CHANNEL_CYCLE_MEMBERS",
  "CHANNEL_UNRESOLVED",
] as const;

/** Runs one block on tables already prepared: the kernel's raw counters and lists. */
function verifyBlock(kernel: Kernel, t: VerifyTables, block: VerifyBlock): VerifyBlockResult {
  const L = (name: string) => kernel.layout(name);
  const common: BlockCommon = {
    q: t.q,
    r: t.r,
    maxSteps: block.maxSteps,
    limitBits: block.limitBits,
    tables: kernel.region("tables", L("TABLE_BYTES")),
    counts: kernel.region("verify.counts", L("VERIFY_COUNTS") * 8),
    scratch: kernel.region("verify.scratch", L("VERIFY_SCRATCH_BYTES")),
  };
  // channel c streams through its region at (c - CHANNEL_GLIDE_RECORDS) * VERIFY_REGION_BYTES of the scratch
  const region = (channel: number) => common.scratch + (channel - L("CHANNEL_GLIDE_RECORDS")) * L("VERIFY_REGION_BYTES");
  const lists = VERIFY_CHANNEL_NAMES.map((name) => collector(kernel, region(L(name))));
  const sinks = new Map(VERIFY_CHANNEL_NAMES.map((name, i) => [L(name), lists[i]!]));
  const visited = callBlock(kernel, t, block, common, (channel, count) => sinks.get(channel)?.take(count));
  const [glideRecords, pathRecords, handoffs, cycleMembers, unresolved] = lists.map((list) => list.all());
  return {
    index: block.index,
    visited: BigInt.asUintN(64, BigInt(visited)),
    counts: new BigUint64Array(kernel.memory, common.counts, L("VERIFY_COUNTS")).slice(),
    glideRecords: glideRecords!,
    pathRecords: pathRecords!,
    handoffs: handoffs!,
    cycleMembers: cycleMembers!,
    unresolved: unresolved!,
  };
}

/** What verification asks of its workers: a run's tables kept once, then blocks. */
export const verifyHandlers = {
  verifyPrepare(ctx: WorkerContext, tables: VerifyTables): void {
    verifyPrepare(ctx.kernel(), tables);
    ctx.state.set("verify.tables", tables);
  },
  verifyBlock(ctx: WorkerContext, block: VerifyBlock): BlockEntry {
    const tables = (ctx.state.get("verify.tables") as VerifyTables | undefined) ?? null;
    return verifyBlockEntry(ctx.kernel(), tables, block);
  },
};
