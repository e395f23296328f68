// Worker threads that fail loudly: every failure of a worker reaches the main
// thread as a ThreadError with its reason, within seconds, instead of a hang.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ThreadError } from "../../src/core/errors.js";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { allocateStepMemory } from "../../src/fields/step-allocate.js";
import { stepGeometry } from "../../src/fields/step-memory.js";
import { StepPlan } from "../../src/integrators/step-plan.js";
import { ThreadPool } from "../../src/integrators/thread-pool.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import type { StepTask } from "../../src/integrators/step-task.js";

let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-pool-"));
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

const grid = new Grid([8, 8, 8], [1, 1, 1]);
const kSquared = [0, 1, 2].map((ax) => grid.wavenumbers(ax as 0 | 1 | 2).map((k) => k * k));
const plan = new StepPlan(stepGeometry(grid.shape, "none"));
const setup = () => allocateStepMemory("wasm", plan.geometry, plan.transforms(), { kSquared }, 2).setup;
const out = new Float64Array(4);
// a pass along an axis the grid does not have: the engine throws. With one unit and two threads
// the main thread's range is empty, so only the worker runs it.
const BAD: StepTask = { op: "axis", field: "psi", axis: 5, inverse: false };
const GOOD: StepTask = { op: "copy", from: "psi", to: "undo" };

/** What `f` threw (it must throw). */
function thrown(f: () => unknown): { error: unknown } {
  try {
    f();
  } catch (error) {
    return { error };
  }
  throw new Error("did not throw");
}

describe("a thread pool whose workers fail", () => {
  it("refuses a missing worker script at once, naming the file (also through ThreadedStepper)", () => {
    const missing = path.join(work, "no-such-worker.js");
    const r = thrown(() => new ThreadPool(2, setup(), { script: missing }));
    expect(r.error).toBeInstanceOf(ThreadError);
    expect((r.error as ThreadError).exitCode).toBe(1);
    expect((r.error as Error).message).toMatch(/worker thread script .*no-such-worker\.js is missing/);
    const viaStepper = thrown(() => new ThreadedStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), 2, "wasm", { script: missing }));
    expect((viaStepper.error as Error).message).toMatch(/is missing/);
  });

  it("stops the constructor with the message of a script that throws while loading", () => {
    const broken = path.join(work, "broken-worker.mjs");
    fs.writeFileSync(broken, 'throw new Error("broken on purpose");\n');
    const r = thrown(() => new ThreadPool(2, setup(), { script: broken, startSeconds: 20 }));
    // the script's own message, not the 20 s start time-out's: the failure is noticed, not waited out
    expect((r.error as Error).message).toBe("worker thread 1 did not start: broken on purpose");
  });

  it("with deferStart the constructor returns at once and the first pass stops with the message of a script that throws while loading", () => {
    const broken = path.join(work, "broken-later.mjs");
    fs.writeFileSync(broken, 'throw new Error("broken on purpose, later");\n');
    const pool = new ThreadPool(2, setup(), { script: broken, startSeconds: 20, deferStart: true });
    expect(pool.closed).toBe(false);
    expect(() => pool.run(2, GOOD, out)).toThrow(/^worker thread 1 did not start: broken on purpose, later$/);
    expect(pool.closed).toBe(true);
  });

  it("with deferStart a sound pool runs its passes as one started at once", () => {
    const pool = new ThreadPool(2, setup(), { deferStart: true });
    try {
      pool.run(2, GOOD, out);
      pool.run(2, GOOD, out);
    } finally {
      pool.close();
    }
  });

  it("passes a worker's exception to the main thread, and keeps failing after it", () => {
    const pool = new ThreadPool(2, setup());
    try {
      pool.run(2, GOOD, out);
      const r = thrown(() => pool.run(1, BAD, out));
      expect(r.error).toBeInstanceOf(ThreadError);
      expect((r.error as Error).message).toMatch(/^worker thread 1 failed: \S/);
      expect((r.error as Error).message).not.toMatch(/\n/);
      expect(() => pool.run(2, GOOD, out)).toThrow(/worker thread 1 failed/);
    } finally {
      pool.close();
    }
  });

  it("notices a worker that was terminated between passes", async () => {
    const pool = new ThreadPool(2, setup());
    try {
      pool.run(2, GOOD, out);
      await pool.workers[0]!.terminate();
      expect(() => pool.run(2, GOOD, out)).toThrow(/^worker thread 1 exited during the run$/);
    } finally {
      pool.close();
    }
  });

  it("stops waiting for a worker terminated just before a pass, after the answer time-out", () => {
    const pool = new ThreadPool(2, setup(), { answerSeconds: 0.5 });
    try {
      void pool.workers[0]!.terminate();
      const r = thrown(() => pool.run(2, GOOD, out));
      expect((r.error as Error).message).toMatch(/^worker thread 1 (did not answer within 0.5 s|exited during the run)/);
    } finally {
      pool.close();
    }
  });
});
