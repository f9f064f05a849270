// The jobs' registry, the composition root of the workers: every call a job offers its workers, by
// name. The worker entries (src/node/worker.ts, web/worker.ts) expose these; the jobs call them
// through a JobPool. Adding a kernel adds its job's handlers here, and nothing in engine/.
import type { Remote } from "comlink";
import type { WorkerApi } from "../engine/worker.js";
import { censusHandlers } from "./census/kernel.js";
import { cyclesHandlers } from "./cycles/kernel.js";
import { sieveHandlers } from "./sieve/kernel.js";
import { treeHandlers } from "./tree/kernel.js";
import { verifyHandlers } from "./verify/kernel.js";
import { boundsHandlers } from "./verify/bounds.js";

export const jobHandlers = {
  ...sieveHandlers,
  ...censusHandlers,
  ...cyclesHandlers,
  ...treeHandlers,
  ...verifyHandlers,
  ...boundsHandlers,
};

export type JobHandlers = typeof jobHandlers;

/** A worker as a job's run sees it (the `api` of KernelPool.run). */
export type JobApi = Remote<WorkerApi<JobHandlers>>;
