/**
 * The rate of the sidecar's gravitational breakdown estimate, ∫λ dt = ln N
 * (an estimate, not a measurement: the tangent-linear companion measures
 * the rate itself):
 *
 * - static box: λ = √(4πG ρ_eff) with the mass-weighted density
 *   ρ_eff = ∫ρ²/∫ρ, the Jeans growth rate of a uniform medium of that density;
 * - expanding box: the linear-regime growth rate of density perturbations,
 *   λ = d ln D/dt = f H with f = d ln D/d ln a of the run's cosmology (in
 *   an Einstein–de Sitter box λ = H, where √(4πG ρ̄) = √(3/2) H would
 *   overcount by 22%: Peebles 1980, The Large-Scale Structure of the
 *   Universe, §11);
 * - no gravity: λ = 0, a free field is not chaotic and the clock never rings.
 */
import type { Background } from "../physics/cosmology/background.js";

/** The estimate's rate and how it is found. */
export interface GravityRate {
  /** The method text of the clock. */
  readonly label: string;
  /** λ [1/code time] at scale factor a, from ρ_eff/a³ (code units, 4πG = 1). */
  rate(rhoEffPhysical: number, a: number): number;
}

/** The rate for a run with or without gravity, on its background. */
export function gravityRate(gravity: boolean, background: Background): GravityRate {
  if (!gravity) return { label: "estimate: gravity is off, a free field is not chaotic", rate: () => 0 };
  if (background.kind === "lcdm") {
    return { label: "estimate: ∫λ dt = ln N with the linear growth rate λ = f H, f = d ln D/d ln a", rate: (_, a) => background.growthRate(a) * background.hubble(a) };
  }
  return { label: "estimate: ∫λ dt = ln N with λ = √(4πG ρ_eff)", rate: (rho) => Math.sqrt(Math.max(rho, 0)) };
}

/** The static-box estimate (the default of callers that know no background). */
export const DENSITY_RATE: GravityRate = { label: "estimate: ∫λ dt = ln N with λ = √(4πG ρ_eff)", rate: (rho) => Math.sqrt(Math.max(rho, 0)) };
