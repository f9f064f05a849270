// Global records of a slice: the records known below a range [FROM, TO) (the largest glide and path
// of every n below FROM, and where that comes from) and which records of the range beat them. A
// record of the range beats every smaller n of the range; one that also beats the known values
// beats every n below FROM, so it is a record among all n: a new record. The known values are
// assumed, as the numbers below FROM are by the range's induction; the certificate states them.
// Also the host's copy of the preimage skip's test (README: a number a smaller number's trajectory
// reaches is no new record).
import { LimitError, UsageError } from "../../core/errors.js";
import { parseWhole } from "../../core/parse.js";
import { parseExactJson } from "../../core/json.js";
import type { CollatzMap } from "../../core/map.js";
import { parseMap, step } from "../../core/map.js";
import type { GlideRecord, PathRecord } from "./block.js";
import { DEFAULT_MAX_STEPS } from "./plan.js";
import { A006884, A060412, PUBLISHED_COVER, PUBLISHED_SOURCE } from "./published.js";
import { traceBig } from "./trace.js";

/** The records known below a range: the largest glide and path of every n below `below` (the range's FROM). */
export interface KnownRecords {
  /** Every n below this is covered: the range's FROM. */
  readonly below: bigint;
  /** The largest glide below, in standard steps (0: no n below goes below itself), and its n where known. */
  readonly glide: { readonly n: bigint | null; readonly standardSteps: number };
  /** The largest path below (the highest value under T before the first descent; a cycle's least member: itself), and its n. */
  readonly path: { readonly n: bigint | null; readonly peakT: bigint };
  /** Where the values come from, as the certificate and the report name it. */
  readonly source: string;
}

/** The records of a range that are new among all n: those beating the known values (and, as records of the range, every smaller n of it). */
export interface GlobalRecords {
  readonly glideRecords: GlideRecord[];
  readonly pathRecords: PathRecord[];
}

/**
 * The range's records that beat the known values below FROM (strictly: a tie goes to the smaller n).
 * @example globalRecords({ glideRecords, pathRecords }, known).glideRecords // those with standardSteps > known.glide.standardSteps
 */
export function globalRecords(
  r: { readonly glideRecords: readonly GlideRecord[]; readonly pathRecords: readonly PathRecord[] },
  known: KnownRecords,
): GlobalRecords {
  return {
    glideRecords: r.glideRecords.filter((g) => g.standardSteps > known.glide.standardSteps),
    pathRecords: r.pathRecords.filter((p) => p.peakT > known.path.peakT),
  };
}

/** The known values as `--json` and the certificate write them. */
export function knownJson(k: KnownRecords) {
  return {
    below: k.below,
    glide: { n: k.glide.n, standardSteps: k.glide.standardSteps },
    path: { n: k.path.n, peakT: k.path.peakT },
    source: k.source,
  };
}

/** The new records as `--json` and the certificate write them. */
export function globalJson(g: GlobalRecords) {
  return {
    glideRecords: g.glideRecords.map((x) => ({ n: x.n, standardSteps: x.standardSteps, steps: x.steps })),
    pathRecords: g.pathRecords.map((x) => ({ n: x.n, peakT: x.peakT })),
  };
}

/** n's glide in standard steps and its path (a cycle's least member: n, no glide), by BigInt iteration; null when unresolved. */
export function glideAndPath(
  map: CollatzMap,
  n: bigint,
  maxSteps = DEFAULT_MAX_STEPS,
): { standardSteps: number | null; peakT: bigint } | null {
  const t = traceBig(map, n, maxSteps, 0);
  if (t.outcome === "unresolved") return null;
  return t.outcome === "descent" ? { standardSteps: t.steps + t.odd, peakT: t.path } : { standardSteps: null, peakT: n };
}

/**
 * Why a stated known record's n does not have the stated value (BigInt iteration), or null. `what`
 * names the field in the message.
 */
export function knownMismatch(map: CollatzMap, k: KnownRecords, what: string): string | null {
  if (k.glide.n !== null) {
    if (k.glide.n < 1n || k.glide.n >= k.below) return `${what}.glide.n: ${k.glide.n} is not below ${k.below}`;
    const g = glideAndPath(map, k.glide.n);
    if (g?.standardSteps !== k.glide.standardSteps)
      return `${what}.glide (n = ${k.glide.n}): ${k.glide.standardSteps} standard steps stated; BigInt iteration gives ${g?.standardSteps ?? "no descent"}`;
  }
  if (k.path.n !== null) {
    if (k.path.n < 1n || k.path.n >= k.below) return `${what}.path.n: ${k.path.n} is not below ${k.below}`;
    const p = glideAndPath(map, k.path.n);
    if (p?.peakT !== k.path.peakT) {
      const twice =
        p && k.path.peakT === 2n * p.peakT
          ? " (the stated value is twice it: a standard 3n+1 maximum? peakT is the highest value under T)"
          : "";
      return `${what}.path (n = ${k.path.n}): peakT ${k.path.peakT} stated; BigInt iteration gives ${p?.peakT ?? "no descent"}${twice}`;
    }
  }
  return null;
}

/** The last entry of an ascending list below x, or null. */
function lastBelow(xs: readonly bigint[], x: bigint): bigint | null {
  let found: bigint | null = null;
  for (const v of xs) if (v < x) found = v;
  return found;
}

/**
 * The records below FROM from the shipped lists of 3x+1 (OEIS A060412 and A006884, published.ts):
 * the last glide and path record below FROM, their values by BigInt iteration. Refused for another
 * map and for a FROM beyond what the lists cover.
 * @example publishedKnown(parseMap("3x+1"), 1000n).glide // { n: 703n, standardSteps: 132 }
 */
export function publishedKnown(map: CollatzMap, from: bigint): KnownRecords {
  if (map.q !== 3 || map.r !== 1)
    throw new UsageError(`the published record lists are of 3x+1, not ${map.name}: give --known FILE or --known-glide and --known-path`);
  if (from > PUBLISHED_COVER)
    throw new LimitError(
      `the published record lists glidepath ships cover n up to ${PUBLISHED_COVER - 1n}; FROM = ${from} lies beyond: give --known FILE or --known-glide and --known-path`,
    );
  const g = lastBelow(A060412, from);
  const p = lastBelow(A006884, from);
  const gv = g === null ? null : glideAndPath(map, g)!;
  const pv = p === null ? null : glideAndPath(map, p)!;
  return {
    below: from,
    glide: { n: g, standardSteps: gv?.standardSteps ?? 0 },
    path: { n: p, peakT: pv?.peakT ?? 0n },
    source: `${PUBLISHED_SOURCE}: the last glide record below FROM ${g === null ? "(none)" : `n = ${g}`}, the last path record n = ${p ?? "(none)"}`,
  };
}

/**
 * The records below FROM given as two numbers: the largest glide (standard steps) and the largest
 * path (highest value under T) of every n below FROM.
 * @example givenKnown(1000n, "132", "125252") // below 1000, glide 132, path 125252, no n
 */
export function givenKnown(from: bigint, glide: string, path: string): KnownRecords {
  // the glide is a count of steps (digits); the path a value, written as --from is (2^100, 2^61-1)
  if (!/^\d+$/.test(glide.trim())) throw new UsageError(`--known-glide must be a whole number (0 or more), got "${glide}"`);
  const g = BigInt(glide.trim());
  if (g > BigInt(Number.MAX_SAFE_INTEGER)) throw new UsageError(`--known-glide is too large: ${g} standard steps`);
  return {
    below: from,
    glide: { n: null, standardSteps: Number(g) },
    path: { n: null, peakT: parseWhole("--known-path", path) },
    source: "given on the command line (--known-glide, --known-path)",
  };
}

/** The kind a known-records file names. */
export const KNOWN_KIND = "glidepath known records";

type Json = Record<string, unknown>;

/**
 * A known-records file (README: global records), read strictly: the entry of `map`, checked to
 * cover every n below FROM, its named n iterated again. One line naming what is wrong.
 * @example readKnownFile(text, "known.json", parseMap("3x+1"), 2n ** 40n)
 */
export function readKnownFile(text: string, file: string, map: CollatzMap, from: bigint): KnownRecords {
  const bad = (what: string): never => {
    throw new UsageError(`--known ${file}: ${what}`);
  };
  let j: unknown;
  try {
    j = parseExactJson(text);
  } catch {
    return bad("not JSON");
  }
  const obj = (v: unknown, at: string): Json => {
    if (v === null || typeof v !== "object" || Array.isArray(v)) bad(`${at} must be an object`);
    return v as Json;
  };
  const whole = (o: Json, key: string, at: string, nullable = false): bigint | null => {
    const v = o[key];
    if (v === null && nullable) return null;
    if (typeof v !== "bigint" || v < 0n)
      bad(
        `${at}.${key} must be a whole number written as digits${nullable ? " or null" : ""}, got ${v === undefined ? "nothing" : JSON.stringify(typeof v === "bigint" ? String(v) : v)}`,
      );
    return v as bigint;
  };
  const doc = obj(j, "the file");
  if (doc.kind !== KNOWN_KIND) bad(`kind must be "${KNOWN_KIND}"`);
  if (doc.version !== 1n) bad("version must be 1");
  if (!Array.isArray(doc.records)) bad("records must be a list");
  const entries = (doc.records as unknown[]).map((x, i) => [obj(x, `records[${i}]`), i] as const);
  for (const [e, i] of entries) {
    if (typeof e.map !== "string") bad(`records[${i}].map must be a map such as "3x+1"`);
    try {
      parseMap(e.map as string);
    } catch {
      bad(`records[${i}].map is not a map: "${String(e.map)}"`);
    }
  }
  const mine = entries.filter(([e]) => parseMap(e.map as string).name === map.name);
  if (mine.length === 0)
    bad(`no records of ${map.name} (it has: ${entries.map(([e]) => parseMap(e.map as string).name).join(", ") || "none"})`);
  if (mine.length > 1) bad(`${mine.length} entries of ${map.name}: give one`);
  const [e, i] = mine[0]!;
  const at = `records[${i}]`;
  const below = whole(e, "below", at)!;
  const glide = obj(e.glide, `${at}.glide`);
  const path = obj(e.path, `${at}.path`);
  const steps = whole(glide, "standardSteps", `${at}.glide`)!;
  if (steps > BigInt(Number.MAX_SAFE_INTEGER)) bad(`${at}.glide.standardSteps is too large`);
  if (typeof e.source !== "string" || e.source.trim() === "") bad(`${at}.source must say where the values come from (a string)`);
  const known: KnownRecords = {
    below,
    glide: { n: whole(glide, "n", `${at}.glide`, true), standardSteps: Number(steps) },
    path: { n: whole(path, "n", `${at}.path`, true), peakT: whole(path, "peakT", `${at}.path`)! },
    source: `${e.source as string} (--known ${file}: the largest below ${below})`,
  };
  const wrong = knownMismatch(map, known, at);
  if (wrong) bad(wrong);
  if (below < from)
    bad(
      `its records of ${map.name} are those below ${below}, the range starts at ${from}: the numbers of [${below}, ${from}) are not covered`,
    );
  if (below > from) {
    // the largest below `below` is the largest below FROM only when it lies below FROM
    for (const [what, n] of [
      ["glide", known.glide.n],
      ["path", known.path.n],
    ] as const)
      if (n === null || n >= from)
        bad(
          `its records of ${map.name} are those below ${below}, above FROM = ${from}, and its largest ${what} ${n === null ? "names no n" : `is at n = ${n}, not below FROM`}: give the records below ${from}`,
        );
  }
  return { ...known, below: from };
}

/**
 * A number u < n whose trajectory reaches n within three steps, every value before n above u, in the
 * shapes of the kernel's preimage skip (assembly/verify/preimage.ts): odd, u = (2n - r)/q; odd, odd,
 * even, through w = (4n - r)/q and 2n, with u = w or u = (2w - r)/q; odd, even, even, u = (8n - r)/q
 * through 4n and 2n. The first found, in the kernel's order, or null. Any odd r (each u checked by
 * stepping forward).
 * @example preimageBelow(parseMap("3x+1"), 5n) // 3n: 3 -> 5
 */
export function preimageBelow(map: CollatzMap, n: bigint): bigint | null {
  const q = BigInt(map.q);
  const r = BigInt(map.r);
  // u reaches n in `steps` steps with every value before n above u
  const reaches = (u: bigint, steps: number) => {
    if (u < 1n || u >= n) return false;
    let v = u;
    for (let s = 0; s < steps; s++) {
      v = step(map, v);
      if (v === n) return true;
      if (v <= u) return false;
    }
    return false;
  };
  const exact = (t: bigint) => (t > 0n && t % q === 0n ? t / q : null);
  const u1 = exact(2n * n - r);
  if (u1 !== null && reaches(u1, 1)) return u1;
  const w = exact(4n * n - r);
  if (w !== null) {
    if (reaches(w, 2)) return w;
    const u3 = exact(2n * w - r);
    if (u3 !== null && u3 < w && reaches(u3, 3)) return u3;
  }
  const u4 = exact(8n * n - r);
  if (u4 !== null && reaches(u4, 3)) return u4;
  return null;
}
