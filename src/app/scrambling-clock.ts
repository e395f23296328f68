/**
 * Clocks of the measured Lyapunov rate, from the integral ∫λ dt at the
 * renormalisations (t_i, I_i), ringing when it reaches a target:
 *
 * - the scrambling clock, ∫λ dt = ln N: the Ehrenfest (scrambling) time of
 *   chaotic dynamics (Berman & Zaslavsky 1978, Physica A 91, 450; Rammensee,
 *   Urbina & Richter 2018, PRL 121, 124101);
 * - the depletion time of the rate, ∫λ dt = ½ ln N: fluctuations of relative
 *   size N^(−1/2) grow as e^(∫λ dt), the depletion as their square, so it
 *   reaches N when ∫λ dt = ½ ln N (Castin & Dum 1997, PRL 79, 3553).
 *
 * Each clock is
 * - rung: at the first interval where I crosses the target, linearly within it;
 * - projected: beyond the run at the rate of its second half,
 *   t = t_last + (target − I_last)/λ₂, λ₂ = (I_last − I_mid)/(t_last − t_mid),
 *   when that half measured exponential growth: I grew by more than ln 4 over
 *   it (growth along the neutral directions, linear in t, gives ln 2 over
 *   the second half of a run, so anything up to ln 4 is not counted as
 *   exponential);
 * - never: otherwise (a free field, a stable soliton): no exponential growth
 *   was measured over the run, and no time is projected.
 */
import { formatNumber } from "../core/format.js";
import { formatDuration } from "../quantum/clocks.js";

/** Least growth of ∫λ dt over the second half of the run that counts as exponential. */
export const EXPONENTIAL_GROWTH = Math.log(4);

/** A clock's verdict; times in code units since the start of the run. */
export interface ScramblingVerdict {
  readonly verdict: "rang" | "projected" | "never";
  /** Time since the start (null: never). */
  readonly time: number | null;
  /** The rate the projection used (the second half's), or the finite-time rate for a rung clock. */
  readonly rate: number | null;
  readonly method: string;
}

/** The verdict of the clock ∫λ dt = `target` (`what` names it in the method) from the renormalisation times and integrals. */
export function rateClock(t: readonly number[], integral: readonly number[], target: number, what: string): ScramblingVerdict {
  const t0 = t[0]!;
  for (let i = 1; i < t.length; i++) {
    const [a, b] = [integral[i - 1]!, integral[i]!];
    if (b >= target) {
      const at = t[i - 1]! + ((t[i]! - t[i - 1]!) * (target - a)) / (b - a);
      return { verdict: "rang", time: at - t0, rate: b / (t[i]! - t0), method: `measured: ${what}, λ of the tangent-linear companion (Benettin)` };
    }
  }
  const last = t.length - 1;
  const mid = t.findIndex((ti) => ti >= t0 + (t[last]! - t0) / 2);
  const growth = last > 0 && mid < last ? integral[last]! - integral[mid]! : 0;
  if (growth > EXPONENTIAL_GROWTH) {
    const rate = growth / (t[last]! - t[mid]!);
    return { verdict: "projected", time: t[last]! + (target - integral[last]!) / rate - t0, rate, method: `projected: ${what} at the measured rate of the run's second half` };
  }
  return { verdict: "never", time: null, rate: null, method: `never: ∫λ dt grew by ${formatNumber(growth)} over the run's second half, no exponential growth (more than ln 4)` };
}

/** The scrambling clock ∫λ dt = ln N. */
export function scramblingClock(t: readonly number[], integral: readonly number[], lnN: number): ScramblingVerdict {
  return rateClock(t, integral, lnN, "∫λ dt = ln N");
}

/** A verdict in physical units, as summary.json gives it (`timeS`: seconds per code time; `span`: the run's, code time). */
export function clockRecord(v: ScramblingVerdict, timeS: number, span: number) {
  return {
    verdict: v.verdict,
    time_s: v.time === null ? null : v.time * timeS,
    time: v.time === null ? "never" : formatDuration(v.time * timeS),
    rate_per_s: v.rate === null ? null : v.rate / timeS,
    method: v.method,
    ratio_to_span: v.time === null ? null : v.time / span,
  };
}
