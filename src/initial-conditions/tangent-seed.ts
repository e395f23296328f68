/**
 * The start of a tangent-linear field: a perturbation of the reference's
 * density and phase by band-limited noise, dψ₀ = (η₁ + iη₂)ψ, with η₁, η₂
 * independent real Gaussian white noise of a stated seed (the same seed
 * gives the same noise on any machine) kept only at 0 < |k| ≤ k_max: so the
 * seed lies below the Jeans scale, where the gravitational instability
 * lives, and adds no grid-scale power. k = 0 is removed (a uniform η would
 * be the neutral phase and norm directions).
 */
import type { Grid } from "../grid/grid.js";
import { ComplexFft } from "../fields/fft.js";
import { SeededRandom } from "../math/random.js";

/**
 * The Jeans wavenumber (comoving, code units ħ/m = 1, 4πG = 1) of a
 * comoving density ρ at scale factor a: (k²/2a²)² = ρ/a³, the k where the
 * growth rate √(4πGρ − (ħk²/2m)²) of a uniform medium vanishes
 * (Khlopov, Malomed & Zeldovich 1985).
 */
export function jeansWavenumber(rho: number, a: number): number {
  return Math.sqrt(2 * a * a * Math.sqrt(rho / (a * a * a)));
}

/** Band-limited noise η₁ + iη₂ at 0 < |k| ≤ kMax (at least the box's lowest modes), unit variance per cell before the cut. */
export function bandLimitedNoise(grid: Grid, kMax: number, seed: number): Float64Array {
  const rng = new SeededRandom(seed);
  const z = new Float64Array(2 * grid.size);
  for (let i = 0; i < z.length; i++) z[i] = rng.normal();
  const fft = new ComplexFft(grid.shape);
  fft.forward(z);
  let lowest = Infinity;
  grid.forEachMode((_p, kx, ky, kz) => {
    const k2 = kx * kx + ky * ky + kz * kz;
    if (k2 > 0) lowest = Math.min(lowest, k2);
  });
  const cut = Math.max(kMax * kMax, lowest * (1 + 1e-12));
  grid.forEachMode((p, kx, ky, kz) => {
    const k2 = kx * kx + ky * ky + kz * kz;
    if (k2 === 0 || k2 > cut) z[p] = z[p + 1] = 0;
  });
  fft.inverse(z);
  return z;
}

/** dψ₀ = (η₁ + iη₂)ψ with the band-limited noise of `seed`. */
export function tangentSeed(grid: Grid, psi: Float64Array, kMax: number, seed: number): Float64Array {
  const eta = bandLimitedNoise(grid, kMax, seed);
  const out = new Float64Array(psi.length);
  for (let i = 0; i < psi.length; i += 2) {
    out[i] = eta[i]! * psi[i]! - eta[i + 1]! * psi[i + 1]!;
    out[i + 1] = eta[i]! * psi[i + 1]! + eta[i + 1]! * psi[i]!;
  }
  return out;
}
