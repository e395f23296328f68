/**
 * A fixed pool of worker threads for the split-step, synchronised through a
 * shared counter: the main thread posts one task per worker and blocks with
 * Atomics.wait until every worker has counted down (a step stays a plain
 * synchronous call). Workers are unref'd, so they never keep a finished
 * process alive, and close() terminates them.
 */
import { Worker } from "node:worker_threads";
import { fileURLToPath } from "node:url";
import path from "node:path";
import type { StepSetup } from "../fields/step-memory.js";
import { combineResults, RESULT_LENGTH, type StepTask } from "./step-task.js";

/** What a worker is given once: the step's memory layout and its scratch slot, plus the shared control words. */
export interface WorkerSetup {
  readonly step: StepSetup;
  readonly slot: number;
  readonly results: SharedArrayBuffer;
  readonly control: SharedArrayBuffer;
}

/** One unit of work for a worker. */
export interface WorkerTask {
  readonly task: StepTask;
  readonly lo: number;
  readonly hi: number;
}

/** The compiled worker script (tests that import the TypeScript sources use the built one). */
function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  return here.endsWith(".ts") ? path.resolve(path.dirname(here), "../../dist/integrators/step-worker.js") : path.join(path.dirname(here), "step-worker.js");
}

/** The worker threads of one stepper. */
export class ThreadPool {
  readonly size: number;
  private readonly workers: Worker[];
  private readonly ctrl: Int32Array;
  private readonly results: Float64Array;
  private isClosed = false;

  constructor(size: number, step: StepSetup) {
    this.size = size;
    const control = new SharedArrayBuffer(8);
    const results = new SharedArrayBuffer(8 * RESULT_LENGTH * size);
    this.ctrl = new Int32Array(control);
    this.results = new Float64Array(results);
    this.workers = Array.from({ length: size }, (_, slot) => {
      const setup: WorkerSetup = { step, slot, results, control };
      const w = new Worker(workerScript(), { workerData: setup });
      w.unref();
      return w;
    });
  }

  /**
   * Split units [0, count) into one contiguous range per worker, run `task`
   * on each and combine the workers' result vectors into `out` (sums in
   * worker order, and a maximum).
   */
  run(count: number, task: StepTask, out: Float64Array): void {
    if (this.isClosed) throw new Error("the thread pool is closed");
    let posted = 0;
    this.results.fill(0);
    const ranges: [number, number][] = [];
    for (let i = 0; i < this.size; i++) {
      ranges.push([Math.floor((i * count) / this.size), Math.floor(((i + 1) * count) / this.size)]);
    }
    for (const [lo, hi] of ranges) if (hi > lo) posted++;
    Atomics.store(this.ctrl, 0, posted);
    Atomics.store(this.ctrl, 1, 0);
    ranges.forEach(([lo, hi], i) => {
      if (hi > lo) this.workers[i]!.postMessage({ task, lo, hi } satisfies WorkerTask);
    });
    for (let v = Atomics.load(this.ctrl, 0); v !== 0; v = Atomics.load(this.ctrl, 0)) Atomics.wait(this.ctrl, 0, v);
    if (Atomics.load(this.ctrl, 1) !== 0) throw new Error("a worker thread failed during a step");
    combineResults(this.results, this.size, out);
  }

  /** Whether close() was called. */
  get closed(): boolean {
    return this.isClosed;
  }

  /** Stop the workers. */
  close(): void {
    if (this.isClosed) return;
    this.isClosed = true;
    for (const w of this.workers) void w.terminate();
  }
}
