/**
 * Whole-grid complex transforms for the diagnostics, with the work grids
 * they run on. A diagnostic asks for work grid i, fills it, transforms it
 * in place and reads it; it keeps no reference to a work grid after it
 * returns, so the next diagnostic reuses the same memory. Two
 * implementations: `SimpleTransforms` here (fft.js on this thread, each work
 * grid its own array: the reference), and the step engine's kernels and
 * threads (integrators/pooled-transforms.ts), whose work grids live in the
 * step's shared memory. Conventions are those of fields/fft.ts: forward
 * F_k = Σ_x f_x e^{−ik·x}, inverse with 1/N, interleaved (re, im).
 */
import type { Triple } from "../grid/grid.js";
import { ComplexFft, outerCount } from "./fft.js";

export interface FieldTransforms {
  readonly shape: Triple;
  /** Work grid i (interleaved complex, 2 × cells long; contents undefined until written), the same array for the same i. */
  work(i: number): Float64Array;
  /** Forward transform of a work grid in place. */
  forward(grid: Float64Array): void;
  /** Inverse transform (with 1/N) of a work grid in place. */
  inverse(grid: Float64Array): void;
  /** The transform along one axis only of a work grid in place (the inverse with 1/n of that axis). */
  alongAxis(grid: Float64Array, axis: number, inverse: boolean): void;
}

/** fft.js on this thread; work grids are allocated on first use. */
export class SimpleTransforms implements FieldTransforms {
  readonly shape: Triple;
  private readonly fft: ComplexFft;
  private readonly grids: Float64Array[] = [];

  constructor(shape: Triple) {
    this.shape = shape;
    this.fft = new ComplexFft(shape);
  }

  work(i: number): Float64Array {
    while (this.grids.length <= i) this.grids.push(new Float64Array(2 * this.shape[0] * this.shape[1] * this.shape[2]));
    return this.grids[i]!;
  }

  forward(grid: Float64Array): void {
    this.fft.forward(grid);
  }

  inverse(grid: Float64Array): void {
    this.fft.inverse(grid);
  }

  alongAxis(grid: Float64Array, axis: number, inverse: boolean): void {
    this.fft.pass(grid, axis, inverse, 0, outerCount(this.shape, axis));
  }
}
