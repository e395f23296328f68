/**
 * A halo's soliton core, fitted only where the grid resolves it. The
 * shell-averaged density around the halo's centre gives the half-density
 * radius r½ without any model (the first shell below half the central
 * shell's density, interpolated linearly); for the core profile
 * ρ_c/(1 + 0.091 (r/r_c)²)⁸ of Schive, Chiueh & Broadhurst (2014) r½ is r_c
 * to 0.3%. When r½ spans at least CORE_RESOLVED_CELLS cells, the profile is
 * fitted within 2 r½ (diagnostics/analysis.ts, fitCoreProfile); otherwise
 * the core is unresolved, and the radius of the first shell below half the
 * central density (at least one cell) is given as an upper limit on r_c:
 * a core smaller than about three cells is sampled by one or two shells
 * inside r_c, too few to tell its shape from the cell's own averaging (the
 * exact ground state on the grid is fitted to within 2% at three cells or
 * more; tested).
 */
import type { Grid } from "../grid/grid.js";
import { fitCoreProfile, radialProfile } from "./analysis.js";

/** Cores whose half-density radius spans fewer cells are not fitted. */
export const CORE_RESOLVED_CELLS = 3;

/** A fitted core, or the upper limit on an unresolved one (code units). */
export type HaloCore =
  | { readonly status: "fitted"; readonly rC: number; readonly rhoC: number; readonly rms: number; readonly rHalf: number }
  | { readonly status: "unresolved"; readonly rCUpper: number };

/**
 * The core around `centre` (one coordinate per simulated axis), from shells out to `rMax`.
 * Only for 3D fields: the core profile is that of a spherical soliton.
 */
export function haloCore(grid: Grid, psi: Float64Array, centre: readonly number[], rMax: number): HaloCore {
  const h = Math.min(...grid.spacing.slice(3 - grid.dims));
  const profile = radialProfile(grid, psi, centre, rMax);
  const central = profile[0]?.density ?? 0;
  let rHalf = rMax;
  let below = rMax;
  for (let i = 1; i < profile.length; i++) {
    const [p, q] = [profile[i - 1]!, profile[i]!];
    if (q.density < central / 2) {
      rHalf = p.r + ((p.density - central / 2) / (p.density - q.density)) * (q.r - p.r);
      below = q.r;
      break;
    }
  }
  if (rHalf < CORE_RESOLVED_CELLS * h) return { status: "unresolved", rCUpper: Math.max(below, h) };
  const fit = fitCoreProfile(profile, 2 * rHalf);
  return { status: "fitted", rC: fit.rC, rhoC: fit.rhoC, rms: fit.rms, rHalf };
}

/**
 * The central density the core–halo relation of Schive, Chiueh & Broadhurst (2014) gives for a core radius,
 * in physical units: ρ_c = 1.9 (m / 1e-23 eV)⁻² (r_c / kpc)⁻⁴ Msun/pc³ with r_c proper. Their comoving form,
 * 1.9 a⁻¹ (m / 1e-23 eV)⁻² (x_c / kpc)⁻⁴ for the comoving density and radius, is the same relation.
 * @returns Msun/kpc³ (physical)
 */
export function coreRelationDensity(rCProperKpc: number, particleMassEv: number): number {
  return 1.9e9 * (particleMassEv / 1e-23) ** -2 * rCProperKpc ** -4;
}
