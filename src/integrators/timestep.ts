/**
 * Time-step rules (common practice, no single source): keep the phase that
 * one step adds at the grid's corner mode, k²_max D / 2, and the phase of
 * the potential across the box, (max φ − min φ) K, and the contact phase
 * |g| ρ_max K of a self-interacting field below budgets scaled by a safety
 * factor; in an expanding background also cap the step in ln a.
 */
import type { SplitStepper } from "./split-step.js";

/** Step-size settings. */
export interface TimestepRules {
  /** Safety factor s: kinetic phase ≤ 2π s, potential and contact phases ≤ π s per step. @default 0.25 */
  readonly safety: number;
  /** Largest step in ln a for expanding runs. @default 0.01 */
  readonly maxDlnA: number;
  /** A fixed step [code time], overriding the phase rules when set. */
  readonly fixedStep?: number | undefined;
}

/** Which rule set the step. */
export type StepLimiter = "kinetic" | "potential" | "contact" | "expansion" | "fixed" | "end";

/** The step the rules allow at the stepper's current state. */
export function chooseTimestep(stepper: SplitStepper, rules: TimestepRules): { dt: number; limiter: StepLimiter } {
  if (rules.fixedStep !== undefined) return { dt: rules.fixedStep, limiter: "fixed" };
  const bg = stepper.background;
  const a = bg.scaleFactor(stepper.time);
  // species of other particle masses drift by D/μ and kick by μK: the lightest and heaviest set the limits
  const scales = stepper.largestScales;
  const kinetic = (2 * Math.PI * rules.safety * a * a) / (0.5 * stepper.grid.kSquaredMax * scales.drift);
  let dt = kinetic;
  let limiter: StepLimiter = "kinetic";
  const range = stepper.potentialRange();
  if (range > 0) {
    const potential = (Math.PI * rules.safety * a) / (range * scales.kick);
    if (potential < dt) {
      dt = potential;
      limiter = "potential";
    }
  }
  const rate = stepper.contactPhaseRate();
  if (rate > 0) {
    const contact = (Math.PI * rules.safety) / rate;
    if (contact < dt) {
      dt = contact;
      limiter = "contact";
    }
  }
  const h = bg.hubble(a);
  if (h > 0) {
    const expansion = rules.maxDlnA / h;
    if (expansion < dt) {
      dt = expansion;
      limiter = "expansion";
    }
  }
  return { dt, limiter };
}
