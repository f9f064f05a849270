// The Slurm side of a run folder: the job array script (RUN/job.sbatch), its time and memory
// directives, and Slurm's --array lists.
import { resolve } from "node:path";
import type { Plan, ShardEstimate } from "../../engine/plan.js";

/** Slurm's output files, one a shard (RUN/logs/shard-I.out). */
export const LOGS = "logs";

/** The Slurm directives a run's script carries. */
export interface ScriptOptions {
  readonly cpusPerTask: number;
  readonly partition?: string;
  readonly estimate: ShardEstimate;
}

/** The time a task asks for: four times the estimate and a minute to start, at least ten minutes. */
export function timeLimit(estimate: ShardEstimate): number {
  return Math.max(600, 4 * Math.ceil(estimate.seconds) + 60);
}

/** Slurm's time format D-HH:MM:SS. */
export function slurmTime(seconds: number): string {
  const s = Math.max(60, Math.ceil(seconds));
  const d = Math.floor(s / 86400);
  const hms = [Math.floor((s % 86400) / 3600), Math.floor((s % 3600) / 60), s % 60].map((x) => String(x).padStart(2, "0")).join(":");
  return d > 0 ? `${d}-${hms}` : hms;
}

/** The batch script: one array task per shard, each running `glidepath shard RUN $SLURM_ARRAY_TASK_ID`. */
export function sbatchScript(dir: string, plan: Plan<unknown>, describe: string, o: ScriptOptions): string {
  const run = resolve(dir);
  const cli = resolve(new URL("../../../bin/glidepath.js", import.meta.url).pathname);
  return [
    "#!/bin/bash",
    `# glidepath ${describe}: ${plan.shards.length} shards of plan ${plan.hash.slice(0, 16)}.`,
    "# Submit with: sbatch job.sbatch (from any folder). Rerun only some shards: sbatch --array=3,7 job.sbatch",
    "# Moved RUN or glidepath? sbatch --export=ALL,GLIDEPATH_RUN=/new/RUN,GLIDEPATH=/new/bin/glidepath.js --output=/new/RUN/logs/shard-%a.out ...",
    `#SBATCH --job-name=glidepath-${plan.job}`,
    `#SBATCH --array=0-${plan.shards.length - 1}`,
    "#SBATCH --ntasks=1",
    `#SBATCH --cpus-per-task=${o.cpusPerTask}`,
    `#SBATCH --mem=${o.estimate.memoryMiB}M`,
    `#SBATCH --time=${slurmTime(timeLimit(o.estimate))}`,
    `#SBATCH --output=${run}/${LOGS}/shard-%a.out`,
    ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
    "set -euo pipefail",
    `RUN="\${GLIDEPATH_RUN:-${run}}"`,
    `GLIDEPATH="\${GLIDEPATH:-${cli}}"`,
    `exec "${process.execPath}" "$GLIDEPATH" shard "$RUN" "$SLURM_ARRAY_TASK_ID" --workers "\${SLURM_CPUS_PER_TASK:-1}"`,
    "",
  ].join("\n");
}

/** Shard numbers as Slurm's --array list: 0-3,7,9-10. */
export function arrayList(shards: readonly number[]): string {
  const out: string[] = [];
  for (let i = 0; i < shards.length; ) {
    let j = i;
    while (j + 1 < shards.length && shards[j + 1] === shards[j]! + 1) j++;
    out.push(j > i ? `${shards[i]}-${shards[j]}` : String(shards[i]));
    i = j + 1;
  }
  return out.join(",");
}
