/**
 * The symmetric-ordering corrections of a member's equations. A member
 * samples the Wigner distribution, and the equation it must follow is the
 * one of the Weyl symbol of the Hamiltonian, not the classical one. For
 * pair interactions H = ½ Σᵢⱼ Vᵢⱼ âᵢ†âⱼ†âⱼâᵢ on the cells (number units,
 * [âᵢ, âⱼ†] = δᵢⱼ), the Weyl symbols (|αᵢ|² − ½)(|αⱼ|² − ½) for i ≠ j and
 * |αᵢ|⁴ − 2|αᵢ|² + ½ for i = j give
 *
 *   iħ dαᵢ/dt = [Σⱼ Vᵢⱼ (|αⱼ|² − ½) − ½ Vᵢᵢ] αᵢ
 *
 * (Steel et al. 1998, PRA 58, 4824; Polkovnikov 2010, Ann. Phys. 325, 1790;
 * derived here for the grid's kernels). In code units, where one particle in
 * a cell is the density m/ΔV:
 *  - gravity: the potential of |ψ|² − m/(2ΔV) (isolated gravity; periodic
 *    gravity removes the mean anyway), minus ½ (m/ΔV) G₀₀, with G₀₀ the
 *    potential a unit density in one cell makes in that cell;
 *  - the contact term (Vᵢⱼ = g δᵢⱼ in density units): g(|ψ|² − m/ΔV), the
 *    single-mode Kerr equation β → β e^{−iX(|β|² − 1)}.
 * The constant parts are a uniform potential: a phase e^{iθ}, θ = rate · ∫dt/a,
 * common to every cell, which commutes with every step and is applied to a
 * member's samples exactly.
 */
import type { PoissonSolver } from "../fields/poisson.js";

/** What a member's equations differ by from the classical ones. */
export interface OrderingCorrection {
  /** Density (code units) removed from the source of the potential in every cell of the box. */
  readonly sourceShift: number;
  /** Rate of the uniform phase e^{iθ}, θ = rate · ∫dt/a (code units). */
  readonly phaseRate: number;
}

/** G₀₀: the potential that a unit density in one cell makes in that cell (0 without gravity). */
export function selfPotential(gravity: PoissonSolver, cells: number): number {
  if (gravity.kind === "none") return 0;
  const field = new Float64Array(cells);
  field[0] = 1;
  gravity.solveInPlace(field);
  return field[0] as number;
}

/**
 * The correction of members of particle mass `particleMass` (code units, the
 * field's mass over N) on cells of volume `cellVolume`, under `gravity` and
 * with the contact coefficient `contact` (code units; 0: none).
 */
export function orderingCorrection(gravity: PoissonSolver, contact: number, particleMass: number, cellVolume: number, cells: number): OrderingCorrection {
  const quantum = particleMass / cellVolume;
  return {
    sourceShift: gravity.kind === "isolated" ? quantum / 2 : 0,
    phaseRate: contact * quantum + 0.5 * quantum * selfPotential(gravity, cells),
  };
}
