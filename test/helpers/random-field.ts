/** A complex Gaussian random field with a chosen spectrum, for the diagnostics' statistical tests. */
import { Grid } from "../../src/grid/grid.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { seededRandom } from "./fields.js";

/**
 * ψ(x) = Σ_k a_k e^{ik·x} with independent complex Gaussian a_k of variance
 * `spectrum(k²)` (random phases, Rayleigh amplitudes): a circular Gaussian
 * random field whose ⟨|ψ|²⟩ is Σ_k spectrum(k²).
 */
export function gaussianComplexField(grid: Grid, spectrum: (k2: number) => number, seed: number): Float64Array {
  const rand = seededRandom(seed);
  const uniform = () => 0.5 * (rand() + 1);
  const psi = new Float64Array(2 * grid.size);
  grid.forEachMode((p, kx, ky, kz) => {
    const s = Math.sqrt(spectrum(kx * kx + ky * ky + kz * kz) / 2);
    const r = Math.sqrt(-2 * Math.log(1 - uniform()));
    const t = 2 * Math.PI * uniform();
    psi[p] = s * r * Math.cos(t) * grid.size;
    psi[p + 1] = s * r * Math.sin(t) * grid.size;
  });
  new ComplexFft(grid.shape).inverse(psi);
  return psi;
}

/** ⟨k²⟩ of a spectrum over the grid's modes: Σ k² S / Σ S. */
export function meanK2(grid: Grid, spectrum: (k2: number) => number): number {
  let num = 0;
  let den = 0;
  grid.forEachMode((_p, kx, ky, kz) => {
    const k2 = kx * kx + ky * ky + kz * kz;
    num += k2 * spectrum(k2);
    den += spectrum(k2);
  });
  return num / den;
}
