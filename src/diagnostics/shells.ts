/**
 * Shells of Fourier space shared by the spectra: width k_F (the fundamental
 * of the longest simulated side), bin i holding round(|k|/k_F) = i + 1, out
 * to the grid's corner, as the density power spectrum bins them; k = 0 is
 * in no shell. Also the spectral derivative along one axis and the index of
 * the mode −k, which the spectra of two real fields packed into one complex
 * transform need.
 */
import type { Grid } from "../grid/grid.js";
import type { ComplexFft } from "../fields/fft.js";

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

  /** Non-empty shells: mean |k|, the sums of each quantity and the mode count. */
  rows(): { k: number; sums: number[]; modes: number }[] {
    const out: { k: number; sums: number[]; modes: number }[] = [];
    for (let b = 0; b < this.count; b++) {
      if (this.modes[b]! > 0) out.push({ k: this.ksum[b]! / this.modes[b]!, sums: this.sums.map((s) => s[b]!), modes: this.modes[b]! });
    }
    return out;
  }
}

/**
 * `out` ← ∂ψ/∂x_axis by the spectral derivative of the spectrum `spec`
 * (i k ψ_k), with the Nyquist plane's derivative set to zero so that the
 * derivative of a real field stays real (`out` may be `spec`).
 */
export function spectralDerivative(grid: Grid, fft: ComplexFft, spec: Float64Array, axis: 0 | 1 | 2, out: Float64Array): void {
  const k = grid.wavenumbers(axis);
  const [, n1, n2] = grid.shape;
  const n = grid.size;
  for (let i = 0; i < n; i++) {
    const idx = axis === 0 ? Math.floor(i / (n1 * n2)) : axis === 1 ? Math.floor(i / n2) % n1 : i % n2;
    const kk = 2 * idx === grid.shape[axis] ? 0 : k[idx]!;
    const re = spec[2 * i]!;
    const im = spec[2 * i + 1]!;
    out[2 * i] = -kk * im;
    out[2 * i + 1] = kk * re;
  }
  fft.inverse(out);
}

/** Cell index of the mode −k for the mode at cell index i (periodic). */
export function mirrorIndex(grid: Grid, i: number): number {
  const [n0, n1, n2] = grid.shape;
  const a = Math.floor(i / (n1 * n2));
  const b = Math.floor(i / n2) % n1;
  const c = i % n2;
  return (((n0 - a) % n0) * n1 + ((n1 - b) % n1)) * n2 + ((n2 - c) % n2);
}

/** The simulated internal axes (e.g. [1, 2] in 2D). */
export function simulatedAxes(grid: Grid): (0 | 1 | 2)[] {
  return ([0, 1, 2] as const).filter((ax) => grid.shape[ax]! > 1);
}
