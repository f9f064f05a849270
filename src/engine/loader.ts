// The generic kernel loader: compile a module once, instantiate it, read the memory layout the
// kernels export (assembly/layout.ts), reserve regions once per instance, and run an export with a
// flush sink. It knows nothing of any one kernel: each job's adapter (src/jobs/*/kernel.ts) fills its
// tables, calls its export and copies its results out.

/** A kernel export: numbers and u64 values (as BigInt) in, a u64 or a number out. */
type KernelFunction = (...args: (number | bigint)[]) => number | bigint;

/** Receives the chunks a kernel streams: `count` entries are ready in the channel's region. */
export type FlushSink = (channel: number, count: number) => void;

const moduleCache = new Map<string, Promise<WebAssembly.Module>>();

/** Compiles wasm bytes once per key. @example await compileKernel("release", bytes) */
export function compileKernel(key: string, bytes: BufferSource): Promise<WebAssembly.Module> {
  let mod = moduleCache.get(key);
  if (!mod) {
    mod = WebAssembly.compile(bytes);
    moduleCache.set(key, mod);
  }
  return mod;
}

/**
 * One instance of the kernel module.
 * @example const k = await Kernel.instantiate(module); const at = k.region("leaves", k.layout("LEAF_BYTES"));
 */
export class Kernel {
  private sink: FlushSink | null = null;
  private readonly regions = new Map<string, { at: number; bytes: number }>();
  private readonly written = new Map<string, string>();

  private constructor(
    private readonly exports: WebAssembly.Exports,
    private readonly constants: ReadonlyMap<string, number>,
  ) {}

  static async instantiate(module: WebAssembly.Module): Promise<Kernel> {
    let self: Kernel | null = null;
    const imports = {
      env: {
        flush: (channel: number, count: number) => self?.sink?.(channel, count),
        abort: (_msg: number, _file: number, line: number, col: number) => {
          throw new Error(`kernel assertion failed at line ${line}:${col}`);
        },
      },
    };
    const instance = await WebAssembly.instantiate(module, imports);
    const constants = new Map<string, number>();
    for (const e of WebAssembly.Module.exports(module)) {
      const g = instance.exports[e.name];
      if (e.kind === "global" && g instanceof WebAssembly.Global) constants.set(e.name, Number(g.value));
    }
    self = new Kernel(instance.exports, constants);
    return self;
  }

  /** A value of the shared layout (assembly/layout.ts); a missing name is a build mismatch. */
  layout(name: string): number {
    const v = this.constants.get(name);
    if (v === undefined) throw new Error(`kernel build has no layout value ${name}: rebuild (npm run build)`);
    return v;
  }

  /** The instance's memory as it is now (it can grow: take views after a call, never across one). */
  get memory(): ArrayBuffer {
    return (this.exports.memory as WebAssembly.Memory).buffer;
  }

  /**
   * The address of the region `name`, reserved once per instance, and again (larger) when a later
   * run needs more than it holds (the old space is not reused: sizes stay within a few runs' worth).
   */
  region(name: string, bytes: number): number {
    const had = this.regions.get(name);
    if (had !== undefined && had.bytes >= bytes) return had.at;
    const at = Number(this.fn("reserve")(Math.max(8, bytes)));
    this.regions.set(name, { at, bytes });
    this.written.delete(name);
    return at;
  }

  /** Runs `write` unless the region `name` already holds the tables for `key` (same for every shard of a run). */
  tablesFor(name: string, key: string, write: () => void): void {
    if (this.written.get(name) === key) return;
    write();
    this.written.set(name, key);
  }

  /** Calls an export with `sink` receiving its flushes; the sink is detached however the call ends. */
  call(name: string, args: readonly (number | bigint)[], sink?: FlushSink): number | bigint {
    const f = this.fn(name);
    this.sink = sink ?? null;
    try {
      return f(...args);
    } finally {
      this.sink = null;
    }
  }

  private fn(name: string): KernelFunction {
    const f = this.exports[name];
    if (typeof f !== "function") throw new Error(`kernel build has no export ${name}: rebuild (npm run build)`);
    return f as KernelFunction;
  }
}

let ownInstance: { module: WebAssembly.Module; kernel: Promise<Kernel> } | null = null;

/** This thread's own instance of a module (the top runs of a plan), made once per module. */
export function threadKernel(module: WebAssembly.Module): Promise<Kernel> {
  if (ownInstance?.module !== module) ownInstance = { module, kernel: Kernel.instantiate(module) };
  return ownInstance.kernel;
}

/** Joins chunks of one typed-array kind into one array of that kind. */
export function concat<T extends BigUint64Array | Uint32Array>(parts: T[], make: (length: number) => T): T {
  const out = make(parts.reduce((s, x) => s + x.length, 0));
  let o = 0;
  for (const x of parts) {
    (out as Uint32Array).set(x as Uint32Array, o);
    o += x.length;
  }
  return out;
}

export function concatU64(parts: BigUint64Array[]): BigUint64Array {
  return concat(parts, (n) => new BigUint64Array(n));
}

/** A channel's chunks of entries (ENTRY_WORDS u64 each), copied out of wasm memory as they are flushed. */
export function collector(kernel: Kernel, base: number) {
  const parts: BigUint64Array[] = [];
  const words = kernel.layout("ENTRY_WORDS");
  return {
    take(count: number) {
      parts.push(new BigUint64Array(kernel.memory, base, count * words).slice());
    },
    all: () => concatU64(parts),
  };
}
