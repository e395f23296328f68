/**
 * The flow-resolution check as a run plug-in, on in every run: at every
 * snapshot it measures the fraction of the mass whose flow the grid does not
 * resolve (diagnostics/flow-resolution.ts), warns once when that fraction
 * first exceeds 1% (on screen and in run.log, with the speed limit and what
 * to change), and writes the worst value, where it occurred and the grid's
 * speed limit at the end to summary.json under `flow_resolution`. It reads
 * the stepper's raw field, so the run is unchanged.
 */
import type { Grid } from "../grid/grid.js";
import type { RunContext, RunPlugin } from "../simulation/plugin.js";
import { fastestFlow, flowResolution, UNRESOLVED_PHASE_STEP } from "../diagnostics/flow-resolution.js";
import { formatNumber } from "../core/format.js";

/** Mass fraction above which a run is told its flow is not resolved. */
export const UNRESOLVED_WARNING_FRACTION = 0.01;

interface Worst {
  fraction: number;
  t: number;
  a: number;
  warned: boolean;
}

/** The plug-in (its state keeps the worst value across a resume). */
export function flowResolutionPlugin(): RunPlugin {
  let context: RunContext | undefined;
  let worst: Worst = { fraction: 0, t: NaN, a: NaN, warned: false };
  let lastA = NaN;
  const kmPerS = (v: number): number => (v * context!.scales.units.lengthM) / context!.scales.units.timeS / 1e3;
  const limitKmS = (grid: Grid, a: number): number => kmPerS(fastestFlow(Math.max(...grid.spacing.filter((_, i) => grid.shape[i]! > 1)), a));
  return {
    name: "flow-resolution",
    stateVersion: 1,
    measures: ["field"],
    start(c) {
      context = c;
    },
    output(facts) {
      if (facts.kind !== "snapshot" || !facts.psi || !context) return;
      lastA = facts.a;
      const { unresolvedMassFraction } = flowResolution(context.grid, facts.psi);
      if (unresolvedMassFraction > worst.fraction) worst = { ...worst, fraction: unresolvedMassFraction, t: facts.t, a: facts.a };
      if (unresolvedMassFraction > UNRESOLVED_WARNING_FRACTION && !worst.warned) {
        worst.warned = true;
        context.warn(warningText(context, unresolvedMassFraction, facts.t, facts.a, limitKmS(context.grid, facts.a)));
      }
    },
    stop() {
      if (!context) return;
      const at = Number.isFinite(worst.t) ? { [`worst_at_${context.scales.timeUnit}`]: context.scales.time(worst.t) } : {};
      const z = Number.isFinite(worst.a) && context.background.kind !== "static" ? { worst_at_z: 1 / worst.a - 1 } : {};
      const limit = Number.isFinite(lastA) ? { fastest_flow_km_s: limitKmS(context.grid, lastA) } : {};
      return { flow_resolution: { worst_unresolved_mass_fraction: worst.fraction, ...at, ...z, ...limit, resolved: worst.fraction <= UNRESOLVED_WARNING_FRACTION } };
    },
    save: () => worst,
    restore(state) {
      worst = { ...(state as Worst) };
    },
  };
}

function warningText(context: RunContext, fraction: number, t: number, a: number, limit: number): string {
  const { scales } = context;
  const when = context.background.kind === "static" ? `t = ${formatNumber(scales.time(t))} ${scales.timeUnit}` : `z = ${formatNumber(1 / a - 1)}`;
  const near = formatNumber((limit * UNRESOLVED_PHASE_STEP) / Math.PI);
  return (
    `flow not resolved at ${when}: ${formatNumber(100 * fraction)}% of the mass moves faster than ${near} km/s, ` +
    `near the fastest flow these cells carry (${formatNumber(limit)} km/s); faster flows alias and the field goes wrong: use more cells or a smaller box`
  );
}
