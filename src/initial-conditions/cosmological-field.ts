/**
 * The cosmological initial field: ψ = √(ρ̄ (1 + δ)) e^{iS} with δ and S from
 * the Gaussian random field of cosmological.ts at the run's start.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import type { ResolvedInitial } from "../config/resolve.js";
import { LinearPower } from "../physics/cosmology/power.js";
import { gaussianRandomField, powerTable } from "./cosmological.js";
import type { InitialField } from "./build.js";

type Cosmological = Extract<ResolvedInitial, { kind: "cosmological" }>;

/** Build the field at scale factor a; warns when it is already nonlinear. */
export function buildCosmological(ic: Cosmological, grid: Grid, background: Background, a: number, into?: Float64Array): InitialField {
  const power = new LinearPower(ic.power);
  const growthRatio = background.growth(a) / background.growth(1);
  const flowFactor = a * a * background.hubble(a) * background.growthRate(a);
  const { values } = gaussianRandomField(grid, power, {
    seed: ic.seed,
    fixedAmplitude: ic.fixedAmplitude,
    paired: ic.paired,
    growthRatio,
    flowFactor,
    lengthUnitMpc: ic.lengthUnitMpc,
  }, into);
  // ψ = √(ρ̄(1 + δ)) e^{iS}, written over (δ, S) in place (one grid's worth of memory)
  const psi = values;
  let maxAbs = 0;
  let clipped = 0;
  for (let p = 0; p < grid.size; p++) {
    const d = values[2 * p]!;
    const phase = values[2 * p + 1]!;
    maxAbs = Math.max(maxAbs, Math.abs(d));
    if (d < -1) clipped++;
    const amp = Math.sqrt(ic.meanDensity * Math.max(0, 1 + d));
    psi[2 * p] = amp * Math.cos(phase);
    psi[2 * p + 1] = amp * Math.sin(phase);
  }
  const warnings: string[] = [];
  if (maxAbs > 1) {
    warnings.push(
      `span.start_redshift: the field is already nonlinear at the start (max |δ| = ${maxAbs.toPrecision(3)} > 1` +
        `${clipped > 0 ? `, ${clipped} cells with δ < −1 set to zero density` : ""}); start at a higher redshift or use a coarser grid`,
    );
  }
  return { psi, warnings, powerTable: powerTable(power, grid, ic.lengthUnitMpc, growthRatio) };
}
