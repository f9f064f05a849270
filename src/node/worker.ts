// worker_threads entry: the isomorphic worker API, serving the jobs' handlers, on Node's message port.
import { parentPort } from "node:worker_threads";
import { expose } from "comlink";
import nodeEndpoint from "comlink/dist/esm/node-adapter.mjs";
import { createWorkerApi } from "../engine/worker.js";
import { workerHandlers } from "../registry.js";

if (!parentPort) throw new Error("src/node/worker.ts must run inside a worker thread");
expose(createWorkerApi(workerHandlers), nodeEndpoint(parentPort));
