/**
 * The split-step on several cores: the same passes as SplitStepper, each
 * split into contiguous row or pencil ranges run by worker threads on shared
 * memory. Every cell and pencil is computed by the same code whatever the
 * thread count, so the field is bit for bit the one a single thread gives
 * (only sums, the mass and the kinetic sum, are added up in a
 * thread-dependent order). A worker that fails, exits or stops answering
 * makes the step throw a ThreadError (exit code 1) with its reason.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import type { PoissonSolver } from "../fields/poisson.js";
import type { FftChoice } from "./fft-backend.js";
import type { FieldKind } from "./extra-fields.js";
import { SplitStepper } from "./split-step.js";
import type { StepTask } from "./step-task.js";
import { ThreadPool, type ThreadPoolOptions } from "./thread-pool.js";

/** A SplitStepper whose passes run on `threads` worker threads. */
export class ThreadedStepper extends SplitStepper {
  readonly threads: number;
  private readonly pool: ThreadPool;

  /**
   * @param pool where the worker script is and how long the pool waits for its workers (defaults suit runs)
   * @param fields kinds of the extra fields advanced with ψ (see SplitStepper)
   * @param contact ψ's contact coefficient (see SplitStepper)
   */
  constructor(
    grid: Grid,
    background: Background,
    gravity: PoissonSolver,
    threads: number,
    fft: FftChoice = "auto",
    pool: ThreadPoolOptions = {},
    fields: readonly FieldKind[] = [],
    contact = 0,
  ) {
    super(grid, background, gravity, fft, threads, fields, contact);
    this.threads = threads;
    this.pool = new ThreadPool(threads, this.memory.setup, pool);
  }

  /** Passes run on the workers; after close() on this thread (so an owed kick can still be applied when ψ is read). */
  protected override runPassInto(count: number, task: StepTask, out: Float64Array): void {
    if (this.pool.closed) super.runPassInto(count, task, out);
    else this.pool.run(count, task, out);
  }

  override close(): void {
    this.pool.close();
  }
}
