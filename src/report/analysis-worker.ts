/**
 * The analysis's helper thread (report/analysis-helper.ts): takes the vortex census of each snapshot while the
 * main thread computes the rest.
 */
import { parentPort } from "node:worker_threads";
import { vortexTableOf, type VortexJob } from "./vortex-table.js";

/** A task: a census; `last`: the thread ends once it has answered. */
export type HelperTask = { readonly op: "vortices"; readonly job: VortexJob; readonly last?: boolean };
/** A task as sent, numbered for its answer. */
export type HelperRequest = HelperTask & { readonly id: number };

function answer(m: HelperRequest): void {
  try {
    const table = vortexTableOf(m.job);
    parentPort!.postMessage({ id: m.id, table }, [table.report.projection.buffer as ArrayBuffer, table.csv.buffer as ArrayBuffer]);
  } catch (e) {
    parentPort!.postMessage({ id: m.id, error: (e as Error).message });
  }
}

// one request at a time, in order
let queue = Promise.resolve();
parentPort!.on("message", (m: HelperRequest) => {
  queue = queue.then(() => {
    answer(m);
    // the last task: closing the port ends this thread now (the answer is delivered first), so that its heap is given
    // back while the main thread is still busy, not when it next turns to its events and stops the thread
    if (m.last) parentPort!.close();
  });
});
