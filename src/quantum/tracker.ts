/**
 * The sidecar's clocks along a run: after every solver step it takes the
 * whole-box mode's a-free rates (ωa² from the kinetic energy measured in the
 * drift, at the step's middle; χa from the potential energy; λ from the
 * mass-weighted density) and advances the clocks with the step's own
 * factors D = ∫dt/a² and K = ∫dt/a. It works from sums over the grid alone,
 * so it knows nothing of the integrator.
 */
import { ClockAccumulator, CLOSED_COHERENT, type ClockRates, type ModeModel } from "./clocks.js";
import { stationaryAdiabaticChi } from "./adiabatic.js";

/** Grid sums of a field (code units, without the cell volume): Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ. */
export interface ModeSums {
  readonly rho: number;
  readonly rho2: number;
  readonly rhoPhi: number;
}

/** Whole-box rates from the field's sums, with ½∫|∇ψ|² dV given as `kineticTilde`. */
function ratesOf(sums: ModeSums, cellVolume: number, a: number, particleMass: number, kineticTilde: number): { rates: ClockRates; mass: number } {
  const M = sums.rho * cellVolume;
  const omegaTilde = kineticTilde / M;
  const chiTilde = (2 * (0.5 * sums.rhoPhi * cellVolume) * particleMass) / (M * M);
  return {
    mass: M,
    rates: {
      omegaTilde,
      chiTilde,
      lambda: Math.sqrt(sums.rho2 / sums.rho / (a * a * a)),
      // χ_ad = 2ω/N + 2χ, the stationary-state dμ/dN (adiabatic.ts), at the current a
      chiAdiabatic: stationaryAdiabaticChi({ omega: omegaTilde / (a * a), chi: chiTilde / a, particles: M / particleMass }),
    },
  };
}

/** Runs the clocks alongside a run. */
export class SidecarTracker {
  readonly clocks: ClockAccumulator;
  private readonly particleMass: number;
  private readonly cellVolume: number;
  rates: ClockRates;

  /**
   * Start at the current field: its sums, its ½∫|∇ψ|² dV and the scale factor a.
   * @param particles N, fixed for the run (the run's initial mass over m)
   * @param model the start and the loss and dephasing rates per code time (default: coherent, closed)
   */
  constructor(
    particleMass: number,
    particles: number,
    squeezingDb: number,
    startTime: number,
    cellVolume: number,
    start: { sums: ModeSums; kineticTilde: number; a: number },
    model: ModeModel = CLOSED_COHERENT,
  ) {
    this.particleMass = particleMass;
    this.cellVolume = cellVolume;
    this.rates = ratesOf(start.sums, cellVolume, start.a, particleMass, start.kineticTilde).rates;
    this.clocks = new ClockAccumulator(particles, squeezingDb, startTime, this.rates, model);
  }

  /** After a step to time t (scale factor a) with factors D and K: measure and advance. */
  afterStep(step: { t: number; a: number; drift: number; kick: number; sums: ModeSums; midKineticTilde: number }): void {
    const { rates, mass } = ratesOf(step.sums, this.cellVolume, step.a, this.particleMass, step.midKineticTilde);
    this.rates = rates;
    this.clocks.advance(step.t, step.drift, step.kick, rates, step.midKineticTilde / mass);
  }

  /** JSON-safe state for a checkpoint. */
  save(): { rates: ClockRates; clocks: string } {
    return { rates: this.rates, clocks: this.clocks.save() };
  }

  /** Restore a saved state. */
  restore(saved: { rates: ClockRates; clocks: string }): void {
    this.rates = saved.rates;
    this.clocks.restore(saved.clocks);
  }
}
