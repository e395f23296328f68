/**
 * The analysis's helper thread (report/analysis-helper.ts): touches the pages of the analysis's grids while the
 * snapshot is read, then takes the vortex census of each snapshot while the main thread computes the rest. It
 * loads the census's modules on its first census only, so that its first touch starts at once.
 */
import { parentPort } from "node:worker_threads";
import { touchPages, type TouchRange } from "../fields/page-touch.js";
import type { VortexJob } from "./vortex-table.js";

/** A task: touch ranges, or a census. */
export type HelperTask = { readonly op: "touch"; readonly ranges: readonly TouchRange[] } | { readonly op: "vortices"; readonly job: VortexJob };
/** A task as sent, numbered for its answer. */
export type HelperRequest = HelperTask & { readonly id: number };

async function answer(m: HelperRequest): Promise<void> {
  try {
    if (m.op === "touch") {
      m.ranges.forEach(touchPages);
      parentPort!.postMessage({ id: m.id });
      return;
    }
    const { vortexTableOf } = await import("./vortex-table.js");
    const table = vortexTableOf(m.job);
    parentPort!.postMessage({ id: m.id, table }, [table.report.projection.buffer as ArrayBuffer, table.csv.buffer as ArrayBuffer]);
  } catch (e) {
    parentPort!.postMessage({ id: m.id, error: (e as Error).message });
  }
}

// one request at a time, in order
let queue = Promise.resolve();
parentPort!.on("message", (m: HelperRequest) => {
  queue = queue.then(() => answer(m));
});
