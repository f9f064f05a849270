// Class tables as people read them: CSV rows (residue, odd steps, image), their guard, and parsing
// back. The sorting of a class table is the sieve's (src/jobs/sieve/sort.ts).
import type { LeafChunk } from "../jobs/sieve/messages.js";

export type TableFormat = "raw" | "csv" | "arrow";

/** Rows above which CSV is refused unless forced (a CSV row is ~30 bytes; raw is 4 or 8). */
export const CSV_ROW_GUARD = 1_000_000;

export interface CsvRow {
  readonly residue: bigint;
  readonly odd: number;
  readonly image: bigint;
}

/** Collects full rows (a, m, b) for CSV; callers check CSV_ROW_GUARD first. */
export function collectRows(rows: CsvRow[], chunk: LeafChunk): void {
  for (let i = 0; i < chunk.a.length; i++) rows.push({ residue: chunk.a[i]!, odd: chunk.m[i]!, image: chunk.b[i]! });
}

export const CSV_HEADER = "residue,odd_steps,image\n";

/** Sorts rows by residue and renders them, header first. */
export function* csvLines(rows: CsvRow[]): Generator<string> {
  rows.sort((u, v) => (u.residue < v.residue ? -1 : u.residue > v.residue ? 1 : 0));
  yield CSV_HEADER;
  for (const r of rows) yield `${r.residue},${r.odd},${r.image}\n`;
}

/** Parses a class table CSV back into rows (exact BigInt residues and images). */
export function parseCsv(text: string): CsvRow[] {
  const lines = text.split("\n").filter((l) => l.length > 0);
  if (lines[0] + "\n" !== CSV_HEADER) throw new Error("not a glidepath class table CSV");
  return lines.slice(1).map((l) => {
    const [a, m, b] = l.split(",");
    return { residue: BigInt(a!), odd: Number(m), image: BigInt(b!) };
  });
}
