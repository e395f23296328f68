/**
 * The split-step on several cores: the same passes as SplitStepper, each
 * split into contiguous row or pencil ranges run by worker threads on shared
 * memory. Every cell and pencil is computed by the same code whatever the
 * thread count, so the field is bit for bit the one a single thread gives
 * (only the mass, a sum, is added up in a thread-dependent order).
 * The periodic Poisson solve runs threaded too; isolated gravity runs on the
 * main thread.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import { PeriodicPoisson, type PoissonSolver } from "../fields/poisson.js";
import { outerCount, RealFft } from "../fields/fft.js";
import { SplitStepper } from "./split-step.js";
import { ThreadPool } from "./thread-pool.js";

/** A SplitStepper whose passes run on `threads` worker threads. */
export class ThreadedStepper extends SplitStepper {
  readonly threads: number;
  private readonly pool: ThreadPool;
  private readonly results: Float64Array;
  private readonly spectrum: Float64Array | undefined;
  private readonly halfShape: readonly [number, number, number] | undefined;

  constructor(grid: Grid, background: Background, gravity: PoissonSolver, threads: number) {
    super(grid, background, gravity, true);
    this.threads = threads;
    const periodic = gravity instanceof PeriodicPoisson ? gravity : undefined;
    let spectrumBuffer: SharedArrayBuffer | undefined;
    if (periodic) {
      const rfft = new RealFft(grid.shape);
      this.halfShape = rfft.halfShape;
      spectrumBuffer = new SharedArrayBuffer(8 * rfft.halfLength);
      this.spectrum = new Float64Array(spectrumBuffer);
    }
    const resultsBuffer = new SharedArrayBuffer(8 * threads);
    this.results = new Float64Array(resultsBuffer);
    this.pool = new ThreadPool(threads, {
      shape: [...grid.shape],
      psi: this.psi.buffer as SharedArrayBuffer,
      phi: this.phi.buffer as SharedArrayBuffer,
      spectrum: spectrumBuffer,
      phase: this.phase[0].buffer as SharedArrayBuffer,
      results: resultsBuffer,
      wavenumbers: [0, 1, 2].map((ax) => Array.from(grid.wavenumbers(ax as 0 | 1 | 2))),
      kSquared: periodic ? periodic.kSquared.map((a) => Array.from(a)) : undefined,
    });
  }

  private get rows(): number {
    return this.grid.shape[0] * this.grid.shape[1];
  }

  override kick(factor: number): void {
    if (factor === 0 || this.gravity.kind === "none") return;
    this.pool.parallel(this.rows, (lo, hi) => ({ op: "kick", factor, lo, hi }));
  }

  private axes(inverse: boolean): void {
    const order = inverse ? [0, 1, 2] : [2, 1, 0];
    for (const axis of order) {
      if (this.grid.shape[axis]! === 1) continue;
      this.pool.parallel(outerCount(this.grid.shape, axis), (lo, hi) => ({ op: "axis", axis, inverse, lo, hi }));
    }
  }

  override drift(factor: number): void {
    this.axes(false);
    this.fillPhaseTables(factor);
    if (this.trackKinetic) {
      this.pool.parallel(this.rows, (lo, hi, slot) => ({ op: "gradient", slot, lo, hi }));
      let sum = 0;
      for (let i = 0; i < this.threads; i++) sum += this.results[i]!;
      this.results.fill(0);
      this.midKineticTilde = (sum * this.grid.cellVolume) / this.grid.size;
    }
    this.pool.parallel(this.rows, (lo, hi) => ({ op: "drift", lo, hi }));
    this.axes(true);
  }

  override updatePotential(): void {
    this.results.fill(0);
    this.pool.parallel(this.rows, (lo, hi, slot) => ({ op: "density", slot, lo, hi }));
    let sum = 0;
    for (let i = 0; i < this.threads; i++) sum += this.results[i]!;
    this.mass = sum * this.grid.cellVolume;
    if (!this.spectrum || !this.halfShape) {
      this.gravity.solveInPlace(this.phi);
      return;
    }
    const half = this.halfShape;
    const halfRows = half[0] * half[1];
    this.pool.parallel(this.rows, (lo, hi) => ({ op: "rfft-rows", lo, hi }));
    for (const axis of [1, 0] as const) {
      if (half[axis] > 1) this.pool.parallel(outerCount(half, axis), (lo, hi) => ({ op: "half-axis", axis, inverse: false, lo, hi }));
    }
    this.pool.parallel(halfRows, (lo, hi) => ({ op: "poisson", lo, hi }));
    for (const axis of [0, 1] as const) {
      if (half[axis] > 1) this.pool.parallel(outerCount(half, axis), (lo, hi) => ({ op: "half-axis", axis, inverse: true, lo, hi }));
    }
    this.pool.parallel(this.rows, (lo, hi) => ({ op: "irfft-rows", lo, hi }));
  }

  override close(): void {
    this.pool.close();
  }
}
