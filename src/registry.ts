// The workers' registry, the composition root: every call a worker serves, by name. The worker
// entries (src/node/worker.ts, web/worker.ts) expose it, and only they import it; each job calls its
// own handlers through JobApi (src/engine/worker.ts), the page's table export through ExportApi
// (src/outputs/export.ts).
import { jobHandlers } from "./jobs/registry.js";
import { exportHandlers } from "./outputs/export.js";

export const workerHandlers = { ...jobHandlers, ...exportHandlers };
