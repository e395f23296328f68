/**
 * Moments of a field's power |ψ_k|² over its wavevectors, in one pass over
 * a spectrum (row by row, summed in storage order): Σ|ψ_k|², Σ k²|ψ_k|²
 * (Parseval's gradient sum, K up to a factor) and Σ k_i |ψ_k|² per axis
 * (the mean momentum). The kinetic split and the granules' velocity
 * dispersion share them.
 */
import type { Grid } from "../grid/grid.js";
import type { BlockTables } from "./block-tables.js";

/** Σ|ψ_k|², Σ k²|ψ_k|² (full k², Nyquist included) and Σ k_i |ψ_k|² for i = 0, 1, 2. */
export interface SpectrumMoments {
  readonly weight: number;
  readonly k2: number;
  readonly k1: readonly [number, number, number];
}

/** The moments of the spectrum `spec` (interleaved complex, storage order, k as the grid's wavenumbers); in WebAssembly with `tables` of spec's memory (the same sums). */
export function spectrumMoments(grid: Grid, spec: Float64Array, tables?: BlockTables): SpectrumMoments {
  const [n0, n1] = grid.shape;
  // [Σ m, Σ k² m, Σ kx m, Σ ky m, Σ kz m]
  const acc = tables ? tables.sums.subarray(0, 5).fill(0) : new Float64Array(5);
  if (tables) tables.kernels.momentRows(spec, tables.k, grid.shape, 0, n0 * n1, acc);
  else {
    const [kx, ky] = [grid.wavenumbers(0), grid.wavenumbers(1)];
    const n2 = grid.shape[2];
    for (let i = 0, p = 0; i < n0; i++)
      for (let j = 0; j < n1; j++, p += 2 * n2) momentsRow(grid.wavenumbers(2), spec, p, kx[i]!, ky[j]!, acc);
  }
  return { weight: acc[0]!, k2: acc[1]!, k1: [acc[2]!, acc[3]!, acc[4]!] };
}

/** One row of the moments: modes [p, p + 2 n2) at (kx, ky), added into `acc`. */
function momentsRow(kz: Float64Array, spec: Float64Array, p: number, kx: number, ky: number, acc: Float64Array): void {
  const kab = kx * kx + ky * ky;
  let [w, k2, x1, y1, z1] = [acc[0]!, acc[1]!, acc[2]!, acc[3]!, acc[4]!];
  for (let l = 0; l < kz.length; l++, p += 2) {
    const m = spec[p]! * spec[p]! + spec[p + 1]! * spec[p + 1]!;
    w += m;
    k2 += (kab + kz[l]! * kz[l]!) * m;
    x1 += kx * m;
    y1 += ky * m;
    z1 += kz[l]! * m;
  }
  acc[0] = w;
  acc[1] = k2;
  acc[2] = x1;
  acc[3] = y1;
  acc[4] = z1;
}
