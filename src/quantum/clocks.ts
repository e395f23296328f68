/**
 * The sidecar's clocks, accumulated along a run (or over snapshot times):
 *   Θ = ∫ω dt,  X = ∫χ dt,  B = ∫λ dt
 * with ω ∝ 1/a² and χ ∝ 1/a integrated through the solver's own step factors
 * (D = ∫dt/a², K = ∫dt/a) applied to the a-free parts ωa² and χa
 * (trapezoid in the a-free part). Three clocks ring once each:
 * - squeezing: the onset time 1/(N|χ|) (when N|X| = 1) and the time the
 *   squeezing first reaches a chosen level in dB; for astronomically large N
 *   both fall inside the first step and are found there from the rate at its
 *   start (linear in X across a step);
 * - phase diffusion: |⟨b⟩|²/N = 1/e, at |X| = 2 asin(1/(2√N)) ≈ 1/√N;
 * - classical breakdown: B = ln N (Ehrenfest time of chaotic dynamics,
 *   Berman & Zaslavsky 1978), with λ = √(4πG ρ_eff).
 * A clock that has not rung by the end is projected with the last rate.
 */
import { formatNumber } from "../core/format.js";
import { kerrState, xForPhaseDiffusion, xForSqueezing, type KerrState } from "./kerr.js";

/** The a-free coefficients at one instant (code units). */
export interface ClockRates {
  /** ω a² [1/code time]. */
  readonly omegaTilde: number;
  /** χ a [1/code time]. */
  readonly chiTilde: number;
  /** λ [1/code time]. */
  readonly lambda: number;
}

/** One clock's verdict. */
export interface ClockResult {
  readonly name: "squeezing-onset" | "squeezing-level" | "phase-diffusion" | "classical-breakdown";
  /** True when it rang within the span; false when projected or unreachable. */
  readonly reached: boolean;
  /** Time since the start [code time], undefined when it can never ring. */
  readonly time: number | undefined;
  /** How the time was found. */
  readonly method: string;
}

/** Accumulates Θ, X and B and rings the clocks. */
export class ClockAccumulator {
  readonly particles: number;
  readonly squeezingDb: number;
  private readonly tStart: number;
  private t: number;
  private rates: ClockRates;
  theta = 0;
  chiIntegral = 0;
  breakdown = 0;
  private readonly xOnset: number;
  private readonly xLevel: number | undefined;
  private readonly xDiffusion: number;
  private readonly lnN: number;
  private readonly rung = new Map<ClockResult["name"], number>();

  /**
   * @param particles N, the particles in the mode (its targets are fixed at the start)
   * @param squeezingDb the squeezing level to time, in dB (negative)
   */
  constructor(particles: number, squeezingDb: number, tStart: number, rates: ClockRates) {
    this.particles = particles;
    this.squeezingDb = squeezingDb;
    this.tStart = tStart;
    this.t = tStart;
    this.rates = rates;
    this.xOnset = 1 / particles;
    this.xLevel = xForSqueezing(particles, squeezingDb);
    this.xDiffusion = xForPhaseDiffusion(particles);
    this.lnN = Math.log(particles);
  }

  /**
   * Advance over one step to t1 with the step factors D = ∫dt/a², K = ∫dt/a and
   * the rates at t1; `midOmegaTilde`, when given, is ωa² at the step's middle
   * (midpoint rule instead of the trapezoid).
   */
  advance(t1: number, drift: number, kick: number, rates: ClockRates, midOmegaTilde?: number): void {
    const t0 = this.t;
    const x0 = Math.abs(this.chiIntegral);
    const b0 = this.breakdown;
    this.theta += (midOmegaTilde ?? 0.5 * (this.rates.omegaTilde + rates.omegaTilde)) * drift;
    this.chiIntegral += 0.5 * (this.rates.chiTilde + rates.chiTilde) * kick;
    this.breakdown += 0.5 * (this.rates.lambda + rates.lambda) * (t1 - t0);
    const x1 = Math.abs(this.chiIntegral);
    const cross = (name: ClockResult["name"], target: number | undefined, v0: number, v1: number) => {
      if (target === undefined || this.rung.has(name) || !(v1 >= target)) return;
      // offsets from the start, so that a crossing within the first step keeps its precision
      this.rung.set(name, t0 - this.tStart + ((target - v0) / (v1 - v0)) * (t1 - t0));
    };
    cross("squeezing-onset", this.xOnset, x0, x1);
    cross("squeezing-level", this.xLevel, x0, x1);
    cross("phase-diffusion", this.xDiffusion, x0, x1);
    cross("classical-breakdown", this.lnN, b0, this.breakdown);
    this.t = t1;
    this.rates = rates;
  }

  /** JSON text of the running state (exact: JSON round-trips doubles). */
  save(): string {
    return JSON.stringify({ t: this.t, rates: this.rates, theta: this.theta, chi: this.chiIntegral, b: this.breakdown, rung: [...this.rung] });
  }

  /** Restore what save() wrote. */
  restore(text: string): void {
    const s = JSON.parse(text) as { t: number; rates: ClockRates; theta: number; chi: number; b: number; rung: [ClockResult["name"], number][] };
    this.t = s.t;
    this.rates = s.rates;
    this.theta = s.theta;
    this.chiIntegral = s.chi;
    this.breakdown = s.b;
    this.rung.clear();
    for (const [k, v] of s.rung) this.rung.set(k, v);
  }

  /** The Kerr state of the mode now. */
  state(): KerrState {
    return kerrState(this.particles, Math.abs(this.chiIntegral), this.theta);
  }

  /** Every clock's verdict, projecting those not yet rung with the current rates. */
  results(): ClockResult[] {
    const now = this.t - this.tStart;
    const chiRate = Math.abs(this.rates.chiTilde); // projected with a frozen at its last value
    const project = (name: ClockResult["name"], target: number | undefined, value: number, rate: number, what: string): ClockResult => {
      const t = this.rung.get(name);
      if (t !== undefined) return { name, reached: true, time: t, method: `${what}, crossed during the run (linear within the step)` };
      if (target === undefined) return { name, reached: false, time: undefined, method: `never: the best single-mode squeezing for N = ${this.particles.toPrecision(3)} does not reach ${this.squeezingDb} dB` };
      if (!(rate > 0)) return { name, reached: false, time: undefined, method: `${what}; the rate is zero, so it never rings` };
      return { name, reached: false, time: now + (target - value) / rate, method: `${what}, projected past the end with the last rate` };
    };
    const x = Math.abs(this.chiIntegral);
    return [
      project("squeezing-onset", this.xOnset, x, chiRate, "N|∫χ dt| = 1, i.e. t ≈ 1/(N|χ|)"),
      project("squeezing-level", this.xLevel, x, chiRate, `squeezing reaches ${this.squeezingDb} dB (exact Kerr variance)`),
      project("phase-diffusion", this.xDiffusion, x, chiRate, "|⟨b⟩|²/N = 1/e at |∫χ dt| = 2 asin(1/(2√N))"),
      project("classical-breakdown", this.lnN, this.breakdown, this.rates.lambda, "∫λ dt = ln N with λ = √(4πG ρ_eff)"),
    ];
  }
}

const YEAR = 365.25 * 86400;

/** A duration in seconds as readable text: ns … Gyr, then years in powers of ten. */
export function formatDuration(seconds: number): string {
  const s = Math.abs(seconds);
  const fmt = (v: number, unit: string) => `${formatNumber(v)} ${unit}`;
  if (s === 0) return "0 s";
  if (s < 1e-6) return fmt(seconds * 1e9, "ns");
  if (s < 1e-3) return fmt(seconds * 1e6, "µs");
  if (s < 1) return fmt(seconds * 1e3, "ms");
  if (s < YEAR) return fmt(seconds, "s");
  if (s < 1e3 * YEAR) return fmt(seconds / YEAR, "yr");
  if (s < 1e6 * YEAR) return fmt(seconds / (1e3 * YEAR), "kyr");
  if (s < 1e9 * YEAR) return fmt(seconds / (1e6 * YEAR), "Myr");
  if (s < 1e12 * YEAR) return fmt(seconds / (1e9 * YEAR), "Gyr");
  return fmt(seconds / YEAR, "yr");
}
