/**
 * The depletion clock: the time at which the measured number of particles
 * out of the condensate, N_dep(t) (Hutchinson's estimate of Tr(V†V), the
 * depletion plug-in), reaches a stated fraction of the run's particles N
 * (`breakdown.depletion_fraction`; mean-field predictions fail when the
 * depletion is comparable to N: Castin & Dum 1997, PRL 79, 3553). From the
 * measured values (t_i, n_i) at the time-series rows:
 *
 * - rung: at the first row where n reaches the target, interpolated within
 *   the interval linearly in ln n (exponential growth; linearly in n when
 *   the earlier value is 0);
 * - projected: beyond the run at the growth rate of ln n over its second
 *   half, γ = ln(n_last/n_mid)/(t_last − t_mid), when n grew there by more
 *   than a factor 16 (a depletion growing as e^(2∫λ dt) with ∫λ dt growing by
 *   more than ln 4, the scrambling clock's rule; a stable mode's depletion,
 *   n ∝ sin², or secular growth ∝ t² gives at most a factor 4);
 * - never: otherwise, or when the depletion stays below `DEPLETION_FLOOR`
 *   quanta (round-off: a free field's tangent map is complex-linear, V = 0).
 */
import { formatNumber } from "../core/format.js";
import type { ScramblingVerdict } from "./scrambling-clock.js";

/** Least growth of ln N_dep over the run's second half that counts as exponential (twice ln 4). */
export const DEPLETION_GROWTH = 2 * Math.log(4);

/** Depletion below this many quanta is round-off, not growth. */
export const DEPLETION_FLOOR = 1e-9;

/** The verdict from the rows' times `t` (first: the start) and depletions `n` (particle numbers); `target` = fraction × N. */
export function depletionClock(t: readonly number[], n: readonly number[], target: number): ScramblingVerdict {
  const t0 = t[0]!;
  const what = `N_dep = ${formatNumber(target)} particles`;
  if (n[0]! >= target) return { verdict: "rang", time: 0, rate: null, method: `measured: ${what} at the start` };
  for (let i = 1; i < t.length; i++) {
    const [a, b] = [n[i - 1]!, n[i]!];
    if (b >= target) {
      const f = a > 0 ? Math.log(target / a) / Math.log(b / a) : (target - a) / (b - a);
      return { verdict: "rang", time: t[i - 1]! + f * (t[i]! - t[i - 1]!) - t0, rate: null, method: `measured: ${what}, Hutchinson's estimate of the depletion (linear in ln N_dep between rows)` };
    }
  }
  const last = t.length - 1;
  const mid = t.findIndex((ti) => ti >= t0 + (t[last]! - t0) / 2);
  const [nMid, nLast] = [n[mid] ?? 0, n[last]!];
  const growth = last > 0 && mid < last && nMid > DEPLETION_FLOOR && nLast > DEPLETION_FLOOR ? Math.log(nLast / nMid) : 0;
  if (growth > DEPLETION_GROWTH) {
    const rate = growth / (t[last]! - t[mid]!);
    return { verdict: "projected", time: t[last]! + Math.log(target / nLast) / rate - t0, rate, method: `projected: ${what} at the growth rate of ln N_dep over the run's second half` };
  }
  const seen = nLast > DEPLETION_FLOOR ? `N_dep grew by a factor ${formatNumber(Math.exp(growth))} over the run's second half` : `N_dep stayed below ${DEPLETION_FLOOR} particles`;
  return { verdict: "never", time: null, rate: null, method: `never: ${seen}, no exponential growth (more than a factor 16)` };
}
