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
 *   Berman & Zaslavsky 1978), with λ the estimate of gravity-rate.ts
 *   (√(4πG ρ_eff), f H in expanding boxes, 0 without gravity: never).
 * A clock that has not rung by the end is projected with the last rate.
 */
import { formatNumber } from "../core/format.js";
import { kerrState, xForPhaseDiffusion, xForSqueezing, type KerrState } from "./kerr.js";
import { COHERENT, isCoherent, type GaussianStart } from "./gaussian-start.js";
import { closedIntegrals, openKerrState, type KerrIntegrals } from "./open-kerr.js";
import { advanceIntegrals, type StepIncrement } from "./kerr-integrals.js";
import { crossingWithin, meanFieldCollapsed, projectCrossing, squeezingReached, type Condition } from "./open-clocks.js";

/** The a-free coefficients at one instant (code units). */
export interface ClockRates {
  /** ω a² [1/code time]. */
  readonly omegaTilde: number;
  /** χ a [1/code time]. */
  readonly chiTilde: number;
  /** λ [1/code time]. */
  readonly lambda: number;
  /** χ_ad = (1/ħ) dμ/dN at the current a [1/code time] (when known; integrated by the trapezoid rule in t). */
  readonly chiAdiabatic?: number;
}

/** The mode's quantum state and decoherence (rates per code time); default: coherent, closed. */
export interface ModeModel {
  readonly start: GaussianStart;
  readonly lossRate: number;
  readonly dephasingRate: number;
}

export const CLOSED_COHERENT: ModeModel = { start: COHERENT, lossRate: 0, dephasingRate: 0 };

/** One clock's verdict. */
export interface ClockResult {
  readonly name: "squeezing-onset" | "squeezing-level" | "phase-diffusion" | "phase-diffusion-adiabatic" | "classical-breakdown";
  /** True when it rang within the span; false when projected or unreachable. */
  readonly reached: boolean;
  /** Time since the start [code time], undefined when it can never ring. */
  readonly time: number | undefined;
  /** How the time was found. */
  readonly method: string;
}

/**
 * Accumulates Θ, X, ∫χ_ad dt and B and rings the clocks. For a coherent,
 * closed mode the squeezing and phase-diffusion clocks ring on |X| (exact
 * targets of kerr.ts); for another start, or with loss or dephasing, they ring
 * on the state itself (open-kerr.ts), located within the step by bisection.
 */
export class ClockAccumulator {
  readonly particles: number;
  readonly squeezingDb: number;
  readonly model: ModeModel;
  private readonly tStart: number;
  private t: number;
  private rates: ClockRates;
  theta = 0;
  chiIntegral = 0;
  /** ∫χ_ad dt (0 while no adiabatic coefficient is known). */
  chiAdiabaticIntegral = 0;
  breakdown = 0;
  /** How λ of the breakdown estimate is found (its method text). */
  breakdownLabel = "estimate: ∫λ dt = ln N with λ = √(4πG ρ_eff)";
  /** The open-system integrals with X (frozen mode) and with ∫χ_ad dt (adiabatic). */
  integrals: KerrIntegrals = closedIntegrals(0);
  integralsAdiabatic: KerrIntegrals = closedIntegrals(0);
  private readonly simple: boolean;
  private readonly xOnset: number;
  private readonly xLevel: number | undefined;
  private readonly xDiffusion: number;
  private readonly lnN: number;
  private readonly rung = new Map<ClockResult["name"], number>();
  private readonly levelReached: Condition;
  private readonly collapsed: Condition;

  /**
   * @param particles N, the particles in the mode (its targets are fixed at the start)
   * @param squeezingDb the squeezing level to time, in dB (negative)
   * @param model the start and the loss and dephasing rates (default: coherent, closed)
   */
  constructor(particles: number, squeezingDb: number, tStart: number, rates: ClockRates, model: ModeModel = CLOSED_COHERENT) {
    this.particles = particles;
    this.squeezingDb = squeezingDb;
    this.model = model;
    this.tStart = tStart;
    this.t = tStart;
    this.rates = rates;
    this.simple = isCoherent(model.start) && model.lossRate === 0 && model.dephasingRate === 0;
    this.xOnset = 1 / particles;
    this.xLevel = this.simple ? xForSqueezing(particles, squeezingDb) : undefined;
    this.xDiffusion = xForPhaseDiffusion(particles);
    this.lnN = Math.log(particles);
    this.levelReached = squeezingReached(particles, model.start, squeezingDb);
    this.collapsed = meanFieldCollapsed(particles, model.start);
    if (!this.simple && this.levelReached(this.integrals)) this.rung.set("squeezing-level", 0);
  }

  /**
   * Advance over one step to t1 with the step factors D = ∫dt/a², K = ∫dt/a and
   * the rates at t1; `midOmegaTilde`, when given, is ωa² at the step's middle
   * (midpoint rule instead of the trapezoid); `adiabaticIncrement`, when given, is the step's
   * ∫χ_ad dt as measured (a twin field's overlap phase) instead of the trapezoid of the rates.
   */
  advance(t1: number, drift: number, kick: number, rates: ClockRates, midOmegaTilde?: number, adiabaticIncrement?: number): void {
    const t0 = this.t;
    const x0 = Math.abs(this.chiIntegral);
    const xa0 = Math.abs(this.chiAdiabaticIntegral);
    const b0 = this.breakdown;
    const dTheta = (midOmegaTilde ?? 0.5 * (this.rates.omegaTilde + rates.omegaTilde)) * drift;
    const dX = 0.5 * (this.rates.chiTilde + rates.chiTilde) * kick;
    const dXa = adiabaticIncrement ?? 0.5 * ((this.rates.chiAdiabatic ?? 0) + (rates.chiAdiabatic ?? 0)) * (t1 - t0);
    this.theta += dTheta;
    this.chiIntegral += dX;
    this.chiAdiabaticIntegral += dXa;
    this.breakdown += 0.5 * (this.rates.lambda + rates.lambda) * (t1 - t0);
    const x1 = Math.abs(this.chiIntegral);
    const xa1 = Math.abs(this.chiAdiabaticIntegral);
    const at = (f: number) => t0 - this.tStart + f * (t1 - t0); // offsets from the start keep a first-step crossing's precision
    const cross = (name: ClockResult["name"], target: number | undefined, v0: number, v1: number) => {
      if (target === undefined || this.rung.has(name) || !(v1 >= target)) return;
      this.rung.set(name, at((target - v0) / (v1 - v0)));
    };
    cross("squeezing-onset", this.xOnset, x0, x1);
    cross("classical-breakdown", this.lnN, b0, this.breakdown);
    if (this.simple) {
      cross("squeezing-level", this.xLevel, x0, x1);
      cross("phase-diffusion", this.xDiffusion, x0, x1);
      cross("phase-diffusion-adiabatic", this.xDiffusion, xa0, xa1);
    } else {
      const dt = t1 - t0;
      const step: StepIncrement = { dTheta, dX, gamma: this.model.lossRate, kappa: this.model.dephasingRate, dt };
      const stepAd: StepIncrement = { ...step, dX: dXa };
      const k0 = this.integrals;
      const ka0 = this.integralsAdiabatic;
      this.integrals = advanceIntegrals(k0, step);
      this.integralsAdiabatic = advanceIntegrals(ka0, stepAd);
      const ring = (name: ClockResult["name"], cond: Condition, k: KerrIntegrals, kStart: KerrIntegrals, inc: StepIncrement) => {
        if (this.rung.has(name) || !cond(k)) return;
        this.rung.set(name, at(crossingWithin(kStart, inc, cond)));
      };
      ring("squeezing-level", this.levelReached, this.integrals, k0, step);
      ring("phase-diffusion", this.collapsed, this.integrals, k0, step);
      if (rates.chiAdiabatic !== undefined) ring("phase-diffusion-adiabatic", this.collapsed, this.integralsAdiabatic, ka0, stepAd);
    }
    this.t = t1;
    this.rates = rates;
  }

  /** JSON text of the running state (exact: JSON round-trips doubles). */
  save(): string {
    return JSON.stringify({
      t: this.t,
      rates: this.rates,
      theta: this.theta,
      chi: this.chiIntegral,
      chiAd: this.chiAdiabaticIntegral,
      b: this.breakdown,
      k: this.integrals,
      ka: this.integralsAdiabatic,
      rung: [...this.rung],
    });
  }

  /** Restore what save() wrote. */
  restore(text: string): void {
    const s = JSON.parse(text) as {
      t: number;
      rates: ClockRates;
      theta: number;
      chi: number;
      chiAd?: number;
      b: number;
      k?: KerrIntegrals;
      ka?: KerrIntegrals;
      rung: [ClockResult["name"], number][];
    };
    this.t = s.t;
    this.rates = s.rates;
    this.theta = s.theta;
    this.chiIntegral = s.chi;
    this.chiAdiabaticIntegral = s.chiAd ?? 0;
    this.breakdown = s.b;
    this.integrals = s.k ?? closedIntegrals(0);
    this.integralsAdiabatic = s.ka ?? closedIntegrals(0);
    this.rung.clear();
    for (const [k, v] of s.rung) this.rung.set(k, v);
  }

  /** The state of the mode now (the exact Kerr state, with the start and the rates of the model). */
  state(): KerrState {
    if (this.simple) return kerrState(this.particles, Math.abs(this.chiIntegral), this.theta);
    return openKerrState(this.particles, this.model.start, this.integrals);
  }

  /**
   * Every clock's verdict, projecting those not yet rung with the current rates; `adiabatic` gives the
   * rate to project the adiabatic clock with and says how it was measured (default: the last rate).
   */
  results(adiabatic?: { readonly rate: number; readonly how: string }): ClockResult[] {
    const now = this.t - this.tStart;
    const chiRate = Math.abs(this.rates.chiTilde); // projected with a frozen at its last value
    const chiAd = adiabatic ? adiabatic.rate : this.rates.chiAdiabatic;
    const never = (name: ClockResult["name"], why: string): ClockResult => ({ name, reached: false, time: undefined, method: why });
    const project = (name: ClockResult["name"], target: number | undefined, value: number, rate: number, what: string): ClockResult => {
      const t = this.rung.get(name);
      if (t !== undefined) return { name, reached: true, time: t, method: `${what}, crossed during the run (linear within the step)` };
      if (target === undefined) return never(name, `never: the best single-mode squeezing for N = ${formatNumber(this.particles)} does not reach ${formatNumber(this.squeezingDb)} dB`);
      if (!(rate > 0)) return never(name, `${what}; the rate is zero, so it never rings`);
      return { name, reached: false, time: now + (target - value) / rate, method: `${what}, projected past the end with the last rate` };
    };
    const x = Math.abs(this.chiIntegral);
    const onset = project("squeezing-onset", this.xOnset, x, chiRate, "N|∫χ dt| = 1, i.e. t ≈ 1/(N|χ|)");
    const breakdown = project("classical-breakdown", this.lnN, this.breakdown, this.rates.lambda, this.breakdownLabel);
    const adWhat = `|⟨b⟩|²/N = 1/e with the adiabatic coefficient χ_ad = (1/ħ) dμ/dN${adiabatic ? `, ${adiabatic.how}` : ""}`;
    if (this.simple) {
      return [
        onset,
        project("squeezing-level", this.xLevel, x, chiRate, `squeezing reaches ${this.squeezingDb} dB (exact Kerr variance)`),
        project("phase-diffusion", this.xDiffusion, x, chiRate, "|⟨b⟩|²/N = 1/e at |∫χ dt| = 2 asin(1/(2√N)) (frozen-mode χ)"),
        chiAd === undefined
          ? never("phase-diffusion-adiabatic", "no adiabatic coefficient for this mode (not a stationary state, no twin field)")
          : project("phase-diffusion-adiabatic", this.xDiffusion, Math.abs(this.chiAdiabaticIntegral), Math.abs(chiAd), adWhat),
        breakdown,
      ];
    }
    const stateBased = (name: ClockResult["name"], cond: Condition, k: KerrIntegrals, chi: number, what: string): ClockResult => {
      const t = this.rung.get(name);
      if (t !== undefined) return { name, reached: true, time: t, method: `${what}, reached during the run (bisection within the step)` };
      const r = { omega: 0, chi, gamma: this.model.lossRate, kappa: this.model.dephasingRate };
      const horizon = Math.max(Math.abs(chi) > 0 ? (2 * Math.PI) / Math.abs(chi) : 0, r.gamma > 0 ? 60 / r.gamma : 0, r.kappa > 0 ? 60 / r.kappa : 0);
      const guess = Math.abs(chi) > 0 ? Math.max(1e-300, (1 / this.particles) / Math.abs(chi)) : horizon / 1e6;
      let tau: number | undefined;
      try {
        tau = horizon > 0 ? projectCrossing(k, r, cond, guess, horizon) : undefined;
      } catch (e) {
        if (!(e instanceof RangeError)) throw e;
      }
      if (tau === undefined) return never(name, `${what}; never within ${formatNumber(horizon)} time units with the last rates (loss or dephasing act first)`);
      return { name, reached: false, time: now + tau, method: `${what}, projected past the end with the last rates` };
    };
    const chiNow = this.rates.chiTilde; // a frozen at its last value, as for the coherent clocks
    return [
      onset,
      stateBased("squeezing-level", this.levelReached, this.integrals, chiNow, `squeezing reaches ${this.squeezingDb} dB (exact variance of the chosen start with loss and dephasing)`),
      stateBased("phase-diffusion", this.collapsed, this.integrals, chiNow, "|⟨b⟩|² down by 1/e from its start (frozen-mode χ)"),
      chiAd === undefined
        ? never("phase-diffusion-adiabatic", "no adiabatic coefficient for this mode (not a stationary state, no twin field)")
        : stateBased("phase-diffusion-adiabatic", this.collapsed, this.integralsAdiabatic, chiAd, adWhat),
      breakdown,
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
