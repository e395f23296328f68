/**
 * Clocks that ring on the state rather than on X alone: the squeezing level
 * and the mean-field collapse of a non-coherent start or under loss and
 * dephasing. A condition is a test on the accumulated integrals; it is
 * located within a step by bisection on the fraction of the step (X and Γ
 * linear within it), and past the end of a run by extending the integrals
 * with the last rates held constant.
 */
import { advanceIntegrals, type StepIncrement } from "./kerr-integrals.js";
import { closedIntegrals, logMeanFieldFraction, openKerrState, type KerrIntegrals } from "./open-kerr.js";
import type { GaussianStart } from "./gaussian-start.js";

/** True once the clock has rung. */
export type Condition = (k: KerrIntegrals) => boolean;

/** Constant rates per unit time (ω, χ, γ, κ). */
export interface ConstantRates {
  readonly omega: number;
  readonly chi: number;
  readonly gamma: number;
  readonly kappa: number;
}

/** The squeezing has reached `db` (relative variance ≤ 10^{db/10}). */
export function squeezingReached(N: number, start: GaussianStart, db: number): Condition {
  const target = Math.pow(10, db / 10);
  return (k) => openKerrState(N, start, k).relativeVariance <= target;
}

/** |⟨b⟩|² has fallen by 1/e from its start (the mean-field collapse; phase diffusion). */
export function meanFieldCollapsed(N: number, start: GaussianStart): Condition {
  const l0 = logMeanFieldFraction(N, start, closedIntegrals(0));
  return (k) => logMeanFieldFraction(N, start, k) - l0 <= -1;
}

/**
 * The integrals after holding `r` constant for a time τ ≥ 0, in pieces of at
 * most 0.1 in χτ and γτ. Once the loss has removed all but e^{−80} of the
 * mode the loss integrals no longer change, and the rest is added linearly.
 */
export function extendConstant(k: KerrIntegrals, r: ConstantRates, tau: number): KerrIntegrals {
  const lossy = r.gamma > 0 ? Math.min(tau, Math.max(0, (80 - k.loss) / r.gamma)) : tau;
  const pieces = Math.ceil((Math.max(Math.abs(r.chi), r.gamma) * lossy) / 0.1);
  if (pieces > 200000) throw new RangeError(`a clock ${tau.toPrecision(3)} time units ahead spans ${pieces} Kerr phase pieces: too far to follow`);
  let out = k;
  if (r.gamma > 0 && lossy > 0) {
    const dt = lossy / pieces;
    for (let i = 0; i < pieces; i++) out = advanceIntegrals(out, { dTheta: r.omega * dt, dX: r.chi * dt, gamma: r.gamma, kappa: r.kappa, dt });
  }
  const rest = r.gamma > 0 ? tau - lossy : tau;
  return { ...out, theta: out.theta + r.omega * rest, x: out.x + r.chi * rest, loss: out.loss + r.gamma * rest, dephasing: out.dephasing + r.kappa * rest };
}

/** The fraction f ∈ (0, 1] of a step at which `cond` first holds, given that it holds at the step's end. */
export function crossingWithin(k0: KerrIntegrals, step: StepIncrement, cond: Condition): number {
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 60 && hi - lo > 1e-12; i++) {
    const mid = 0.5 * (lo + hi);
    if (cond(advanceIntegrals(k0, step, mid))) hi = mid;
    else lo = mid;
  }
  return hi;
}

/**
 * The time τ > 0 at which `cond` first holds with the rates held constant,
 * searched outward from `guess` up to `horizon`; undefined if it never does.
 * Assumes the condition, once true, stays true over the bracket found.
 */
export function projectCrossing(k0: KerrIntegrals, r: ConstantRates, cond: Condition, guess: number, horizon: number): number | undefined {
  if (!(guess > 0) || !Number.isFinite(guess)) return undefined;
  const at = (tau: number) => cond(extendConstant(k0, r, tau));
  let hi = Math.min(guess, horizon);
  let lo = 0;
  if (at(hi)) {
    // shrink until false (or tiny)
    let t = hi;
    for (let i = 0; i < 200; i++) {
      t /= 4;
      if (!at(t)) {
        lo = t;
        break;
      }
      hi = t;
    }
  } else {
    lo = hi;
    for (;;) {
      if (hi >= horizon) return undefined;
      hi = Math.min(horizon, hi * 4);
      if (at(hi)) break;
      lo = hi;
    }
  }
  for (let i = 0; i < 100 && hi - lo > 1e-10 * hi; i++) {
    const mid = lo === 0 ? hi / 2 : Math.sqrt(lo * hi);
    if (at(mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}
