/**
 * The local pool of an ensemble: worker threads (all cores by default),
 * each advancing whole members on its own single-threaded stepper
 * (member-worker.ts). The main thread hands out member indices in
 * increasing order and only waits, so it stays free for the reduction and
 * the progress line. What a member is does not depend on the worker that
 * ran it, so the ensemble is the same for any number of workers.
 */
import path from "node:path";
import fs from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { NumericsError, ThreadError } from "../core/errors.js";
import type { MemberSetup } from "./member.js";

/** A message to a worker: advance a member (null: the classical reference), or stop. */
export type ToWorker = { readonly kind: "member"; readonly index: number | null } | { readonly kind: "stop" };
/** A message from a worker. */
export type FromWorker =
  | { readonly kind: "ready" }
  | { readonly kind: "progress"; readonly index: number | null; readonly fraction: number }
  | { readonly kind: "done"; readonly index: number | null }
  | { readonly kind: "failed"; readonly index: number | null; readonly message: string };

/** What the pool tells its caller. */
export interface PoolEvents {
  /** A member (null: the reference) is written to the folder. */
  readonly done: (index: number | null) => void;
  /** The members in flight and the fraction of the span each has done. */
  readonly progress?: (running: ReadonlyMap<number | null, number>) => void;
  /** Checked whenever a member ends or reports progress; a reason stops the pool (members in flight are dropped). */
  readonly stopRequested?: () => string | undefined;
}

/** The compiled worker script (tests that import the TypeScript sources use the built one). */
function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  return here.endsWith(".ts") ? path.resolve(path.dirname(here), "../../dist/ensemble/member-worker.js") : path.join(path.dirname(here), "member-worker.js");
}

/**
 * Advance `tasks` (member indices; null: the reference) on `workers` threads,
 * each written into the ensemble folder `dir` by its worker. Resolves with a
 * stop reason when stopped early, undefined when every task is done.
 */
export function runMembers(setup: MemberSetup, dir: string, tasks: readonly (number | null)[], workers: number, events: PoolEvents): Promise<string | undefined> {
  const script = workerScript();
  if (!fs.existsSync(script)) throw new ThreadError(`the ensemble's worker script ${script} is missing (is psibox built? run npm run build)`);
  const queue = [...tasks];
  const running = new Map<number | null, number>();
  const threads: Worker[] = [];
  return new Promise((resolve, reject) => {
    let finished = false;
    const finish = (error?: Error, reason?: string): void => {
      if (finished) return;
      finished = true;
      for (const w of threads) void w.terminate();
      if (error) reject(error);
      else resolve(reason);
    };
    const next = (w: Worker): void => {
      const reason = events.stopRequested?.();
      if (reason) return finish(undefined, reason);
      const index = queue.shift();
      if (index === undefined) {
        w.postMessage({ kind: "stop" } satisfies ToWorker);
        if (running.size === 0) finish();
        return;
      }
      running.set(index, 0);
      w.postMessage({ kind: "member", index } satisfies ToWorker);
    };
    const onMessage = (w: Worker, m: FromWorker): void => {
      if (finished) return;
      if (m.kind === "ready") return next(w);
      if (m.kind === "failed") return finish(new NumericsError(m.message));
      if (m.kind === "progress") {
        const reason = events.stopRequested?.();
        if (reason) return finish(undefined, reason);
        running.set(m.index, m.fraction);
        events.progress?.(running);
        return;
      }
      running.delete(m.index);
      events.done(m.index);
      next(w);
    };
    for (let i = 0; i < Math.max(1, Math.min(workers, tasks.length)); i++) {
      const w = new Worker(script, { workerData: { setup, dir } });
      w.on("message", (m: FromWorker) => onMessage(w, m));
      w.on("error", (e) => finish(new ThreadError(`an ensemble worker failed: ${e.message}`)));
      w.on("exit", (code) => {
        if (!finished && code !== 0) finish(new ThreadError(`an ensemble worker exited with code ${code}`));
      });
      threads.push(w);
    }
    if (tasks.length === 0) finish();
  });
}
