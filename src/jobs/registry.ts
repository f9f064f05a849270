// The jobs' registry: every call a job offers its workers, by name. Only src/registry.ts (the worker
// entries' composition root) imports it; a job calls its own handlers through JobApi<typeof its
// handlers> (engine/worker.ts). Adding a kernel adds its job's handlers here, and nothing in engine/.
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
