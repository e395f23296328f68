/**
 * The diagnostics' whole-grid transforms (fields/field-transforms.ts) on the
 * step engine: the WebAssembly SIMD kernels (or fft.js) over work grids laid
 * out as the step's memory, with the passes split across worker threads as
 * the step splits them. A transform is three axis passes (the last axis by
 * rows, then the strided axes by blocks of pencils), each a `StepTask`, so
 * a grid's transform is the same bit for bit whatever the thread count.
 */
import type { Triple } from "../grid/grid.js";
import type { Grid } from "../grid/grid.js";
import type { FieldTransforms } from "../fields/field-transforms.js";
import { allocateRegions } from "../fields/step-allocate.js";
import { createEngine, outerCount, type ComplexGrid, type StepEngine } from "../fields/step-engine.js";
import { regionName, regionView, stepGeometry, transformRegions, WASM_MAX_BYTES, wasmLayout, type FftBackend, type StepSetup, type Transform } from "../fields/step-memory.js";
import { kernelModule } from "../fields/wasm-kernels.js";
import { FieldKernels } from "../fields/field-kernels.js";
import { RESULT_LENGTH, runTask, transformOf, type StepTask } from "./step-task.js";
import { ThreadPool, type ThreadPoolOptions } from "./thread-pool.js";
import type { BlockTask, BlockThreads } from "../diagnostics/block-tasks.js";

/** What a pooled transform set is built with. */
export interface PooledOptions {
  /** Threads in all (1: this thread only). */
  readonly threads: number;
  /** "auto": the kernels when they load and the grids fit a 4 GiB memory, else fft.js. */
  readonly backend?: FftBackend | "auto";
  readonly pool?: ThreadPoolOptions;
  /** Doubles of a region for the diagnostics' passes in WebAssembly (diagnostics/block-tables.ts blockTablesLength; wasm backend only). */
  readonly tables?: number;
}

/** The transforms along each simulated axis of a shape. */
function axisTransforms(shape: Triple): Transform[] {
  const g = stepGeometry(shape, "none");
  return [0, 1, 2].filter((ax) => shape[ax]! > 1).map((axis) => transformOf({ op: "axis", field: "psi", axis, inverse: false }, g)!);
}

/** The backend for `grids` work grids of `shape` on `threads` threads. */
function chooseBackend(shape: Triple, grids: number, threads: number, choice: FftBackend | "auto", tables: number): FftBackend {
  if (choice !== "auto") return choice;
  const specs = transformRegions(stepGeometry(shape, "none"), grids, axisTransforms(shape), threads, tables);
  return kernelModule() !== null && wasmLayout(specs).total <= WASM_MAX_BYTES ? "wasm" : "js";
}

/** Work grids in the step's memory, transformed by the step engine's passes on a pool of threads. */
export class PooledTransforms implements FieldTransforms, BlockThreads {
  readonly shape: Triple;
  readonly backend: FftBackend;
  readonly threads: number;
  private readonly setup: StepSetup;
  private readonly views: Float64Array[];
  private readonly engine: StepEngine;
  private readonly pool: ThreadPool | undefined;
  private readonly result = new Float64Array(RESULT_LENGTH);

  /** @param grids how many work grids (work(0) … work(grids − 1)) */
  constructor(grid: Grid, grids: number, options: PooledOptions) {
    const shape = grid.shape;
    this.shape = shape;
    this.threads = Math.max(1, options.threads);
    this.backend = chooseBackend(shape, grids, this.threads, options.backend ?? "auto", options.tables ?? 0);
    const g = stepGeometry(shape, "none");
    const transforms = axisTransforms(shape);
    const kSquared = ([0, 1, 2] as const).map((ax) => Float64Array.from(grid.wavenumbers(ax), (k) => k * k));
    this.setup = allocateRegions(this.backend, g, transformRegions(g, grids, transforms, this.threads, options.tables ?? 0), transforms, { kSquared });
    this.views = Array.from({ length: grids }, (_, i) => regionView(this.setup, this.name(i)));
    this.engine = createEngine(this.setup, 0);
    this.pool = this.threads > 1 ? new ThreadPool(this.threads, this.setup, options.pool) : undefined;
  }

  /** The diagnostics' tables region and the passes on its memory (diagnostics/block-tables.ts), when this memory has them. */
  blockTables(): { region: Float64Array; kernels: FieldKernels } | undefined {
    const memory = this.engine.memory;
    if (!memory || !this.setup.regions[regionName.fieldTables]) return undefined;
    const kernels = FieldKernels.of(memory);
    return kernels ? { region: regionView(this.setup, regionName.fieldTables), kernels } : undefined;
  }

  private name(i: number): ComplexGrid {
    return `field.${i + 1}`;
  }

  work(i: number): Float64Array {
    const v = this.views[i];
    if (!v) throw new RangeError(`work grid ${i} of ${this.views.length}`);
    return v;
  }

  /** The region name of a work grid (an array that is not one is a programming error). */
  private nameOf(grid: Float64Array): ComplexGrid {
    const i = this.views.findIndex((v) => v.buffer === grid.buffer && v.byteOffset === grid.byteOffset && v.length === grid.length);
    if (i < 0) throw new Error("pooled transforms run on their own work grids only");
    return this.name(i);
  }

  forward(grid: Float64Array): void {
    const field = this.nameOf(grid);
    for (let axis = 2; axis >= 0; axis--) this.axisPass(field, axis, false);
  }

  inverse(grid: Float64Array): void {
    const field = this.nameOf(grid);
    for (let axis = 0; axis < 3; axis++) this.axisPass(field, axis, true);
  }

  alongAxis(grid: Float64Array, axis: number, inverse: boolean): void {
    this.axisPass(this.nameOf(grid), axis, inverse);
  }

  private axisPass(field: ComplexGrid, axis: number, inverse: boolean): void {
    if (this.shape[axis]! < 2) return;
    const task: StepTask = { op: "axis", field, axis, inverse };
    const units = outerCount(this.shape, axis);
    if (this.pool && !this.pool.closed) this.pool.run(units, task, this.result);
    else runTask(this.engine, task, 0, units, this.result);
  }

  /** A diagnostics' pass over `blocks` (diagnostics/block-tasks.ts), split across the threads as a transform's units are. */
  runBlocks(blocks: number, task: BlockTask): void {
    const step: StepTask = { op: "blocks", task };
    if (this.pool && !this.pool.closed) this.pool.run(blocks, step, this.result);
    else runTask(this.engine, step, 0, blocks, this.result);
  }

  /** Stop the worker threads (the work grids stay readable, and later passes run on this thread); resolves when they have exited. */
  close(): Promise<void> {
    return this.pool?.close() ?? Promise.resolve();
  }
}
