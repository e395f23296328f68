/**
 * A run's totals over its species (code units): each species' mass, kinetic
 * energy K_i = ∫|∇ψ_i|²/(2μ_i² a²) (ħ/m = 1, so ħ²/2m_i² = 1/2μ_i²) and its
 * share of the potential energy W_i = ½∫ρ_i φ/a, which sum to the run's W.
 * The first species is ψ itself (μ = 1); the later ones are the stepper's
 * extra fields 1 … S.
 */
import type { SplitStepper } from "../integrators/split-step.js";

/** One species' mass, kinetic and potential energy (code units). */
export interface SpeciesEnergy {
  readonly mass: number;
  readonly kinetic: number;
  readonly potential: number;
}

/** Σρφ over the grid of a stored field (the kick leaves |ψ| as it is). */
function rhoPhi(psi: Float64Array, phi: Float64Array): number {
  let sum = 0;
  for (let p = 0; p < phi.length; p++) sum += (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2) * phi[p]!;
  return sum;
}

/** Largest summed density Σ_i |ψ_i|² over the grid. */
export function maxSummedDensity(stepper: SplitStepper, count: number): number {
  const fields = [stepper.rawPsi, ...Array.from({ length: count }, (_, i) => stepper.rawField(i + 1))];
  let max = 0;
  for (let p = 0; p < stepper.grid.size; p++) {
    let rho = 0;
    for (const f of fields) rho += f[2 * p]! ** 2 + f[2 * p + 1]! ** 2;
    if (rho > max) max = rho;
  }
  return max;
}

/** Each species' energies at scale factor a: ψ's first, then those of mass ratios `ratios` (extra fields 1 …). */
export function speciesEnergies(stepper: SplitStepper, ratios: readonly number[], a: number): SpeciesEnergy[] {
  const dv = stepper.grid.cellVolume;
  const first: SpeciesEnergy = { mass: stepper.mass, kinetic: stepper.kineticTilde() / (a * a), potential: (0.5 / a) * stepper.moments().rhoPhi * dv };
  const later = ratios.map((mu, k) => {
    const i = k + 1;
    const kinetic = stepper.fieldKineticTilde(i) / (mu * mu * a * a);
    return { mass: stepper.fieldMass(i), kinetic, potential: (0.5 / a) * rhoPhi(stepper.rawField(i), stepper.phi) * dv };
  });
  return [first, ...later];
}
