/**
 * A worker thread of the threaded split-step: it builds its own engine on
 * the shared step memory (its own wasm instance or fft.js plans, and its own
 * scratch block), says it is ready, and runs unit ranges of the step's
 * passes, then counts down the shared counter the main thread waits on. A
 * pass that throws leaves its message in shared memory for the main thread
 * (integrators/pool-control.ts); so does a process.exit() in this thread.
 */
import { parentPort, workerData } from "node:worker_threads";
import { createEngine } from "../fields/step-engine.js";
import { PENDING, reportFailure, stateWord, takenWord, WorkerState } from "./pool-control.js";
import { RESULT_LENGTH, runTask } from "./step-task.js";
import type { WorkerSetup, WorkerTask } from "./thread-pool.js";

const setup = workerData as WorkerSetup;
const ctrl = new Int32Array(setup.control);
const slot = setup.slot;
const engine = createEngine(setup.step, slot);
const results = new Float64Array(setup.results, 8 * RESULT_LENGTH * slot, RESULT_LENGTH);

process.on("exit", () => {
  if (Atomics.load(ctrl, stateWord(slot)) === WorkerState.Ready) {
    Atomics.store(ctrl, stateWord(slot), WorkerState.Exited);
    Atomics.notify(ctrl, PENDING);
  }
});

parentPort!.on("message", (message: WorkerTask) => {
  Atomics.store(ctrl, takenWord(slot), message.number);
  try {
    runTask(engine, message.task, message.lo, message.hi, results);
  } catch (e) {
    reportFailure(ctrl, setup.messages, slot, e instanceof Error ? e.message : String(e));
  } finally {
    Atomics.sub(ctrl, PENDING, 1);
    Atomics.notify(ctrl, PENDING);
  }
});

Atomics.store(ctrl, stateWord(slot), WorkerState.Ready);
Atomics.notify(ctrl, stateWord(slot));
