// What a verification run proves, read from its counts and lists alone: the claim a report states.
// Strong induction over n (common practice): if every n in [from, u) goes below itself or is the
// least member of its cycle, each such n reaches, step by step through smaller numbers of the range,
// a listed cycle or a number below `from`. It stops at u, the smallest n that is unresolved or
// enters a cycle of larger numbers: a larger n may go below itself onto u's trajectory, which the
// run does not follow, so nothing from u on is proved by the run.
import type { CollatzMap } from "../../core/map.js";
import { step } from "../../core/map.js";
import { group, plural } from "../../outputs/format.js";
import type { VerifyResult } from "./merge.js";

/** A list a claim names: its exact count, the smallest few as text (ascending), and how many are not shown. */
export interface ClaimList {
  readonly title: string;
  readonly count: bigint;
  readonly shown: readonly string[];
  readonly more: bigint;
}

/** The smallest n of the range that the run does not prove, and why. */
export interface FirstUnproved {
  readonly n: bigint;
  readonly reason: "unresolved" | "cycle entrant";
  /** For a cycle entrant: the least element of the cycle it enters. */
  readonly cycleMin: bigint | null;
}

export interface VerifyClaim {
  /** Every n in [from, provedTo) is proved (given the numbers below from); provedTo = to when the whole range is. */
  readonly provedTo: bigint;
  /** u: null when every n of the range goes below itself or is a cycle's least member. */
  readonly firstUnproved: FirstUnproved | null;
  /** What the counts say of each n, one line. */
  readonly descent: string;
  /** What follows by induction, one line: the whole claim, or the claim up to u. */
  readonly claim: string;
  /** The numbers not proved, one line; null when the whole range is proved. */
  readonly notProved: string | null;
  /** The induction assumption, one line. */
  readonly assumption: string;
  /** The cycle members, the cycle entrants and the unresolved numbers (empty lists left out). */
  readonly lists: readonly ClaimList[];
}

/** How many of each list a claim shows (the CLI's report shows the same numbers). */
export const CLAIM_CAPS = { members: 50, entrants: 20, unresolved: 50 } as const;

type ClaimInput = Pick<VerifyResult, "from" | "to" | "maxSteps" | "counts" | "cycleMembers" | "cycleEntrants" | "unresolvedList"> & {
  readonly map: Pick<CollatzMap, "name">;
  /** The skip of slices was on (its count: counts.preimage). */
  readonly skipReached?: boolean;
};

function list<T>(title: string, count: bigint, items: readonly T[], cap: number, text: (x: T) => string): ClaimList {
  const shown = items.slice(0, cap).map(text);
  return { title, count, shown, more: count - BigInt(shown.length) };
}

const range = (a: bigint, b: bigint) => `[${group(a)}, ${group(b)})`;

/**
 * The claim of a finished run, from its counts and (capped, smallest-first) lists.
 * @example verifyClaim(await runVerify(pool, { map: parseMap("5x+1"), from: 1n, to: 2000n })).provedTo // 5n: 5 enters the cycle of 13
 */
export function verifyClaim(r: ClaimInput, caps: { members: number; entrants: number; unresolved: number } = CLAIM_CAPS): VerifyClaim {
  const c = r.counts;
  if ((c.unresolved > 0n && r.unresolvedList.length === 0) || (c.cycleEntrants > 0n && r.cycleEntrants.length === 0))
    throw new Error("internal error: a run counts unresolved numbers or cycle entrants but lists none");
  // the lists hold the smallest of each: u is the least of their first entries
  const firstUnresolved = c.unresolved > 0n ? r.unresolvedList[0]! : null;
  const firstEntrant = c.cycleEntrants > 0n ? r.cycleEntrants[0]! : null;
  let first: FirstUnproved | null = null;
  if (firstUnresolved !== null && (firstEntrant === null || firstUnresolved < firstEntrant.n))
    first = { n: firstUnresolved, reason: "unresolved", cycleMin: null };
  else if (firstEntrant !== null) first = { n: firstEntrant.n, reason: "cycle entrant", cycleMin: firstEntrant.cycleMin };
  const provedTo = first?.n ?? r.to;

  const exceptions = [
    ...(c.cycleMembers > 0n ? [plural(c.cycleMembers, "cycle member")] : []),
    ...(c.cycleEntrants > 0n ? [plural(c.cycleEntrants, "cycle entrant")] : []),
    ...(c.unresolved > 0n ? [plural(c.unresolved, "unresolved number")] : []),
  ];
  // a skipped n lies on the trajectory of a smaller u, every value between above u: once u goes below
  // itself, n has gone below u < n on the way (u in the range: iterated here; u below FROM: assumed)
  const skipped =
    r.skipReached === true
      ? ` (${plural(c.preimage, "number")} of them skipped, each reached within three steps from a smaller u with every value between above u: it goes below u, hence below itself, once u goes below itself, which a u in the range is shown to here and a u below ${group(r.from)} is assumed to)`
      : "";
  const descent =
    `Every n in ${range(r.from, r.to)} of ${r.map.name} reaches a value below n${skipped}` +
    (exceptions.length
      ? `, except the ${exceptions.length > 1 ? `${exceptions.slice(0, -1).join(", ")} and ${exceptions.at(-1)}` : exceptions[0]} listed below.`
      : ".");

  // the cycles whose least member lies below u: those an n of [from, u) can reach without going below from
  const reached = r.cycleMembers.filter((m) => m.n < provedTo).length;
  const targets =
    r.from > 1n
      ? `a number below ${group(r.from)}${reached > 0 ? " or one of the cycles listed below" : ""}`
      : "one of the cycles listed below";
  const cycles = (span: string) =>
    reached > 0
      ? `every cycle with its least member in ${span} is listed (${plural(reached, "cycle")})`
      : `no cycle has its least member in ${span}`;
  let claim: string;
  if (first === null)
    claim = `Proved: every n in ${range(r.from, r.to)} reaches ${targets}; none starts a divergent trajectory, and ${cycles("the range")}.`;
  else if (provedTo > r.from) {
    const span = range(r.from, provedTo);
    claim = `Proved only for ${span}: every n there reaches ${targets}; none of them starts a divergent trajectory, and ${cycles(span)}.`;
  } else claim = `Nothing in the range is proved by induction: its first number, ${group(r.from)}, does not go below itself.`;

  let notProved: string | null = null;
  if (first !== null) {
    const why =
      first.reason === "unresolved"
        ? `is unresolved after ${plural(r.maxSteps, "step")}`
        : `enters the cycle of ${group(first.cycleMin!)} without going below itself`;
    notProved =
      `Not proved: the numbers from ${group(first.n)} on (${range(first.n, r.to)}). ${group(first.n)} ${why}, ` +
      `and a larger n may go below itself onto ${group(first.n)}'s trajectory, which this run does not follow.`;
  }

  const assumption =
    (r.from === 1n
      ? "By induction from 1: an n that goes below itself lands on a smaller number, already covered."
      : `Given the numbers below ${group(r.from)}: the claim assumes that every n below ${group(r.from)} reaches a cycle ` +
        "(the induction assumption of a range that does not start at 1; this run does not check it).") +
    (r.skipReached === true && r.from > 1n
      ? ` The skip also assumes that every u below ${group(r.from)} that reaches a number of the range within three steps, every value between above u, goes below itself (it fails only where u is a cycle's least element).`
      : "");

  const lists = [
    list(
      "cycle members (each its cycle's least member)",
      c.cycleMembers,
      r.cycleMembers,
      caps.members,
      (m) => `${group(m.n)} (period ${m.period})`,
    ),
    list(
      "enter a cycle of larger numbers",
      c.cycleEntrants,
      r.cycleEntrants,
      caps.entrants,
      (e) => `${group(e.n)} (the cycle of ${group(e.cycleMin)})`,
    ),
    list(`unresolved after ${plural(r.maxSteps, "step")}`, c.unresolved, r.unresolvedList, caps.unresolved, (n) => group(n)),
  ].filter((l) => l.count > 0n);
  return { provedTo, firstUnproved: first, descent, claim, notProved, assumption, lists };
}

/**
 * The first elements of the cycle through n, n first: at most `count`, all of them when the cycle is shorter.
 * @example cycleStart(parseMap("3x+1"), 1n) // [1n, 2n]
 */
export function cycleStart(map: CollatzMap, n: bigint, count = 13): bigint[] {
  const cycle = [n];
  for (let v = step(map, n); v !== n && cycle.length < count; v = step(map, v)) cycle.push(v);
  return cycle;
}
