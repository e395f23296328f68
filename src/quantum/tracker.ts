/**
 * The sidecar as a run callback: after every solver step it measures the
 * whole-box mode's a-free rates (ωa² from the kinetic energy measured in the
 * drift, at the step's middle; χa from the potential energy; λ from the
 * mass-weighted density) and advances the clocks with the step's own
 * factors D = ∫dt/a² and K = ∫dt/a.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import { kineticEnergy } from "../diagnostics/energies.js";
import { ClockAccumulator, type ClockRates } from "./clocks.js";

/** Whole-box rates of the current field: ½∫|∇ψ|² is taken from `kineticTilde` when given. */
function ratesOf(stepper: SplitStepper, particleMass: number, kineticTilde: number): { rates: ClockRates; mass: number } {
  const psi = stepper.rawPsi; // only |ψ|² is used, so an owed kick does not matter
  const phi = stepper.phi;
  let mass = 0;
  let rho2 = 0;
  let wTilde = 0;
  for (let i = 0; i < phi.length; i++) {
    const rho = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
    mass += rho;
    rho2 += rho * rho;
    wTilde += rho * phi[i]!;
  }
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
    const a = stepper.background.scaleFactor(stepper.time);
    const scratch = new Float64Array(stepper.psi.length);
    const kTilde = kineticEnergy(stepper.grid, stepper.psi, a, stepper.fft, scratch) * a * a;
    this.rates = ratesOf(stepper, particleMass, kTilde).rates;
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
