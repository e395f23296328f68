/**
 * The vortex census as a run plug-in (`output.vortex_census = true`): at
 * every time-series row it finds the field's vortices by phase winding
 * (diagnostics/vortices.ts) and writes the count (2D: `vortices`, both
 * signs) or the total line length (3D: `vortex_line_kpc`, comoving in
 * comoving runs), and the final value to summary.json. It reads the
 * stepper's raw field, whose zeros are exact, so the run is unchanged.
 */
import type { RunPlugin } from "../simulation/plugin.js";
import type { Grid } from "../grid/grid.js";
import { findVortices } from "../diagnostics/vortices.js";
import { PC_M } from "../physics/constants.js";

/** The plug-in for a 2D or 3D run. */
export function vortexCensusPlugin(dims: number): RunPlugin {
  let grid: Grid | undefined;
  let kpc = 1;
  let last = NaN;
  const column = dims === 3 ? "vortex_line_kpc" : "vortices";
  return {
    name: "vortex-census",
    measures: ["field"],
    columns: [column],
    start(context) {
      grid = context.grid;
      kpc = context.scales.units.lengthM / (1e3 * PC_M);
    },
    output(facts) {
      if (facts.kind !== "row" || !facts.psi || !grid) return;
      const census = findVortices(grid, facts.psi);
      last = dims === 3 ? census.lineLength * kpc : census.positive + census.negative;
      return [last];
    },
    stop: () => ({ [`final_${column}`]: last }),
  };
}
