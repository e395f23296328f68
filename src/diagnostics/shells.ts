/**
 * Shells of Fourier space shared by the spectra: width k_F (the fundamental
 * of the longest simulated side), bin i holding round(|k|/k_F) = i + 1, out
 * to the grid's corner, as the density power spectrum bins them; k = 0 is
 * in no shell. Also the spectral derivative along one axis.
 */
import type { Grid } from "../grid/grid.js";
import type { FieldTransforms } from "../fields/field-transforms.js";

/** Accumulates per-mode values into shells; `rows()` gives the mean k, the sums and the mode count per shell. */
export class Shells {
  readonly kF: number;
  readonly count: number;
  private readonly ksum: Float64Array;
  private readonly modes: Float64Array;
  private readonly sums: Float64Array[];

  /** @param series how many quantities each shell sums */
  constructor(grid: Grid, series: number) {
    const simulated = [0, 1, 2].filter((ax) => grid.shape[ax]! > 1);
    this.kF = Math.min(...simulated.map((ax) => (2 * Math.PI) / grid.extent[ax]!));
    this.count = Math.max(1, Math.round(Math.sqrt(grid.kSquaredMax) / this.kF));
    this.ksum = new Float64Array(this.count);
    this.modes = new Float64Array(this.count);
    this.sums = Array.from({ length: series }, () => new Float64Array(this.count));
  }

  /** The shell of |k| (−1 for k = 0). */
  bin(k: number): number {
    if (k === 0) return -1;
    return Math.min(this.count - 1, Math.max(0, Math.round(k / this.kF) - 1));
  }

  /** Count one mode of wavenumber k in its shell (k = 0 is ignored); returns the shell. */
  addMode(k: number): number {
    const b = this.bin(k);
    if (b >= 0) {
      this.ksum[b] = this.ksum[b]! + k;
      this.modes[b] = this.modes[b]! + 1;
    }
    return b;
  }

  /** Add `value` to quantity `series` of shell `b` (a no-op for b < 0). */
  add(b: number, series: number, value: number): void {
    if (b >= 0) this.sums[series]![b] = this.sums[series]![b]! + value;
  }

  /** Σ|k| by shell (a copy). */
  sumsOfK(): Float64Array {
    return Float64Array.from(this.ksum);
  }

  /** Modes by shell (a copy). */
  modeCounts(): Float64Array {
    return Float64Array.from(this.modes);
  }

  /** Quantity `series`'s sums by shell, for loops that add into them directly. */
  series(series: number): Float64Array {
    return this.sums[series]!;
  }

  /** Count every mode of `table` (the grid's own), as `addMode` over the modes in storage order would. */
  countModes(table: ModeShells): void {
    this.ksum.set(table.ksum);
    this.modes.set(table.modes);
  }

  /** Non-empty shells: mean |k|, the sums of each quantity and the mode count. */
  rows(): { k: number; sums: number[]; modes: number }[] {
    const out: { k: number; sums: number[]; modes: number }[] = [];
    for (let b = 0; b < this.count; b++) {
      if (this.modes[b]! > 0) out.push({ k: this.ksum[b]! / this.modes[b]!, sums: this.sums.map((s) => s[b]!), modes: this.modes[b]! });
    }
    return out;
  }
}

/** The shell of every mode of a grid (−1 for k = 0) in storage order, and each shell's Σ|k| and mode count. */
export interface ModeShells {
  readonly bins: Int16Array | Int32Array;
  readonly ksum: Float64Array;
  readonly modes: Float64Array;
}

let lastTable: { key: string; table: ModeShells } | undefined;

/** The shells of a grid's modes, made once for a grid's shape and extent (the last one is kept: snapshots of a run share it). */
export function modeShells(grid: Grid): ModeShells {
  const key = `${grid.shape.join(",")}/${grid.extent.join(",")}`;
  if (lastTable?.key === key) return lastTable.table;
  lastTable = undefined;
  const shells = new Shells(grid, 0);
  // on shared memory: the energy split's passes read it on the step's threads
  const bins = shells.count < 32767 ? new Int16Array(new SharedArrayBuffer(2 * grid.size)) : new Int32Array(new SharedArrayBuffer(4 * grid.size));
  const [n0, n1, n2] = grid.shape;
  const [k0, k1] = [grid.wavenumbers(0), grid.wavenumbers(1)];
  const k2 = grid.wavenumbers(2);
  // |k| of a row's modes: c and n2 − c have the same k² (FFT order: k_c = −k_(n2−c) exactly), so half the square roots do
  const mirrored = k2.every((k, c) => c === 0 || k * k === k2[n2 - c]! * k2[n2 - c]!);
  const row = new Float64Array(n2);
  for (let a = 0, i = 0; a < n0; a++) for (let b = 0; b < n1; b++, i += n2) shellRow(shells, bins, i, k0[a]! * k0[a]! + k1[b]! * k1[b]!, k2, mirrored ? (n2 >> 1) + 1 : n2, row);
  const table = { bins, ksum: shells.sumsOfK(), modes: shells.modeCounts() };
  lastTable = { key, table };
  return table;
}

/** One row of modeShells: the modes [i, i + n2) at k_a² + k_b² = kab, |k| of the first `own` computed (into `row`), the others' taken from their mirrors n2 − c; counted in storage order. */
function shellRow(shells: Shells, bins: Int16Array | Int32Array, i: number, kab: number, k2: Float64Array, own: number, row: Float64Array): void {
  const n2 = k2.length;
  for (let c = 0; c < own; c++) row[c] = Math.sqrt(kab + k2[c]! * k2[c]!);
  for (let c = 0; c < n2; c++, i++) bins[i] = shells.addMode(row[c < own ? c : n2 - c]!);
}

/** The wavenumbers of the spectral derivative along `axis`: k, with the Nyquist index's set to zero. */
export function derivativeWavenumbers(grid: Grid, axis: 0 | 1 | 2): Float64Array {
  const k = Float64Array.from(grid.wavenumbers(axis));
  if (grid.shape[axis] > 1) k[grid.shape[axis] / 2] = 0;
  return k;
}

/**
 * `out` ← ∂ψ/∂x_axis by the spectral derivative of the spectrum `spec`
 * (i k ψ_k, then the inverse transform), with the Nyquist plane's
 * derivative set to zero so that the derivative of a real field stays real
 * (`out` may be `spec`; both are work grids of `fft`).
 */
export function spectralDerivative(grid: Grid, fft: FieldTransforms, spec: Float64Array, axis: 0 | 1 | 2, out: Float64Array): void {
  timesIk(grid, spec, axis, out);
  fft.inverse(out);
}

/** out ← i k_axis spec, k_axis the derivative wavenumbers (the Nyquist index's zero), by the index along `axis`. */
function timesIk(grid: Grid, spec: Float64Array, axis: 0 | 1 | 2, out: Float64Array): void {
  const k = derivativeWavenumbers(grid, axis);
  const [n0, n1, n2] = grid.shape;
  // along the last axis the factor is k[c]; along the others one factor per row (the scale 0 · k[c] adds nothing)
  const zScale = axis === 2 ? 1 : 0;
  const kz = derivativeWavenumbers(grid, 2);
  for (let a = 0, p = 0; a < n0; a++)
    for (let b = 0; b < n1; b++, p += 2 * n2) derivativeRow(spec, out, p, axis === 0 ? k[a]! : axis === 1 ? k[b]! : 0, zScale, kz);
}

/** One row of the spectral derivative: out ← i (row + zScale k_c) spec over the modes [p, p + 2 n2). */
export function derivativeRow(spec: Float64Array, out: Float64Array, p: number, row: number, zScale: number, kz: Float64Array): void {
  for (let c = 0; c < kz.length; c++, p += 2) {
    const kk = row + zScale * kz[c]!;
    const re = spec[p]!;
    out[p] = -kk * spec[p + 1]!;
    out[p + 1] = kk * re;
  }
}

/** The simulated internal axes (e.g. [1, 2] in 2D). */
export function simulatedAxes(grid: Grid): (0 | 1 | 2)[] {
  return ([0, 1, 2] as const).filter((ax) => grid.shape[ax]! > 1);
}
