/**
 * A run's totals over its species (code units): each species' mass, kinetic
 * energy K_i = ∫|∇ψ_i|²/(2μ_i² a²) (ħ/m = 1, so ħ²/2m_i² = 1/2μ_i²), its
 * share of the potential energy W_i = ½∫ρ_i φ/a, which sum to the run's W,
 * and its own contact energy U_i = (g_i/2)∫ρ_i² (g_i its coefficient,
 * physics/contact.ts `contactCode` with μ_i: the physical (g_SI,i/2)∫n_i²
 * with n_i = ρ_i/m_i). The first species is ψ itself (μ = 1); the later
 * ones are the stepper's extra fields 1 … S. Species interact with each
 * other by gravity only: there is no cross-species contact energy.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import type { ResolvedRun } from "../config/resolve.js";
import type { CodeUnits } from "../physics/units.js";
import { contactCode } from "../physics/contact.js";
import { contactEnergy } from "../diagnostics/energies.js";

/** One species' mass, kinetic, potential and contact energy (code units). */
export interface SpeciesEnergy {
  readonly mass: number;
  readonly kinetic: number;
  readonly potential: number;
  /** U_i = (g_i/2)∫ρ_i² dV (0 without its own contact term). */
  readonly contact: number;
}

/** Each species' contact coefficient g_i in the run's code units (0: none), the first species' first. */
export function speciesContacts(run: ResolvedRun, units: CodeUnits): number[] {
  const first = run.contact ? contactCode(run.contact.scatteringLengthM, units) : 0;
  return [first, ...run.species.map((sp) => (sp.contact ? contactCode(sp.contact.scatteringLengthM, units, sp.massRatio) : 0))];
}

/** Σρφ over the grid of a stored field (the kick leaves |ψ| as it is). */
function rhoPhi(psi: Float64Array, phi: Float64Array): number {
  let sum = 0;
  for (let p = 0; p < phi.length; p++) sum += (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2) * phi[p]!;
  return sum;
}

/** Σρ² over the grid of a stored field. */
function rhoSquared(psi: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < psi.length; i += 2) sum += (psi[i]! ** 2 + psi[i + 1]! ** 2) ** 2;
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

/**
 * Each species' energies at scale factor a: ψ's first, then those of mass ratios `ratios` (extra fields 1 …).
 * @param contacts each species' contact coefficient, ψ's first (speciesContacts); none: no contact energies
 */
export function speciesEnergies(stepper: SplitStepper, ratios: readonly number[], a: number, contacts: readonly number[] = []): SpeciesEnergy[] {
  const dv = stepper.grid.cellVolume;
  // U = (g/2)∫n² dV physical: ρ_phys = ρ/a³ and dV_phys = a³ dV, so U = (g/(2a³))Σρ² ΔV (diagnostics/energies.ts)
  const u = (i: number, sum: () => number): number => (contacts[i] ? contactEnergy(stepper.grid, contacts[i], sum(), a) : 0);
  const moments = stepper.moments();
  const first: SpeciesEnergy = { mass: stepper.mass, kinetic: stepper.kineticTilde() / (a * a), potential: (0.5 / a) * moments.rhoPhi * dv, contact: u(0, () => moments.rho2) };
  const later = ratios.map((mu, k) => {
    const i = k + 1;
    const kinetic = stepper.fieldKineticTilde(i) / (mu * mu * a * a);
    const field = stepper.rawField(i);
    return { mass: stepper.fieldMass(i), kinetic, potential: (0.5 / a) * rhoPhi(field, stepper.phi) * dv, contact: u(i, () => rhoSquared(field)) };
  });
  return [first, ...later];
}
