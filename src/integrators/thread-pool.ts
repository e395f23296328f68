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

/** What a worker is given once. */
export interface WorkerSetup {
  readonly shape: readonly number[];
  readonly psi: SharedArrayBuffer;
  readonly phi: SharedArrayBuffer;
  readonly spectrum: SharedArrayBuffer | undefined;
  readonly phase: SharedArrayBuffer;
  readonly results: SharedArrayBuffer;
  readonly control: SharedArrayBuffer;
  readonly wavenumbers: readonly number[][];
  readonly kSquared: readonly number[][] | undefined;
}

/** One unit of work for a worker. */
export type StepTask =
  | { readonly op: "kick"; readonly factor: number; readonly lo: number; readonly hi: number }
  | { readonly op: "axis" | "half-axis"; readonly axis: number; readonly inverse: boolean; readonly lo: number; readonly hi: number }
  | { readonly op: "drift" | "rfft-rows" | "poisson" | "irfft-rows"; readonly lo: number; readonly hi: number }
  | { readonly op: "gradient" | "density"; readonly slot: number; readonly lo: number; readonly hi: number };

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
  private closed = false;

  constructor(size: number, setup: Omit<WorkerSetup, "control">) {
    this.size = size;
    const control = new SharedArrayBuffer(8);
    this.ctrl = new Int32Array(control);
    this.workers = Array.from({ length: size }, () => {
      const w = new Worker(workerScript(), { workerData: { ...setup, control } });
      w.unref();
      return w;
    });
  }

  /**
   * Split units [0, count) into one contiguous range per worker and run
   * `make(lo, hi, slot)` on each; returns when all are done.
   */
  parallel(count: number, make: (lo: number, hi: number, slot: number) => StepTask): void {
    if (this.closed) throw new Error("the thread pool is closed");
    const tasks: StepTask[] = [];
    for (let i = 0; i < this.size; i++) {
      const lo = Math.floor((i * count) / this.size);
      const hi = Math.floor(((i + 1) * count) / this.size);
      if (hi > lo) tasks.push(make(lo, hi, i));
    }
    Atomics.store(this.ctrl, 0, tasks.length);
    Atomics.store(this.ctrl, 1, 0);
    tasks.forEach((t, i) => this.workers[i]!.postMessage(t));
    for (let v = Atomics.load(this.ctrl, 0); v !== 0; v = Atomics.load(this.ctrl, 0)) Atomics.wait(this.ctrl, 0, v);
    if (Atomics.load(this.ctrl, 1) !== 0) throw new Error("a worker thread failed during a step");
  }

  /** Stop the workers. */
  close(): void {
    if (this.closed) return;
    this.closed = true;
    for (const w of this.workers) void w.terminate();
  }
}
