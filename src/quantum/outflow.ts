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

/** The outflow rates of a region measured at times t (any unit) with particles N. */
export interface OutflowRates {
  /** Mean loss rate over the interval ending at each sample (NaN for the first). */
  readonly perInterval: number[];
  /** Mean loss rate over the whole span (NaN with fewer than two samples). */
  readonly mean: number;
  /** Γ = −ln(N_last/N_first). */
  readonly lossIntegral: number;
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
