/**
 * The condensate modes of several species sharing one potential, and the
 * cross coefficients between them (code units: ħ/m = 1 for the first
 * species' particle mass m, 4πG = 1). Species i holds N_i = M_i/m_i
 * particles (m_i = μ_i m) in the mode φ_i = ψ_i/√M_i (ψ_i in mass-density
 * units, ∫|φ_i|² = 1). With the field operators ψ̂_i = φ_i b_i in the
 * normal-ordered gravitational energy ½∫∫ :ρ̂(x) ρ̂(y): G(x − y), where
 * ρ̂ = Σ_i m_i ψ̂_i†ψ̂_i, the modes obey the multi-mode Kerr Hamiltonian
 *
 *   H = Σ_i [ħω_i n_i + (ħχ_i/2) b_i†b_i†b_i b_i] + Σ_{i<j} ħχ_ij n_i n_j,
 *
 * where the terms of one species give its own coefficients and the terms of
 * two (whose operators commute, so normal ordering leaves n_i n_j) give
 *   ħχ_ij = m_i m_j ∫∫|φ_i(x)|²|φ_j(y)|² G(x − y) = W_ij / (N_i N_j),
 * with W_ij = ∫ρ_i Φ[ρ_j] dV the two species' mutual gravitational energy
 * (Φ[ρ_j] the potential of species j's density alone); likewise
 * ħχ_i = 2 W_ii / N_i² with W_ii = ½∫ρ_i Φ[ρ_i] dV (its own potential only),
 * and ħω_i = K_i/N_i with K_i = (ħ²/2m_i²a²)∫|∇ψ_i|² dV. The summed
 * potential energy is W = Σ_i W_ii + Σ_{i<j} W_ij. In free space χ_ij < 0;
 * periodic gravity takes the mean density out of the source, so modes far
 * apart in the box can have χ_ij > 0.
 *
 * A species with its own contact interaction (g_i in code units: the term
 * g_i ρ_i it adds to the potential per unit mass, g_SI,i = g_i m_i²) adds
 * (g_SI,i/2)∫ψ̂_i†ψ̂_i†ψ̂_i ψ̂_i = (ħχ_SI,i/2) b_i†b_i†b_i b_i to its own
 * mode: ħχ_SI,i = g_SI,i ∫|φ_i|⁴ = 2U_i/N_i² with U_i = (g_i/2)∫ρ_i² dV, so
 * χ_i = χ_grav,i + χ_SI,i. The cross coefficient stays gravitational: each
 * species' contact term acts on its own density only (the equations have
 * no inter-species contact term), so no b_i†b_j†b_j b_i term arises.
 */
import type { Grid } from "../grid/grid.js";
import type { PoissonSolver } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";
import { kineticEnergy, potentialEnergy } from "../diagnostics/energies.js";
import { coefficientsFrom, type ModeCoefficients } from "./mode.js";

/** One species' field in the first species' code units, its particle mass ratio μ = m_i/m and its own contact coefficient. */
export interface SpeciesField {
  readonly psi: Float64Array;
  readonly massRatio: number;
  /** g_i in the first species' code units (physics/contact.ts `contactCode` with μ_i); 0 or absent: none. */
  readonly contact?: number;
}

/** The modes of every species and the cross coefficients of each pair (i < j). */
export interface SpeciesModes {
  /** Each species' own mode (its particles, ω from its kinetic energy, χ from its own potential plus its contact part `chiContact`). */
  readonly modes: readonly ModeCoefficients[];
  /** χ_ij [1/code time] and the mutual energy W_ij [code energy] of species i and j, i < j. */
  readonly cross: readonly { readonly i: number; readonly j: number; readonly chi: number; readonly energy: number }[];
}

/** Σρ_i Φ_j ΔV / a: the mutual energy of a density and another's potential. */
function mutualEnergy(grid: Grid, rho: Float64Array, phi: Float64Array, a: number): number {
  let sum = 0;
  for (let p = 0; p < rho.length; p++) sum += rho[p]! * phi[p]!;
  return (sum * grid.cellVolume) / a;
}

/**
 * The species' modes and cross coefficients at scale factor a (own Poisson solves with `gravity`).
 * @param particleMass the first species' particle mass m in code mass units (ħ = m in code units)
 */
export function speciesModes(grid: Grid, fields: readonly SpeciesField[], a: number, particleMass: number, gravity: PoissonSolver): SpeciesModes {
  const hbar = particleMass;
  const fft = new ComplexFft(grid.shape);
  const scratch = new Float64Array(2 * grid.size);
  const rhos = fields.map((f) => Float64Array.from({ length: grid.size }, (_, p) => f.psi[2 * p]! ** 2 + f.psi[2 * p + 1]! ** 2));
  const phis = rhos.map((rho) => {
    const phi = Float64Array.from(rho);
    gravity.solveInPlace(phi);
    return phi;
  });
  const particles = fields.map((f, i) => (rhos[i]!.reduce((s, r) => s + r, 0) * grid.cellVolume) / (particleMass * f.massRatio));
  const modes = fields.map((f, i) => {
    const rho = rhos[i]!;
    const mass = rho.reduce((s, r) => s + r, 0) * grid.cellVolume;
    const kinetic = kineticEnergy(grid, f.psi, a, fft, scratch) / (f.massRatio * f.massRatio);
    const potential = potentialEnergy(grid, f.psi, phis[i]!, a);
    const rho2 = rho.reduce((s, r) => s + r * r, 0);
    const rhoEff = rho2 / (mass / grid.cellVolume);
    const base = coefficientsFrom(mass, kinetic, potential, rhoEff, a, particleMass * f.massRatio);
    const N = particles[i]!;
    // ħχ_SI = 2U/N², U = (g/2)∫ρ² dV/a³ (the physical density ρ/a³ over the physical volume a³dV)
    const chiContact = f.contact ? (f.contact * rho2 * grid.cellVolume) / (a ** 3 * N * N * hbar) : 0;
    const chi = (2 * potential) / (N * N * hbar) + chiContact;
    return { ...base, omega: kinetic / (N * hbar), chi, chiContact, rate: N * Math.abs(chi) };
  });
  const cross: { i: number; j: number; chi: number; energy: number }[] = [];
  for (let i = 0; i < fields.length; i++) {
    for (let j = i + 1; j < fields.length; j++) {
      const energy = mutualEnergy(grid, rhos[i]!, phis[j]!, a);
      cross.push({ i, j, chi: energy / (particles[i]! * particles[j]! * hbar), energy });
    }
  }
  return { modes, cross };
}
