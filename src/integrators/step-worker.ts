/**
 * A worker thread of the threaded split-step: it builds its own engine on
 * the shared step memory (its own wasm instance or fft.js plans, and its own
 * scratch block) and runs unit ranges of the step's passes, then counts down
 * the shared counter the main thread waits on.
 */
import { parentPort, workerData } from "node:worker_threads";
import { createEngine } from "../fields/step-engine.js";
import { RESULT_LENGTH, runTask } from "./step-task.js";
import type { WorkerSetup, WorkerTask } from "./thread-pool.js";

const setup = workerData as WorkerSetup;
const engine = createEngine(setup.step, setup.slot);
const results = new Float64Array(setup.results, 8 * RESULT_LENGTH * setup.slot, RESULT_LENGTH);
const ctrl = new Int32Array(setup.control);

parentPort!.on("message", (message: WorkerTask) => {
  try {
    runTask(engine, message.task, message.lo, message.hi, results);
  } catch {
    Atomics.store(ctrl, 1, 1);
  } finally {
    Atomics.sub(ctrl, 0, 1);
    Atomics.notify(ctrl, 0);
  }
});
