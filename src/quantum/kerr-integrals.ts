/**
 * The integrals the open Kerr mode needs, accumulated step by step:
 *   Θ = ∫ω dt,  X = ∫χ dt,  Γ = ∫γ dt,  K = ∫κ dt,
 *   J₁ = ∫γ e^{−Γ}(e^{−iX} − 1) dτ,  J₂ = ∫γ e^{−Γ}(e^{−iX} − 1)² dτ.
 * Within a step X and Γ are taken linear in time (the rates at its two ends
 * averaged, as the sidecar does for X), and J₁, J₂ by 8-point Gauss–Legendre
 * quadrature of their smooth integrands; e^{−iX} − 1 = −2 sin²(X/2) − i sin X
 * keeps full relative precision when X is tiny (N J₁ matters at N ~ 1e100).
 */
import { gaussLegendre } from "../math/quadrature.js";
import type { KerrIntegrals } from "./open-kerr.js";

const RULE = gaussLegendre(8);

/** Increments of one step: the linear parts, and the loss rate over the step. */
export interface StepIncrement {
  readonly dTheta: number;
  readonly dX: number;
  /** Loss rate γ during the step [1/time]. */
  readonly gamma: number;
  /** Dephasing rate κ during the step [1/time]. */
  readonly kappa: number;
  readonly dt: number;
}

/** The integrals after a step (or a fraction f of it, 0 ≤ f ≤ 1). */
export function advanceIntegrals(k: KerrIntegrals, s: StepIncrement, f = 1): KerrIntegrals {
  const h = s.dt * f;
  let r1 = 0;
  let i1 = 0;
  let r2 = 0;
  let i2 = 0;
  if (s.gamma !== 0 && h > 0) {
    for (let j = 0; j < RULE.nodes.length; j++) {
      const u = 0.5 * (1 + (RULE.nodes[j] as number)); // fraction of the partial step
      const w = 0.5 * (RULE.weights[j] as number) * h * s.gamma * Math.exp(-(k.loss + s.gamma * u * h));
      const x = k.x + s.dX * f * u;
      const sh = Math.sin(x / 2);
      const er = -2 * sh * sh;
      const ei = -Math.sin(x);
      r1 += w * er;
      i1 += w * ei;
      r2 += w * (er * er - ei * ei);
      i2 += w * 2 * er * ei;
    }
  }
  return {
    theta: k.theta + s.dTheta * f,
    x: k.x + s.dX * f,
    loss: k.loss + s.gamma * h,
    dephasing: k.dephasing + s.kappa * h,
    lossPhase1: [k.lossPhase1[0] + r1, k.lossPhase1[1] + i1],
    lossPhase2: [k.lossPhase2[0] + r2, k.lossPhase2[1] + i2],
  };
}

/** The integrals after time t at constant rates ω, χ, γ, κ, in `pieces` steps (pieces of at most 0.1 in χt and γt, where the 8-point rule is exact to round-off). */
export function constantRateIntegrals(omega: number, chi: number, gamma: number, kappa: number, t: number, pieces = Math.max(1, Math.ceil(Math.max(Math.abs(chi * t), Math.abs(gamma * t)) / 0.1))): KerrIntegrals {
  let k: KerrIntegrals = { theta: 0, x: 0, loss: 0, dephasing: 0, lossPhase1: [0, 0], lossPhase2: [0, 0] };
  const dt = t / pieces;
  for (let i = 0; i < pieces; i++) k = advanceIntegrals(k, { dTheta: omega * dt, dX: chi * dt, gamma, kappa, dt });
  return k;
}
