/**
 * A region's mass outflow as a loss rate of its mode. The particles N(t) a
 * region holds change only by the flux through its boundary; read as Lindblad
 * loss at rate γ(t) (⟨b†b⟩ = N(0) e^{−Γ}, Γ = ∫γ dt), the loss rate is
 *   γ = −d ln N / dt,
 * and between two measurements the mean rate over the interval is exact:
 *   γ̄ = −ln(N₁/N₀)/(t₁ − t₀)   (the interval's Γ over its length).
 * A negative value is inflow. The whole span's mean is the constant rate with
 * the same Γ, the number to give back as a loss rate.
 */
import type { Grid } from "../grid/grid.js";
import { densestPoint, regionWindow, type ModeRegion } from "./mode.js";

/** The outflow rates of a region measured at times t (any unit) with particles N. */
export interface OutflowRates {
  /** Mean loss rate over the interval ending at each sample (NaN for the first). */
  readonly perInterval: number[];
  /** Mean loss rate over the whole span (NaN with fewer than two samples). */
  readonly mean: number;
  /** Γ = −ln(N_last/N_first). */
  readonly lossIntegral: number;
}

/**
 * The largest relative change of N from its first value when it stays below 1e-10 (a whole box keeps its mass
 * to round-off, about 1e-14 over a run, as does a region nothing crosses): there is no outflow to read a rate
 * from. Undefined when N changes more.
 */
export function constantToRoundOff(particles: readonly number[]): number | undefined {
  const change = Math.max(...particles.map((n) => Math.abs(n / (particles[0] as number) - 1)));
  return change < 1e-10 ? change : undefined;
}

/** Loss rates −Δ ln N/Δt from samples (times increasing, N > 0), in the inverse of the times' unit. */
export function outflowRates(times: readonly number[], particles: readonly number[]): OutflowRates {
  if (times.length !== particles.length) throw new RangeError("outflowRates: as many times as particle counts are needed");
  const rate = (i: number, j: number) => -Math.log((particles[j] as number) / (particles[i] as number)) / ((times[j] as number) - (times[i] as number));
  const perInterval = times.map((_, j) => (j === 0 ? Number.NaN : rate(j - 1, j)));
  const last = times.length - 1;
  return {
    perInterval,
    mean: last > 0 ? rate(0, last) : Number.NaN,
    lossIntegral: last > 0 ? -Math.log((particles[last] as number) / (particles[0] as number)) : 0,
  };
}

/** What the meter keeps between rows (and in checkpoints): the first and the last sample. */
export interface OutflowMeterState {
  readonly t0: number;
  readonly n0: number;
  readonly t: number;
  readonly n: number;
}

/**
 * A region's particles measured on the run's field at every time-series row
 * (in code time), with the loss rate over each interval between rows and
 * over the whole span. The window of a fixed region is computed once; a
 * "densest" sphere follows the densest cell.
 */
export class OutflowMeter {
  private fixed: Float64Array | undefined;
  private first: { t: number; n: number } | undefined;
  private last: { t: number; n: number; rate: number } | undefined;

  constructor(
    private readonly grid: Grid,
    readonly region: Exclude<ModeRegion, { kind: "box" }>,
    private readonly particleMass: number,
  ) {
    if (region.kind !== "densest") this.fixed = regionWindow(grid, region);
  }

  /** Particles in the region now (ψ interleaved, code units). */
  particles(psi: Float64Array): number {
    const r = this.region;
    const w = this.fixed ?? regionWindow(this.grid, { kind: "sphere", center: densestPoint(this.grid, psi), radius: (r as { radius: number }).radius });
    let sum = 0;
    for (let p = 0; p < this.grid.size; p++) sum += (w[p] as number) ** 2 * ((psi[2 * p] as number) ** 2 + (psi[2 * p + 1] as number) ** 2);
    return (sum * this.grid.cellVolume) / this.particleMass;
  }

  /** Measure at time t: [particles, loss rate over the interval since the last row (NaN at the first)]. A repeated t repeats the last row. */
  sample(t: number, psi: Float64Array): [number, number] {
    if (this.last && !(t > this.last.t)) return [this.last.n, this.last.rate];
    const n = this.particles(psi);
    const rate = this.last ? -Math.log(n / this.last.n) / (t - this.last.t) : Number.NaN;
    this.first ??= { t, n };
    this.last = { t, n, rate };
    return [n, rate];
  }

  /** The rates over the span measured so far (per code time). */
  rates(): { mean: number; lossIntegral: number; first?: { t: number; n: number }; last?: { t: number; n: number } } {
    if (!this.first || !this.last) return { mean: Number.NaN, lossIntegral: 0 };
    const span = outflowRates([this.first.t, this.last.t], [this.first.n, this.last.n]);
    return { mean: this.last.t > this.first.t ? span.mean : Number.NaN, lossIntegral: span.lossIntegral, first: this.first, last: this.last };
  }

  save(): OutflowMeterState | undefined {
    return this.first && this.last ? { t0: this.first.t, n0: this.first.n, t: this.last.t, n: this.last.n } : undefined;
  }

  restore(s: OutflowMeterState): void {
    this.first = { t: s.t0, n: s.n0 };
    this.last = { t: s.t, n: s.n, rate: Number.NaN };
  }
}
