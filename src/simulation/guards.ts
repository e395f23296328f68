/**
 * Guard rails that a conserved mass cannot hide. The split-step scheme keeps
 * the mass to round-off whatever the step, so the mass check alone passes a
 * run whose potential overflowed or whose fixed step skips many phase
 * cycles. These checks are in physical units for the messages. The run
 * loop checks the first species' mass; the later species' masses are
 * checked here, each against its own start.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import type { TimestepRules } from "../integrators/timestep.js";
import { chooseTimestep } from "../integrators/timestep.js";
import type { OutputScales } from "./scales.js";

/** A fixed step is refused when its phase per step exceeds the rule's limit by more than this factor. */
export const FIXED_STEP_FACTOR = 10;

/**
 * Why the stepper's current field cannot be trusted (non-finite potential,
 * potential energy or density), or undefined when it can.
 */
export function fieldProblem(stepper: SplitStepper, scales: OutputScales): string | undefined {
  const range = stepper.potentialRange();
  const m = stepper.moments();
  const maxRho = scales.density(m.maxRho);
  const dens = Number.isFinite(maxRho) ? `${maxRho.toPrecision(3)} Msun/kpc^3` : "not a finite number";
  const cause = `likely cause: densities beyond double precision (largest density ${dens}); lower the density or the mass of the initial field`;
  if (!Number.isFinite(range)) return `the gravitational potential is not finite; ${cause}`;
  if (!Number.isFinite(m.maxRho) || !Number.isFinite(m.rho)) return `the density is not finite; ${cause}`;
  const w = scales.energy(0.5 * m.rhoPhi * stepper.grid.cellVolume);
  if (!Number.isFinite(w)) return `the potential energy is not a finite number (W = ${w} Msun (km/s)^2); ${cause}`;
  return undefined;
}

/**
 * Why the later species' masses cannot be trusted: a field that is not finite, or a mass that drifted from
 * its start by more than `tolerance` (the run's integrator.mass_tolerance, which the first species' mass is
 * held to by the run loop); undefined when every species keeps its mass.
 * @param names the later species' names, in order (the stepper's extra fields 1 … S)
 * @param mass0 their masses at the start of the run (code units)
 */
export function speciesMassProblem(stepper: SplitStepper, names: readonly string[], mass0: readonly number[], tolerance: number): string | undefined {
  for (let i = 0; i < names.length; i++) {
    const mass = stepper.fieldMass(i + 1);
    if (!Number.isFinite(mass)) return `the field of the species ${names[i]} became non-finite`;
    const drift = Math.abs(mass - mass0[i]!) / mass0[i]!;
    if (!(drift <= tolerance)) {
      return `the mass of the species ${names[i]} changed by ${drift.toExponential(2)} (tolerance ${tolerance.toExponential(1)}); likely cause: a time step too large (lower integrator.safety or integrator.fixed_step)`;
    }
  }
  return undefined;
}

/** How a fixed step compares with the phase rules at the current state. */
export interface FixedStepCheck {
  /** The fixed step's phase per step over the limit of the rule that binds most (1 = at the limit). */
  readonly ratio: number;
  /** A one-line description with the numbers, in physical units. */
  readonly text: string;
}

/** Compare `rules.fixedStep` with what the phase rules allow at the stepper's state; undefined without a fixed step. */
export function checkFixedStep(stepper: SplitStepper, rules: TimestepRules, scales: OutputScales): FixedStepCheck | undefined {
  const fixed = rules.fixedStep;
  if (fixed === undefined) return undefined;
  const rule = chooseTimestep(stepper, { safety: rules.safety, maxDlnA: rules.maxDlnA });
  if (!(rule.dt > 0) || !Number.isFinite(rule.dt)) return undefined;
  const ratio = fixed / rule.dt;
  const a = stepper.background.scaleFactor(stepper.time);
  const kineticPhase = (0.5 * stepper.grid.kSquaredMax * fixed) / (a * a);
  const potentialPhase = (stepper.potentialRange() * fixed) / a;
  const text =
    `integrator.fixed_step = ${scales.formatTime(fixed)} is ${ratio.toPrecision(3)} times the step the phase rules allow at the start ` +
    `(${scales.formatTime(rule.dt)}, ${rule.limiter} limit with integrator.safety = ${rules.safety}): ` +
    `${kineticPhase.toPrecision(3)} rad per step at the grid's corner mode (limit ${(2 * Math.PI * rules.safety).toPrecision(3)})` +
    (potentialPhase > 0 ? `, ${potentialPhase.toPrecision(3)} rad of potential phase across the box (limit ${(Math.PI * rules.safety).toPrecision(3)})` : "");
  return { ratio, text };
}
