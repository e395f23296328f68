/**
 * A fixed pool of threads for the split-step: the main thread and size − 1
 * worker threads, synchronised through a shared counter. The main thread
 * posts one range to each worker, runs the first range itself, then blocks
 * with Atomics.wait until every worker has counted down (a step stays a
 * plain synchronous call). Workers are unref'd, so they never keep a
 * finished process alive, and close() terminates them.
 */
import { Worker } from "node:worker_threads";
import { fileURLToPath } from "node:url";
import path from "node:path";
import type { StepSetup } from "../fields/step-memory.js";
import { createEngine, type StepEngine } from "../fields/step-engine.js";
import { combineResults, RESULT_LENGTH, runTask, type StepTask } from "./step-task.js";

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

/** The threads of one stepper. */
export class ThreadPool {
  /** Threads in all, the main thread included. */
  readonly size: number;
  /** Worker threads, for slots 1 … size − 1. */
  private readonly workers: Worker[];
  /** The main thread's engine, slot 0. */
  private readonly engine: StepEngine;
  private readonly ctrl: Int32Array;
  private readonly results: Float64Array;
  private isClosed = false;

  /** @param size threads in all (at least 2): the main thread and size − 1 workers */
  constructor(size: number, step: StepSetup) {
    this.size = size;
    const control = new SharedArrayBuffer(8);
    const results = new SharedArrayBuffer(8 * RESULT_LENGTH * size);
    this.ctrl = new Int32Array(control);
    this.results = new Float64Array(results);
    this.engine = createEngine(step, 0);
    this.workers = Array.from({ length: size - 1 }, (_, i) => {
      const setup: WorkerSetup = { step, slot: i + 1, results, control };
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
    for (let i = 1; i < this.size; i++) if (ranges[i]![1] > ranges[i]![0]) posted++;
    Atomics.store(this.ctrl, 0, posted);
    Atomics.store(this.ctrl, 1, 0);
    for (let i = 1; i < this.size; i++) {
      const [lo, hi] = ranges[i]!;
      if (hi > lo) this.workers[i - 1]!.postMessage({ task, lo, hi } satisfies WorkerTask);
    }
    // the first range on this thread while the workers run theirs
    const [lo, hi] = ranges[0]!;
    let failure: unknown;
    if (hi > lo) {
      try {
        runTask(this.engine, task, lo, hi, this.results.subarray(0, RESULT_LENGTH));
      } catch (e) {
        failure = e;
      }
    }
    for (let v = Atomics.load(this.ctrl, 0); v !== 0; v = Atomics.load(this.ctrl, 0)) Atomics.wait(this.ctrl, 0, v);
    if (failure !== undefined) throw failure;
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
