/**
 * A periodic box of 1, 2 or 3 axes with power-of-two cell counts. Internally
 * every grid is three-dimensional with leading axes of size 1 for the axes
 * that are not simulated, so one code path serves 1D, 2D and 3D: an absent
 * axis is simply flat. Storage is row-major (C order) with the last axis
 * fastest: cell (i0, i1, i2) is at index (i0·n1 + i1)·n2 + i2.
 *
 * Lengths are in code units. Lower-dimensional runs describe fields that do
 * not vary along the missing axes; totals (mass, energy) are taken over a
 * depth of one code length unit along each missing axis.
 */
import { ConfigError } from "../core/errors.js";

/** Smallest and largest cell count allowed along an axis. */
export const MIN_CELLS = 4;
export const MAX_CELLS = 1 << 20;
/** Largest total number of cells (2^27: a 512³ grid, 2 GiB per complex field). */
export const MAX_TOTAL_CELLS = 1 << 27;

/** A 3-tuple of numbers, one per internal axis. */
export type Triple = readonly [number, number, number];

/** Periodic box: cell counts, side lengths, spacings and wavenumbers. */
export class Grid {
  /** Number of simulated axes (1, 2 or 3). */
  readonly dims: number;
  /** Cell counts of the simulated axes, as the user gave them. */
  readonly cells: readonly number[];
  /** Side lengths of the simulated axes [code length]. */
  readonly lengths: readonly number[];
  /** Internal 3D shape (leading 1s for absent axes). */
  readonly shape: Triple;
  /** Internal 3D side lengths (1 for absent axes). */
  readonly extent: Triple;
  /** Internal 3D cell spacings (1 for absent axes). */
  readonly spacing: Triple;
  /** Total number of cells. */
  readonly size: number;
  /** Measure of one cell: the product of the simulated spacings. */
  readonly cellVolume: number;
  /** Measure of the box: the product of the simulated lengths. */
  readonly volume: number;
  private readonly k: readonly [Float64Array, Float64Array, Float64Array];

  /**
   * @param cells cells per simulated axis (powers of two, 4 … 2²⁰; at most 2²⁷ in all)
   * @param lengths side lengths per simulated axis [code length], positive
   */
  constructor(cells: readonly number[], lengths: readonly number[]) {
    if (cells.length < 1 || cells.length > 3) {
      throw new ConfigError("grid.cells", `give 1, 2 or 3 cell counts, got ${cells.length}`);
    }
    if (lengths.length !== cells.length) {
      throw new ConfigError("grid.box", `give one length or ${cells.length} (one per axis), got ${lengths.length}`);
    }
    for (const n of cells) {
      if (!Number.isInteger(n) || n < MIN_CELLS || n > MAX_CELLS || (n & (n - 1)) !== 0) {
        throw new ConfigError(
          "grid.cells",
          `${n} is not a power of two from ${MIN_CELLS} to ${MAX_CELLS} (the FFT is radix-2/4): use e.g. 32, 64, 128`,
        );
      }
    }
    const total = cells.reduce((p, n) => p * n, 1);
    if (total > MAX_TOTAL_CELLS) {
      throw new ConfigError("grid.cells", `${cells.join("×")} is ${total} cells, more than the ${MAX_TOTAL_CELLS} (512³) psibox holds in memory`);
    }
    for (const l of lengths) {
      if (!(l > 0) || !Number.isFinite(l)) throw new ConfigError("grid.box", "side lengths must be positive and finite");
    }
    this.dims = cells.length;
    this.cells = [...cells];
    this.lengths = [...lengths];
    const pad = 3 - cells.length;
    const shape = [1, 1, 1];
    const extent = [1, 1, 1];
    for (let i = 0; i < cells.length; i++) {
      shape[pad + i] = cells[i] as number;
      extent[pad + i] = lengths[i] as number;
    }
    this.shape = [shape[0] as number, shape[1] as number, shape[2] as number];
    this.extent = [extent[0] as number, extent[1] as number, extent[2] as number];
    this.spacing = [extent[0]! / shape[0]!, extent[1]! / shape[1]!, extent[2]! / shape[2]!];
    this.size = shape[0]! * shape[1]! * shape[2]!;
    this.volume = lengths.reduce((p, l) => p * l, 1);
    this.cellVolume = this.volume / this.size;
    this.k = [angularWavenumbers(this.shape[0], this.extent[0]), angularWavenumbers(this.shape[1], this.extent[1]), angularWavenumbers(this.shape[2], this.extent[2])];
  }

  /** Angular wavenumbers 2π j / L along an internal axis (FFT order; Nyquist counted negative). */
  wavenumbers(axis: 0 | 1 | 2): Float64Array {
    return this.k[axis];
  }

  /** Largest |k|² on the grid: the corner mode, Σ (π/dx)² over simulated axes. */
  get kSquaredMax(): number {
    let s = 0;
    for (let ax = 0; ax < 3; ax++) if ((this.shape[ax] as number) > 1) s += (Math.PI / (this.spacing[ax] as number)) ** 2;
    return s;
  }

  /** Cell-centre coordinate (x = i·dx, so cell 0 sits at the origin) along an internal axis. */
  coordinate(axis: 0 | 1 | 2, i: number): number {
    return i * (this.spacing[axis] as number);
  }

  /**
   * Visit every Fourier mode in storage order: `visit(p, kx, ky, kz, a, b, c)`
   * with p the interleaved complex offset (2 × cell index), the angular
   * wavenumbers along the three internal axes and the mode's indices.
   */
  forEachMode(visit: (p: number, kx: number, ky: number, kz: number, a: number, b: number, c: number) => void): void {
    const [k0, k1, k2] = this.k;
    const [n0, n1, n2] = this.shape;
    let p = 0;
    for (let a = 0; a < n0; a++)
      for (let b = 0; b < n1; b++)
        for (let c = 0; c < n2; c++, p += 2) visit(p, k0[a] as number, k1[b] as number, k2[c] as number, a, b, c);
  }

  /** Readable one-line summary. */
  describe(): string {
    return `${this.dims}D grid ${this.cells.join("×")} cells, box ${this.lengths.map((l) => l.toPrecision(4)).join("×")} (code lengths)`;
  }
}

function angularWavenumbers(n: number, length: number): Float64Array {
  const k = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const m = j < n / 2 ? j : j - n;
    k[j] = (2 * Math.PI * m) / length;
  }
  return k;
}

/**
 * Isolated gravity solves on a grid doubled along every axis (zero padding):
 * refuse, in the user's own numbers, a grid whose doubled solve exceeds the limits.
 */
export function checkIsolatedGrid(cells: readonly number[]): void {
  const axisMax = MAX_CELLS / 2;
  const totalMax = MAX_TOTAL_CELLS / 2 ** cells.length;
  const total = cells.reduce((p, n) => p * n, 1);
  if (cells.some((n) => n > axisMax) || total > totalMax) {
    const side = Math.min(axisMax, 2 ** Math.floor(Math.log2(totalMax) / cells.length));
    const example = Array<number>(cells.length).fill(side).join("×");
    throw new ConfigError(
      "grid.cells",
      `${cells.join("×")} is too large for isolated gravity, whose zero-padded solve doubles every axis: use at most ${axisMax} cells per axis and ${totalMax} in all (e.g. ${example}), or periodic gravity`,
    );
  }
}
