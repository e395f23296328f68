/**
 * The sidecar as a run callback: after every solver step it measures the
 * whole-box mode's a-free rates (ωa² from the kinetic energy measured in the
 * drift, at the step's middle; χa from the potential energy; λ from the
 * mass-weighted density) and advances the clocks with the step's own
 * factors D = ∫dt/a² and K = ∫dt/a.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import { ClockAccumulator, type ClockRates } from "./clocks.js";

/** Whole-box rates of the current field, with ½∫|∇ψ|² given as `kineticTilde`. */
function ratesOf(stepper: SplitStepper, particleMass: number, kineticTilde: number): { rates: ClockRates; mass: number } {
  // sums over the grid in the step's own (threaded) pass; only |ψ|² enters, so an owed kick does not matter
  const { rho: mass, rho2, rhoPhi: wTilde } = stepper.moments();
  const dv = stepper.grid.cellVolume;
  const a = stepper.background.scaleFactor(stepper.time);
  const M = mass * dv;
  return {
    mass: M,
    rates: {
      omegaTilde: kineticTilde / M,
      chiTilde: (2 * (0.5 * wTilde * dv) * particleMass) / (M * M),
      lambda: Math.sqrt(rho2 / mass / (a * a * a)),
    },
  };
}

/** Runs the clocks alongside a stepper. */
export class SidecarTracker {
  readonly clocks: ClockAccumulator;
  private readonly particleMass: number;
  rates: ClockRates;

  /**
   * Start at the stepper's current state (turns on its kinetic tracking).
   * @param particles N, fixed for the run (the run's initial mass over m)
   */
  constructor(stepper: SplitStepper, particleMass: number, particles: number, squeezingDb: number, startTime: number) {
    this.particleMass = particleMass;
    stepper.trackKinetic = true;
    this.rates = ratesOf(stepper, particleMass, stepper.kineticTilde()).rates;
    this.clocks = new ClockAccumulator(particles, squeezingDb, startTime, this.rates);
  }

  /** After a step: measure and advance. */
  afterStep(stepper: SplitStepper): void {
    const mid = stepper.midKineticTilde;
    const { rates, mass } = ratesOf(stepper, this.particleMass, mid);
    const midOmega = mid / mass;
    this.rates = rates;
    this.clocks.advance(stepper.time, stepper.lastDrift, stepper.lastKick, rates, midOmega);
  }

  /** JSON-safe state for a checkpoint. */
  save(): string {
    return JSON.stringify({ rates: this.rates, clocks: this.clocks.save() });
  }

  /** Restore a saved state. */
  restore(text: string): void {
    const saved = JSON.parse(text) as { rates: ClockRates; clocks: string };
    this.rates = saved.rates;
    this.clocks.restore(saved.clocks);
  }
}
