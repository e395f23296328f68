/**
 * The sidecar's clocks along a run: after every solver step it takes the
 * whole-box mode's a-free rates (ωa² from the kinetic energy measured in the
 * drift, at the step's middle; χa from the potential energy; λ from the
 * mass-weighted density) and advances the clocks with the step's own
 * factors D = ∫dt/a² and K = ∫dt/a. It works from sums over the grid alone,
 * so it knows nothing of the integrator.
 */
import { ClockAccumulator, CLOSED_COHERENT, type ClockRates, type ClockResult, type ModeModel } from "./clocks.js";
import { DENSITY_RATE, type GravityRate } from "./gravity-rate.js";
import { stationaryAdiabaticChi, TwinPhaseTracker, type TwinState } from "./adiabatic.js";

/** Grid sums of a field (code units, without the cell volume): Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ. */
export interface ModeSums {
  readonly rho: number;
  readonly rho2: number;
  readonly rhoPhi: number;
}

/**
 * Whole-box rates from the field's sums, with ½∫|∇ψ|² dV given as `kineticTilde`. With a contact
 * coefficient g, χ = χ_grav + χ_SI, ħχ_SI = g∫|φ|⁴ = 2U/N² with U = (g/2a³)∫ρ² dV (chiContact in the a-free
 * form χ_SI·a of chiTilde, whose χ is chiTilde/a).
 */
function ratesOf(sums: ModeSums, cellVolume: number, a: number, particleMass: number, kineticTilde: number, gravity: GravityRate, contact: number) {
  const M = sums.rho * cellVolume;
  const omegaTilde = kineticTilde / M;
  const chiGravity = (2 * (0.5 * sums.rhoPhi * cellVolume) * particleMass) / (M * M);
  // χ_SI now, with the physical density ρ/a³, and in the a-free form χ·a of chiTilde
  const chiContactNow = (contact * sums.rho2 * cellVolume * particleMass) / (M * M * a * a * a);
  const chiContact = chiContactNow * a;
  return {
    mass: M,
    chiContact,
    rates: {
      omegaTilde,
      chiTilde: chiGravity + chiContact,
      lambda: gravity.rate(sums.rho2 / sums.rho / (a * a * a), a),
      // the stationary-state dμ/dN of self-gravity and the contact term (adiabatic.ts), at the current a
      chiAdiabatic: stationaryAdiabaticChi({ omega: omegaTilde / (a * a), chi: chiGravity / a + chiContactNow, chiContact: chiContactNow, particles: M / particleMass }),
    } satisfies ClockRates,
  };
}

/** A twin field's start: its relative extra amplitude e and its overlap ∫conj(ψ)ψ₂ dV with the run's field. */
export interface TwinStart {
  readonly excess: number;
  readonly overlap: readonly [number, number];
}

const TWIN_HOW = "measured by the twin field (its overlap phase; projected with the rate of a line-plus-oscillation fit)";

/** Runs the clocks alongside a run. */
export class SidecarTracker {
  readonly clocks: ClockAccumulator;
  private readonly particleMass: number;
  private readonly cellVolume: number;
  /** The rate of the gravitational breakdown estimate. */
  private readonly gravity: GravityRate;
  rates: ClockRates;
  /** The twin field's phase tracker, when the run has one: χ_ad is then measured, not the stationary formula. */
  readonly twin: TwinPhaseTracker | undefined;
  /** The stationary-state χ_ad = 2ω/N + 2χ of the last step (the twin's comparison). */
  stationaryChiAdiabatic: number;
  /** The scale factor of the last step. */
  a: number;
  /** The contact part χ_SI of χ at the last step [1/code time] (0 without a contact term). */
  chiContact: number;
  private readonly contact: number;
  private t: number;

  /**
   * Start at the current field: its sums, its ½∫|∇ψ|² dV and the scale factor a.
   * @param particles N, fixed for the run (the run's initial mass over m)
   * @param model the start and the loss and dephasing rates per code time (default: coherent, closed)
   * @param contact the contact coefficient g (code units), whose part χ_SI joins χ
   */
  constructor(
    particleMass: number,
    particles: number,
    squeezingDb: number,
    startTime: number,
    cellVolume: number,
    start: { sums: ModeSums; kineticTilde: number; a: number },
    model: ModeModel = CLOSED_COHERENT,
    twin?: TwinStart,
    gravity: GravityRate = DENSITY_RATE,
    contact = 0,
  ) {
    this.gravity = gravity;
    this.contact = contact;
    this.particleMass = particleMass;
    this.cellVolume = cellVolume;
    this.t = startTime;
    this.a = start.a;
    const first = ratesOf(start.sums, cellVolume, start.a, particleMass, start.kineticTilde, gravity, contact);
    this.rates = first.rates;
    this.chiContact = first.chiContact;
    this.stationaryChiAdiabatic = this.rates.chiAdiabatic as number;
    if (twin) {
      this.twin = new TwinPhaseTracker(twin.excess, particles);
      this.twin.add(startTime, Math.atan2(twin.overlap[1], twin.overlap[0]));
      // until the first step the twin's rate is unknown: it starts at the frozen-mode rate
      this.rates = { ...this.rates, chiAdiabatic: this.rates.chiTilde / start.a };
    }
    this.clocks = new ClockAccumulator(particles, squeezingDb, startTime, this.rates, model);
    this.clocks.breakdownLabel = gravity.label;
  }

  /** After a step to time t (scale factor a) with factors D and K (and the twin's overlap): measure and advance. */
  afterStep(step: { t: number; a: number; drift: number; kick: number; sums: ModeSums; midKineticTilde: number; overlap?: readonly [number, number] }): void {
    const measured = ratesOf(step.sums, this.cellVolume, step.a, this.particleMass, step.midKineticTilde, this.gravity, this.contact);
    let rates: ClockRates = measured.rates;
    this.chiContact = measured.chiContact;
    this.stationaryChiAdiabatic = rates.chiAdiabatic as number;
    let increment: number | undefined;
    if (this.twin && step.overlap) {
      increment = this.twin.add(step.t, Math.atan2(step.overlap[1], step.overlap[0]));
      rates = { ...rates, chiAdiabatic: increment / (step.t - this.t) }; // the step's mean measured rate
    }
    this.rates = rates;
    this.t = step.t;
    this.a = step.a;
    this.clocks.advance(step.t, step.drift, step.kick, rates, step.midKineticTilde / measured.mass, increment);
  }

  /** χ_ad of the twin field fitted over the run so far (undefined without a twin or with too few steps). */
  twinChi(): number | undefined {
    return this.twin?.chi();
  }

  /** Every clock's verdict; with a twin, the adiabatic clock is projected with its fitted rate. */
  results(): ClockResult[] {
    if (!this.twin) return this.clocks.results();
    const rate = this.twinChi() ?? (this.rates.chiAdiabatic as number);
    return this.clocks.results({ rate, how: TWIN_HOW });
  }

  /** JSON-safe state for a checkpoint. */
  save(): { rates: ClockRates; clocks: string; t: number; a: number; stationary: number; twin?: TwinState } {
    return { rates: this.rates, clocks: this.clocks.save(), t: this.t, a: this.a, stationary: this.stationaryChiAdiabatic, ...(this.twin ? { twin: this.twin.save() } : {}) };
  }

  /** Restore a saved state. */
  restore(saved: { rates: ClockRates; clocks: string; t?: number; a?: number; stationary?: number; twin?: TwinState }): void {
    this.rates = saved.rates;
    this.clocks.restore(saved.clocks);
    this.t = saved.t ?? this.t;
    this.a = saved.a ?? this.a;
    this.stationaryChiAdiabatic = saved.stationary ?? (saved.rates.chiAdiabatic as number);
    if (this.twin && saved.twin) this.twin.restore(saved.twin);
  }
}
