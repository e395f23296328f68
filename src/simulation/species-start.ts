/**
 * The initial fields of a run's later species ([[species]]): each built as
 * the field of a run of its own particle mass (its own code units, where
 * ħ/m_i = 1, with its own contact term in its relaxation), then converted to
 * the run's code units, ψ = ψ_own / μ_i; a field read from a file is
 * converted from its physical units directly.
 */
import type { Grid } from "../grid/grid.js";
import type { PoissonSolver } from "../fields/poisson.js";
import type { ResolvedRun, ResolvedSpecies } from "../config/resolve.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { contactCode } from "../physics/contact.js";
import { CodeUnits } from "../physics/units.js";
import { NumericsError } from "../core/errors.js";
import { RelaxationCollapse } from "../ground-state/imaginary-time.js";
import { buildInitialField, type InitialField } from "../initial-conditions/build.js";
import { fileField } from "./snapshot-start.js";
import { collapseVerdict } from "./collapse-guard.js";

/**
 * Species `sp`'s initial field in the run's code units (a new array). A relaxation that collapses under
 * the species' attractive contact term is a NumericsError naming its key, its mass and its critical mass.
 * @param index its place in [[species]] (0 for the first table), for messages
 */
export function speciesInitialField(run: ResolvedRun, sp: ResolvedSpecies, index: number, grid: Grid, gravity: PoissonSolver, onProgress?: (info: { iteration: number }) => void): InitialField {
  const into = new Float64Array(2 * grid.size);
  if (sp.initial.kind === "snapshot") return fileField(run, grid, into, sp.initial.file, sp.name);
  // in the species' own code units its coefficient is contactCode with μ = 1 (the same number as μ_i's in the run's)
  const own = new CodeUnits(sp.particleMassKg, run.lengthUnitM);
  const contact = sp.contact ? contactCode(sp.contact.scatteringLengthM, own) : 0;
  let built: InitialField;
  try {
    built = buildInitialField(sp.initial, grid, makeBackground(sp.background), sp.startTime, gravity, onProgress, into, contact);
  } catch (e) {
    if (!(e instanceof RelaxationCollapse) || !sp.contact) throw e;
    const key = `species[${index}].initial.${sp.initial.kind === "ground-state" ? "mass" : "soliton"}`;
    const kg = own.toSI(e.mass, "mass");
    throw new NumericsError(`${key}: no ground state: the relaxation collapsed to the grid's scale under the attractive self-interaction: ${collapseVerdict(kg, grid.dims, sp.contact, sp.particleMassKg, `species[${index}]`, own.toSI(grid.lengths[0]!, "length"))}`);
  }
  const scale = 1 / sp.massRatio;
  const psi = built.psi;
  for (let i = 0; i < psi.length; i++) psi[i]! *= scale;
  return { ...built, psi, warnings: (built.warnings ?? []).map((w) => `species ${sp.name}: ${w}`) };
}
