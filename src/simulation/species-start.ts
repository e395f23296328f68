/**
 * The initial fields of a run's later species ([[species]]): each built as
 * the field of a run of its own particle mass (its own code units, where
 * ħ/m_i = 1), then converted to the run's code units, ψ = ψ_own / μ_i; a
 * field read from a file is converted from its physical units directly.
 */
import type { Grid } from "../grid/grid.js";
import type { PoissonSolver } from "../fields/poisson.js";
import type { ResolvedRun, ResolvedSpecies } from "../config/resolve.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { buildInitialField, type InitialField } from "../initial-conditions/build.js";
import { fileField } from "./snapshot-start.js";

/** Species `sp`'s initial field in the run's code units (a new array). */
export function speciesInitialField(run: ResolvedRun, sp: ResolvedSpecies, grid: Grid, gravity: PoissonSolver, onProgress?: (info: { iteration: number }) => void): InitialField {
  const into = new Float64Array(2 * grid.size);
  if (sp.initial.kind === "snapshot") return fileField(run, grid, into, sp.initial.file, sp.name);
  const built = buildInitialField(sp.initial, grid, makeBackground(sp.background), sp.startTime, gravity, onProgress, into);
  const scale = 1 / sp.massRatio;
  const psi = built.psi;
  for (let i = 0; i < psi.length; i++) psi[i]! *= scale;
  return { ...built, psi, warnings: (built.warnings ?? []).map((w) => `species ${sp.name}: ${w}`) };
}
