/**
 * A fixed pool of threads for the split-step: the main thread and size − 1
 * worker threads, synchronised through shared words (integrators/pool-control.ts).
 * The main thread posts one range to each worker, runs the first range
 * itself, then blocks with Atomics.wait until every worker has counted down
 * (a step stays a plain synchronous call).
 *
 * Failures are loud: a worker that throws writes its message to shared
 * memory and the step throws a ThreadError with it; a worker script that is
 * missing or fails to load stops the constructor; the waits have a time-out,
 * and between slices the main thread checks that every worker is alive (its
 * state word, and that it took its range within `answerSeconds`), so a
 * worker that exited, was terminated or hangs stops the run instead of
 * hanging it. Workers are unref'd, so they never keep a finished process
 * alive, and close() terminates them.
 */
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { ThreadError } from "../core/errors.js";
import type { StepSetup } from "../fields/step-memory.js";
import { createEngine, type StepEngine } from "../fields/step-engine.js";
import { controlWords, MESSAGE_BYTES, messageView, PENDING, readMessage, stateWord, takenWord, TASK, WorkerState, writeMessage } from "./pool-control.js";
import { clearResults, combineResults, RESULT_LENGTH, runTask, type StepTask } from "./step-task.js";

/** What a worker is given once: the step's memory layout and its slot, plus the shared words. */
export interface WorkerSetup {
  readonly step: StepSetup;
  readonly slot: number;
  readonly results: SharedArrayBuffer;
  readonly control: SharedArrayBuffer;
  readonly messages: SharedArrayBuffer;
}

/** One unit of work for a worker: a pass over units [lo, hi), task number `number`. */
export interface WorkerTask {
  readonly task: StepTask;
  readonly lo: number;
  readonly hi: number;
  readonly number: number;
}

/** Options of a pool (the defaults suit runs; tests shorten the times). */
export interface ThreadPoolOptions {
  /** The worker script. @default the built integrators/step-worker.js */
  readonly script?: string;
  /** Seconds the workers may take to start. @default 60 */
  readonly startSeconds?: number;
  /** Seconds a worker may take to pick up a posted range. @default 30 */
  readonly answerSeconds?: number;
  /** Return from the constructor at once and wait for the workers to start at the first pass (they start while the caller does other work). @default false */
  readonly deferStart?: boolean;
}

/** Milliseconds of one slice of a wait, between liveness checks. */
const WAIT_SLICE_MS = 100;

/** The compiled worker script (tests that import the TypeScript sources use the built one). */
function defaultWorkerScript(): string {
  const here = fileURLToPath(import.meta.url);
  return here.endsWith(".ts") ? path.resolve(path.dirname(here), "../../dist/integrators/step-worker.js") : path.join(path.dirname(here), "step-worker.js");
}

/**
 * Loads the worker script inside the worker, so that a script that fails to
 * load still reports its message through the shared words (a worker's own
 * error event would reach the main thread only after the wait it blocks).
 */
const BOOTSTRAP = `
const { workerData } = require("node:worker_threads");
const { pathToFileURL } = require("node:url");
import(pathToFileURL(workerData.script).href).catch((e) => {
  const { control, messages, slot, stateIndex, failed, pending, messageBytes } = workerData.boot;
  const view = new Uint8Array(messages, messageBytes * slot, messageBytes);
  view.fill(0);
  view.set(new TextEncoder().encode(String(e && e.message ? e.message : e)).subarray(0, messageBytes - 1));
  const words = new Int32Array(control);
  Atomics.store(words, stateIndex, failed);
  Atomics.notify(words, stateIndex);
  Atomics.notify(words, pending);
});
`;

/** The threads of one stepper. */
export class ThreadPool {
  /** Threads in all, the main thread included. */
  readonly size: number;
  /** Worker threads, for slots 1 … size − 1. */
  readonly workers: readonly Worker[];
  /** The main thread's engine, slot 0. */
  private readonly engine: StepEngine;
  private readonly ctrl: Int32Array;
  private readonly messages: SharedArrayBuffer;
  private readonly results: Float64Array;
  private readonly answerMs: number;
  private isClosed = false;
  private exited: Promise<void> = Promise.resolve();
  /** The first failure seen; every later call throws it again. */
  private broken: ThreadError | undefined;
  /** Milliseconds the workers may take to start, until they have (then undefined). */
  private startLimitMs: number | undefined;

  /** @param size threads in all (at least 2): the main thread and size − 1 workers */
  constructor(size: number, step: StepSetup, options: ThreadPoolOptions = {}) {
    this.size = size;
    this.answerMs = 1000 * (options.answerSeconds ?? 30);
    const control = new SharedArrayBuffer(4 * controlWords(size));
    const results = new SharedArrayBuffer(8 * RESULT_LENGTH * size);
    this.messages = new SharedArrayBuffer(MESSAGE_BYTES * size);
    this.ctrl = new Int32Array(control);
    this.results = new Float64Array(results);
    this.engine = createEngine(step, 0);
    const script = options.script ?? defaultWorkerScript();
    if (!fs.existsSync(script)) throw new ThreadError(`the worker thread script ${script} is missing (is psibox built? run npm run build)`);
    this.workers = Array.from({ length: size - 1 }, (_, i) => this.startWorker(script, { step, slot: i + 1, results, control, messages: this.messages }));
    this.startLimitMs = 1000 * (options.startSeconds ?? 60);
    if (!options.deferStart) this.started();
  }

  /** Wait for the workers to start, once (closing the pool if one fails to). */
  private started(): void {
    if (this.startLimitMs === undefined) return;
    try {
      this.awaitStart(this.startLimitMs);
      this.startLimitMs = undefined;
    } catch (e) {
      void this.close();
      throw e;
    }
  }

  private startWorker(script: string, setup: WorkerSetup): Worker {
    const boot = { control: setup.control, messages: setup.messages, slot: setup.slot, stateIndex: stateWord(setup.slot), failed: WorkerState.Failed, pending: PENDING, messageBytes: MESSAGE_BYTES };
    const w = new Worker(BOOTSTRAP, { eval: true, workerData: { ...setup, script, boot } });
    const state = stateWord(setup.slot);
    // seen only when this thread is between steps: a worker that died then is found before the next pass
    w.on("error", (e: Error) => {
      if (Atomics.load(this.ctrl, state) === WorkerState.Failed) return;
      writeMessage(messageView(this.messages, setup.slot), e.message);
      Atomics.store(this.ctrl, state, WorkerState.Failed);
    });
    w.on("exit", () => {
      if (Atomics.load(this.ctrl, state) !== WorkerState.Failed) Atomics.store(this.ctrl, state, WorkerState.Exited);
    });
    w.unref();
    return w;
  }

  /** Block until every worker is ready; throw if one fails to start or time runs out. */
  private awaitStart(limitMs: number): void {
    const start = Date.now();
    for (let slot = 1; slot < this.size; slot++) {
      while (Atomics.load(this.ctrl, stateWord(slot)) === WorkerState.Starting) {
        if (Date.now() - start > limitMs) throw new ThreadError(`worker thread ${slot} did not start within ${limitMs / 1000} s`);
        Atomics.wait(this.ctrl, stateWord(slot), WorkerState.Starting, WAIT_SLICE_MS);
      }
      const failed = this.failure(slot, "did not start");
      if (failed) throw failed;
    }
  }

  /** The error for a slot that failed or exited (undefined while it is ready). */
  private failure(slot: number, what = "failed"): ThreadError | undefined {
    const state = Atomics.load(this.ctrl, stateWord(slot));
    if (state === WorkerState.Failed) return new ThreadError(`worker thread ${slot} ${what}: ${readMessage(messageView(this.messages, slot))}`);
    if (state === WorkerState.Exited) return new ThreadError(`worker thread ${slot} exited during the run`);
    return undefined;
  }

  /** Throw (and remember) the first failure of any worker. */
  private checkAlive(): void {
    if (this.broken) throw this.broken;
    for (let slot = 1; slot < this.size; slot++) {
      const failed = this.failure(slot);
      if (failed) {
        this.broken = failed;
        throw failed;
      }
    }
  }

  /**
   * Split units [0, count) into one contiguous range per thread, run `task`
   * on each and combine the threads' result vectors into `out` (sums in
   * thread order, and a maximum).
   */
  run(count: number, task: StepTask, out: Float64Array): void {
    if (this.isClosed) throw new Error("the thread pool is closed");
    this.started();
    this.checkAlive();
    clearResults(this.results, this.size);
    const ranges = Array.from({ length: this.size }, (_, i) => [Math.floor((i * count) / this.size), Math.floor(((i + 1) * count) / this.size)] as const);
    const posted = ranges.map(([lo, hi], i) => i > 0 && hi > lo);
    const number = Atomics.add(this.ctrl, TASK, 1) + 1;
    Atomics.store(this.ctrl, PENDING, posted.filter(Boolean).length);
    for (let i = 1; i < this.size; i++) {
      const [lo, hi] = ranges[i]!;
      if (posted[i]) this.workers[i - 1]!.postMessage({ task, lo, hi, number } satisfies WorkerTask);
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
    this.awaitWorkers(posted, number);
    if (failure !== undefined) throw failure;
    combineResults(this.results, this.size, out);
  }

  /** Wait in slices until the posted ranges are done, checking between slices that every worker is alive and took its range. */
  private awaitWorkers(posted: readonly boolean[], number: number): void {
    const start = Date.now();
    for (let left = Atomics.load(this.ctrl, PENDING); left !== 0; left = Atomics.load(this.ctrl, PENDING)) {
      Atomics.wait(this.ctrl, PENDING, left, WAIT_SLICE_MS);
      this.checkAlive();
      if (Date.now() - start <= this.answerMs) continue;
      for (let slot = 1; slot < this.size; slot++) {
        if (posted[slot] && Atomics.load(this.ctrl, takenWord(slot)) !== number) {
          this.broken = new ThreadError(`worker thread ${slot} did not answer within ${this.answerMs / 1000} s (it exited or hangs)`);
          throw this.broken;
        }
      }
    }
    // a worker that failed and counted itself done before this thread first looked at PENDING
    // leaves the loop without one check: look once more, so that no failure is lost
    this.checkAlive();
  }

  /** Whether close() was called. */
  get closed(): boolean {
    return this.isClosed;
  }

  /** Stop the workers; resolves when they have exited (their share of the step's memory is given back then). */
  close(): Promise<void> {
    if (this.isClosed) return this.exited;
    this.isClosed = true;
    // ref'd until they exit: a caller awaiting their exit keeps the process alive that long (they are unref'd while they work)
    this.exited = Promise.all(
      this.workers.map((w) => {
        w.ref();
        return w.terminate();
      }),
    ).then(() => undefined);
    return this.exited;
  }
}
