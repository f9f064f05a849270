// Web Worker entry: the same worker API as Node's worker_threads entry, on the worker's own scope.
import { expose } from "comlink";
import { createWorkerApi } from "../src/engine/worker.js";
import { workerHandlers } from "../src/registry.js";

expose(createWorkerApi(workerHandlers));
