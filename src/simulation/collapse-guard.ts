/**
 * The collapse guard of an attractive contact interaction. A soliton above
 * the largest stable mass, M_max = 1.0125 ħ/√(G m |a_s|), has no ground
 * state: it collapses, its density grows without bound and the split-step
 * goes on producing a field that means nothing once the collapse is smaller
 * than a cell. The guard stops the run (exit code 3, the last good state
 * kept) when the attractive term's length, ħ/√(2m|g|n), falls below a cell's
 * Δx/π, i.e. |g| n_max exceeds the kinetic energy ħ²(π/Δx)²/2m of the
 * grid's largest wavenumber along an axis: a resolved stable soliton stays
 * far from that (its interaction and kinetic energies balance at its own
 * radius, several cells). The message names the mass within twice the
 * critical soliton's r₉₉ (11 R_a, R_a = √(|a_s|ħ²/(Gm³))) of the densest cell,
 * the critical mass for this particle and interaction, and what to change.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import type { ResolvedContact } from "../config/resolve-contact.js";
import { criticalMassText, stabilityAdvice } from "../config/contact-limits.js";
import { criticalMassKg } from "../physics/contact.js";
import { formatNumber } from "../core/format.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import type { OutputScales } from "./scales.js";

/** The radius of the collapsing object, in R_a = √(|a_s|ħ²/(Gm³)): twice the critical soliton's r₉₉ = 5.5 R_a (Chavanis 2011). */
const OBJECT_RADIUS = 11;

/** Whether ψ's attractive contact term has outrun the grid: |g| ρ_max > (π/Δx)²/2 on the finest simulated axis (code units). */
export function collapsing(stepper: SplitStepper): boolean {
  if (!(stepper.contact < 0)) return false;
  const grid = stepper.grid;
  let h = Infinity;
  for (let ax = 0; ax < 3; ax++) if (grid.shape[ax]! > 1) h = Math.min(h, grid.spacing[ax]!);
  return -stepper.contact * stepper.moments().maxRho > 0.5 * (Math.PI / h) ** 2;
}

/** Σ|ψ|² ΔV within `radius` (code lengths, nearest periodic image) of the densest cell. */
function massAroundPeak(stepper: SplitStepper, radius: number): number {
  const { grid } = stepper;
  const psi = stepper.rawPsi;
  let peak = 0;
  for (let p = 1; p < grid.size; p++) if (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2 > psi[2 * peak]! ** 2 + psi[2 * peak + 1]! ** 2) peak = p;
  const [, n1, n2] = grid.shape;
  const index = (p: number): number[] => [Math.floor(p / (n1 * n2)), Math.floor(p / n2) % n1, p % n2];
  const at = index(peak);
  let sum = 0;
  for (let p = 0; p < grid.size; p++) {
    const ijk = index(p);
    let r2 = 0;
    for (let ax = 0; ax < 3; ax++) {
      const n = grid.shape[ax]!;
      const d = Math.abs(ijk[ax]! - at[ax]!);
      r2 += (Math.min(d, n - d) * grid.spacing[ax]!) ** 2;
    }
    if (r2 <= radius * radius) sum += psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
  }
  return sum * grid.cellVolume;
}

/**
 * The collapsing mass against the critical mass, and what to change: above it, less mass or a weaker
 * interaction; below it, finer cells (the grid cannot hold the stable soliton). `table` names the config
 * table of the interaction (a species' "species[0]"; "particle" by default).
 */
export function collapseVerdict(massKg: number, dims: number, contact: ResolvedContact, particleMassKg: number, table?: string): string {
  const depth = dims === 3 ? "" : ` (of a ${dims}D field, over its depth; the limit is that of a 3D soliton)`;
  const limit = criticalMassText(contact, particleMassKg);
  const mass = `${formatNumber(massKg / M_SUN_KG)} Msun${depth}`;
  if (massKg > criticalMassKg(contact.scatteringLengthM, particleMassKg)) {
    return `${mass}, above the largest stable soliton, ${limit}; ${stabilityAdvice(massKg, contact, particleMassKg, table)}`;
  }
  return `${mass}, below the largest stable soliton, ${limit}, so the cells are too coarse for it: use more grid.cells or a smaller grid.box, or less mass`;
}

/** Why the run must stop for a collapse (undefined while none is under way). */
export function collapseProblem(stepper: SplitStepper, scales: OutputScales, contact: ResolvedContact | undefined, particleMassKg: number): string | undefined {
  if (!contact || !collapsing(stepper)) return undefined;
  // R_a = √(|a_s|ħ²/(Gm³)) is √|g| in code units (g = 4πa_s/m, ħ/m = 1, 4πG = 1)
  const radius = OBJECT_RADIUS * Math.sqrt(-stepper.contact);
  const objectKg = scales.massMsun(massAroundPeak(stepper, radius)) * M_SUN_KG;
  const verdict = collapseVerdict(objectKg, stepper.grid.dims, contact, particleMassKg);
  const within = `${formatNumber(scales.units.toSI(radius, "length") / (1e3 * PC_M))} kpc`;
  return `the field collapses under its attractive self-interaction faster than the grid resolves (the interaction length fell below a cell): the ${within} around the densest cell (twice the critical soliton's r₉₉) hold ${verdict}`;
}
