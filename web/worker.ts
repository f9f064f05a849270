// Web Worker entry: the same worker API as Node's worker_threads entry, on the worker's own scope.
import { expose } from "comlink";
import { createWorkerApi } from "../src/engine/worker.js";
import { jobHandlers } from "../src/jobs/registry.js";

expose(createWorkerApi(jobHandlers));
