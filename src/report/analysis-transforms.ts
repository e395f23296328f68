/**
 * What `psibox analyze` computes the numbers of its snapshots on, made once
 * per grid shape and reused for every snapshot of a run (no grid is
 * allocated per snapshot): the step engine's kernels on the default threads
 * with the two work grids the energy split, the kinetic split and the
 * granules need (also the scratch of the densest points and halos; with the
 * energy split measured, only the first half of work grid 1 is ever
 * touched, so only that half takes memory), and a
 * third grid that ψ is read into, all in the step's shared memory; and the
 * helper thread (analysis-helper.ts), which starts while the first snapshot
 * is read and takes the vortex census beside the main thread. The analysis of a single
 * snapshot gives all of it back as soon as its numbers are known
 * (`numbersDone`), before the last figures are drawn.
 */
import v8 from "node:v8";
import vm from "node:vm";
import type { Grid } from "../grid/grid.js";
import { PooledTransforms } from "../integrators/pooled-transforms.js";
import { defaultThreads } from "../config/resolve-output.js";
import { blockTablesLength } from "../diagnostics/block-tables.js";
import { AnalysisHelper } from "./analysis-helper.js";
import { vortexJobOf, type VortexTable } from "./vortex-table.js";

/** Which work grid holds ψ (the diagnostics use 0 and 1). */
const PSI_GRID = 2;

export class AnalysisTransforms {
  private current: PooledTransforms | undefined;
  private helperThread: AnalysisHelper | undefined;

  /** @param single one snapshot only: the helper thread ends as soon as it has answered its census (its memory is given back while the numbers are computed) */
  constructor(readonly single = false) {}

  /** The transforms of `grid`'s shape (made when the shape is new). */
  of(grid: Grid): PooledTransforms {
    if (this.current && this.current.shape.every((n, i) => n === grid.shape[i])) return this.current;
    void this.current?.close();
    // the worker threads start while the caller goes on (reading the snapshot): the first transform waits for them
    const fft = new PooledTransforms(grid, 3, { threads: defaultThreads(grid.cells), pool: { deferStart: true }, tables: blockTablesLength(grid) });
    this.current = fft;
    // the helper thread starts now too, ready for the census once ψ is read
    this.helper(grid);
    return fft;
  }

  /** The grid of `grid`'s shape that ψ is read into (in shared memory: other threads can read it). */
  psiOf(grid: Grid): Float64Array {
    return this.of(grid).work(PSI_GRID);
  }

  /** The helper thread, on a grid large enough for the cores to pay (where the step too uses them), else undefined. */
  private helper(grid: Grid): AnalysisHelper | undefined {
    if (defaultThreads(grid.cells) < 2) return undefined;
    this.helperThread ??= new AnalysisHelper();
    return this.helperThread;
  }

  /** The vortex census of ψ on the helper thread, or undefined where there is none or ψ is not in shared memory (the caller computes it then). */
  vortices(grid: Grid, psi: Float64Array, kpc: number): Promise<VortexTable> | undefined {
    const job = vortexJobOf(grid, psi, kpc);
    const helper = this.helper(grid);
    if (!job || !helper) return undefined;
    // one snapshot's census is the helper's last: the thread ends as soon as it has answered
    const census = helper.vortices(job, this.single);
    return this.single ? census.finally(() => this.closeHelper()) : census;
  }

  private closeHelper(): Promise<void> {
    const helper = this.helperThread;
    this.helperThread = undefined;
    return helper?.close() ?? Promise.resolve();
  }

  /** Stop the threads; resolves when they have exited. */
  close(): Promise<void> {
    const current = this.current;
    this.current = undefined;
    return Promise.all([current?.close(), this.closeHelper()]).then(() => undefined);
  }

  /** Called when a snapshot's last pass on the pool's threads is done: one snapshot's analysis stops them now (the grids stay; a later pass would run on this thread), a run's keeps them. */
  poolDone(): void {
    if (this.single) void this.current?.close();
  }

  /**
   * Called when a snapshot's numbers are known. One snapshot's analysis (single) needs neither the grids nor
   * the threads any more: they are stopped and, once `lastReader` (what still reads ψ) has settled and the
   * caller holds no view of the grids, the
   * memory they share is unmapped by a collection now rather than at the engine's leisure (the process would
   * otherwise keep the grids to its end, while the last figures are drawn); small grids are left to the engine
   * (a full collection costs about 15 ms). A run's analysis keeps them.
   */
  async numbersDone(lastReader?: Promise<unknown>): Promise<void> {
    if (!this.single) return;
    const bytes = 16 * (this.current?.shape.reduce((p, n) => p * n, 1) ?? 0);
    await Promise.all([this.close(), lastReader]);
    if (bytes >= COLLECT_BYTES) collectGarbage();
  }
}

/** Grids of at least this many bytes (a complex grid of 64³) are unmapped by a collection when given back. */
const COLLECT_BYTES = 16 * 64 ** 3;

let collector: (() => void) | undefined;

/** A full garbage collection of this thread's heap (the engine's `gc`, exposed once). */
function collectGarbage(): void {
  if (!collector) {
    v8.setFlagsFromString("--expose-gc");
    collector = vm.runInNewContext("gc") as () => void;
  }
  collector();
}
