/**
 * The ensemble beside the two pictures the sidecar and the breakdown
 * machinery rest on, on the same config (the companion run, companion.ts):
 * - the linear picture: the tangent-linear depletion Tr V†V of fluctuations
 *   around the classical solution seeded as the vacuum (time-dependent
 *   Bogoliubov theory), against the ensemble's N − N₀;
 * - the single-mode picture: the Kerr mode of the Hartree mode, a coherent
 *   start of N quanta after the accumulated phase X (kerr.ts, exact), giving
 *   |⟨b⟩|/√N = exp(−2N sin²(X/2)) and the smallest quadrature variance,
 *   with X = ∫χ dt (frozen mode) and X = ∫χ_ad dt (adiabatic), against the
 *   ensemble's ⟨b⟩ in the classical mode and its V_min.
 * Each picture's clock is the time it crosses the same level: the depletion
 * reaching a fraction of N (breakdown.depletion_fraction) and the mean field
 * |⟨b⟩|²/N falling to 1/e (the sidecar's phase-diffusion level).
 */
import { kerrState } from "../quantum/kerr.js";
import type { CompanionSeries } from "./companion.js";
import type { Estimate } from "./observables.js";
import { crossingTime, type EnsembleReduction } from "./reduce.js";

/** One sample time of the comparison (particles; amplitudes relative to √N). */
export interface ComparisonRow {
  readonly t: number;
  readonly members: number;
  readonly depletion: Estimate;
  readonly depletionTangent: Estimate;
  readonly fraction: Estimate;
  readonly fractionTangent: Estimate;
  /** |⟨b⟩|/√N. */
  readonly meanField: Estimate;
  readonly meanFieldKerr: number;
  readonly meanFieldKerrAdiabatic: number;
  readonly vMin: Estimate;
  readonly vMinKerr: number;
  readonly vMinKerrAdiabatic: number;
  /** X and ∫χ_ad dt at the ensemble's N. */
  readonly x: number;
  readonly xAdiabatic: number;
}

/** When a method crosses a level (code time), with the times its ± one-error band crosses; null: not within the span. */
export interface Crossing {
  readonly time: number | null;
  readonly earliest: number | null;
  readonly latest: number | null;
}

export interface Comparison {
  readonly rows: readonly ComparisonRow[];
  /** The depletion level in particles (fraction × N) and each method's crossing. */
  readonly depletionLevel: { readonly fraction: number; readonly particles: number; readonly ensemble: Crossing; readonly tangent: Crossing };
  /** The mean-field level of |⟨b⟩|/√N (e^{−1/2}) and each method's crossing. */
  readonly meanFieldLevel: { readonly level: number; readonly ensemble: Crossing; readonly kerr: Crossing; readonly kerrAdiabatic: Crossing };
}

/** The value of a series at t, linear between its times (the end values outside). */
export function interpolate(ts: ArrayLike<number>, vs: ArrayLike<number>, t: number): number {
  let lo = 0;
  let hi = ts.length - 1;
  if (t <= (ts[0] as number)) return vs[0] as number;
  if (t >= (ts[hi] as number)) return vs[hi] as number;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((ts[mid] as number) <= t) lo = mid;
    else hi = mid;
  }
  const f = (t - (ts[lo] as number)) / ((ts[hi] as number) - (ts[lo] as number));
  return (vs[lo] as number) + f * ((vs[hi] as number) - (vs[lo] as number));
}

/** The crossing of `level` by values rising (or, `falling`, dropping) through it, with its ± error band. */
export function crossingOf(times: readonly number[], values: ArrayLike<number>, errors: ArrayLike<number> | undefined, level: number, falling: boolean): Crossing {
  const s = falling ? -1 : 1;
  const at = (shift: number) => crossingTime(times, Array.from(values, (v, i) => s * (v + shift * (errors ? (errors[i] as number) : 0))), s * level);
  if (!errors) return { time: at(0), earliest: null, latest: null };
  // rising: the upper edge of the band crosses first; falling: the lower edge
  return { time: at(0), earliest: at(s), latest: at(-s) };
}

/** The comparison at the ensemble's sample times; `fraction` is the depletion level's fraction of N. */
export function compareEnsemble(reduction: EnsembleReduction, companion: CompanionSeries, particles: number, fraction: number): Comparison {
  const scaleX = companion.particles / particles;
  const at = (vs: Float64Array, t: number) => interpolate(companion.t, vs, t);
  const rows = reduction.samples.map((s, i): ComparisonRow => {
    const t = reduction.times[i] as number;
    const x = at(companion.x, t) * scaleX;
    const xa = at(companion.xAdiabatic, t) * scaleX;
    const kerr = kerrState(particles, x);
    const kerrAd = kerrState(particles, xa);
    const dTan = { value: at(companion.depletion, t), error: at(companion.depletionError, t) };
    const amplitude = Math.sqrt(Math.max(0, s.coherence.value));
    return {
      t,
      members: s.members,
      depletion: s.depletion,
      depletionTangent: dTan,
      fraction: s.fraction,
      fractionTangent: { value: 1 - dTan.value / particles, error: dTan.error / particles },
      meanField: { value: amplitude, error: amplitude > 0 ? s.coherence.error / (2 * amplitude) : s.coherence.error },
      meanFieldKerr: Math.sqrt(kerr.meanFieldFraction),
      meanFieldKerrAdiabatic: Math.sqrt(kerrAd.meanFieldFraction),
      vMin: s.vMin,
      vMinKerr: kerr.minVariance,
      vMinKerrAdiabatic: kerrAd.minVariance,
      x,
      xAdiabatic: xa,
    };
  });
  const times = reduction.times;
  const rowTimes = Array.from(companion.t);
  const level = Math.exp(-0.5);
  const kerrCurve = (xs: Float64Array) => Array.from(xs, (x) => Math.sqrt(kerrState(particles, x * scaleX).meanFieldFraction));
  const target = fraction * particles;
  return {
    rows,
    depletionLevel: {
      fraction,
      particles: target,
      ensemble: crossingOf(times, rows.map((r) => r.depletion.value), rows.map((r) => r.depletion.error), target, false),
      tangent: crossingOf(rowTimes, companion.depletion, companion.depletionError, target, false),
    },
    meanFieldLevel: {
      level,
      ensemble: crossingOf(times, rows.map((r) => r.meanField.value), rows.map((r) => r.meanField.error), level, true),
      kerr: crossingOf(rowTimes, kerrCurve(companion.x), undefined, level, true),
      kerrAdiabatic: crossingOf(rowTimes, kerrCurve(companion.xAdiabatic), undefined, level, true),
    },
  };
}
