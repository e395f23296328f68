/**
 * The scrambling clock of the measured Lyapunov rate: the time at which
 * ∫λ dt reaches ln N, the Ehrenfest (scrambling) time of chaotic dynamics
 * (Berman & Zaslavsky 1978, Physica A 91, 450; Rammensee, Urbina & Richter
 * 2018, PRL 121, 124101), from the integral's values at the
 * renormalisations (t_i, I_i):
 *
 * - rung: the first interval where I crosses ln N, linearly within it;
 * - projected: beyond the run at the rate of its second half,
 *   t = t_last + (ln N − I_last)/λ₂, λ₂ = (I_last − I_mid)/(t_last − t_mid),
 *   when that half measured exponential growth: I grew by more than ln 4 over
 *   it (growth along the neutral directions, linear in t, gives ln 2 over
 *   the second half of a run, so anything up to ln 4 is not counted as
 *   exponential);
 * - never: otherwise (a free field, a stable soliton): no exponential growth
 *   was measured over the run, and no time is projected.
 */

/** Least growth of ∫λ dt over the second half of the run that counts as exponential. */
import { formatNumber } from "../core/format.js";

export const EXPONENTIAL_GROWTH = Math.log(4);

/** The clock's verdict; times in code units since the start of the run. */
export interface ScramblingVerdict {
  readonly verdict: "rang" | "projected" | "never";
  /** Time since the start (null: never). */
  readonly time: number | null;
  /** The rate the projection used (the second half's), or the finite-time rate for a rung clock. */
  readonly rate: number | null;
  readonly method: string;
}

/** The verdict from the renormalisation times `t` (first: the start, integral 0) and integrals `integral`. */
export function scramblingClock(t: readonly number[], integral: readonly number[], lnN: number): ScramblingVerdict {
  const t0 = t[0]!;
  for (let i = 1; i < t.length; i++) {
    const [a, b] = [integral[i - 1]!, integral[i]!];
    if (b >= lnN) {
      const at = t[i - 1]! + ((t[i]! - t[i - 1]!) * (lnN - a)) / (b - a);
      return { verdict: "rang", time: at - t0, rate: b / (t[i]! - t0), method: "measured: ∫λ dt = ln N, λ of the tangent-linear companion (Benettin)" };
    }
  }
  const last = t.length - 1;
  const mid = t.findIndex((ti) => ti >= t0 + (t[last]! - t0) / 2);
  const growth = last > 0 && mid < last ? integral[last]! - integral[mid]! : 0;
  if (growth > EXPONENTIAL_GROWTH) {
    const rate = growth / (t[last]! - t[mid]!);
    return {
      verdict: "projected",
      time: t[last]! + (lnN - integral[last]!) / rate - t0,
      rate,
      method: "projected: ∫λ dt = ln N at the measured rate of the run's second half",
    };
  }
  return { verdict: "never", time: null, rate: null, method: `never: ∫λ dt grew by ${formatNumber(growth)} over the run's second half, no exponential growth (more than ln 4)` };
}
