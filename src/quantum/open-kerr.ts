/**
 * The Kerr mode from a displaced Gaussian start, with Lindblad loss
 * (L = √γ b) and dephasing (L = √κ b†b), for time-dependent ω(t), χ(t),
 * γ(t), κ(t). With H = ħω b†b + (ħχ/2) b†b†bb, the functions
 * Φ_k(s, t) = ⟨e^{s n} b^k⟩ obey first-order equations whose characteristics
 * are linear in w = e^{s} (a Bernoulli equation), which gives in closed form
 *   ⟨b⟩  = e^{−iΘ − (Γ+K)/2}    ⟨:e^{c₁ n}: b⟩₀,
 *   ⟨b²⟩ = e^{−2iΘ − iX − Γ − 2K} ⟨:e^{c₂ n}: b²⟩₀,     ⟨b†b⟩ = N e^{−Γ},
 *   c_k = e^{−Γ}(e^{−ikX} − 1) + ∫₀ᵗ γ e^{−Γ(τ)} (e^{−ikX(τ)} − 1) dτ,
 * with Θ = ∫ω, X = ∫χ, Γ = ∫γ, K = ∫κ and ⟨·⟩₀ the start. For constant rates
 * and a coherent start this is Milburn & Holmes (1986, PRL 56, 2237) and
 * Daniel & Milburn (1989, PRA 39, 4628); without loss, c_k = e^{−ikX} − 1.
 *
 * For the Gaussian start (see gaussian-start.ts; α real, fluctuation moments
 * n, m, λ± = n ± |m|) the normally ordered averages are Gaussian integrals:
 *   ⟨:e^{cn}: b⟩₀  = α (1 + c(m − n)) det(c)^{−3/2} e^{G₀(c)},
 *   ⟨:e^{cn}: b²⟩₀ = [N_α (1 + c(m − n))²/det(c) + m] det(c)^{−3/2} e^{G₀(c)},
 *   det(c) = (1 − cλ₊)(1 − cλ₋),  G₀(c) = c N_α + c² N_α ((n + Re m) − c λ₊λ₋)/det(c),
 * N_α = α². Since |1 + c_k| ≤ 1 and λ± ≥ −½, Re(1 − c_k λ±) > 0 always, so
 * det^{−3/2} = exp(−(3/2)[ln(1 − cλ₊) + ln(1 − cλ₋)]) with principal logs
 * is the continuous branch. The combination c₂ − 2c₁ is accumulated as its
 * own integral, ∫γ e^{−Γ}(e^{−iX} − 1)² dτ, so no N-sized terms cancel in
 * ⟨b²⟩/⟨b⟩².
 *
 * The smallest quadrature variance V_min = ½ + n̄ − |⟨b²⟩ − ⟨b⟩²| subtracts
 * numbers of size N. The closed system is evaluated in double precision by
 * the form that keeps its digits where it is used (closedVariance: the
 * near-Gaussian series of the covariance determinant, the dephased form, the
 * direct form). With loss or dephasing the direct form runs in double
 * precision when its estimated error is below 1e-11 of the result and
 * otherwise repeats in decimal arithmetic with enough digits (about
 * 2 log₁₀ N + 25).
 */
import { complexOps, decimalReal, DOUBLE, type Cx, type Real } from "./real-arith.js";
import { fluctuationMoments, isCoherent, type GaussianStart } from "./gaussian-start.js";
import { kerrState, type KerrState } from "./kerr.js";
import { nearGaussianDeterminant } from "./near-gaussian.js";

/** Integrals accumulated along the run (radians or e-folds; complex ones as [re, im]). */
export interface KerrIntegrals {
  /** Θ = ∫ω dt. */
  readonly theta: number;
  /** X = ∫χ dt (signed; negative for gravity). */
  readonly x: number;
  /** Γ = ∫γ dt (loss). */
  readonly loss: number;
  /** K = ∫κ dt (dephasing). */
  readonly dephasing: number;
  /** ∫γ e^{−Γ} (e^{−iX} − 1) dτ. */
  readonly lossPhase1: readonly [number, number];
  /** ∫γ e^{−Γ} (e^{−iX} − 1)² dτ. */
  readonly lossPhase2: readonly [number, number];
}

/** The closed system: only Θ and X. */
export function closedIntegrals(x: number, theta = 0): KerrIntegrals {
  return { theta, x, loss: 0, dephasing: 0, lossPhase1: [0, 0], lossPhase2: [0, 0] };
}

/** The state of the mode, as for the coherent closed system, plus its mean number. */
export interface OpenKerrState extends KerrState {
  /** ⟨b†b⟩ now, N e^{−Γ}. */
  readonly meanNumber: number;
  /** Digits used: 16 for double precision, more when the variance needed arbitrary precision. */
  readonly digits: number;
}

interface Raw<T> {
  /** ln(|⟨b⟩|²/⟨n⟩) (−Infinity without displacement). */
  ell: T;
  /** ln(⟨b²⟩/⟨b⟩²), or ln|⟨b²⟩/⟨n⟩| in .re when there is no displacement. */
  d: Cx<T>;
  /** ln(|⟨b²⟩|/⟨n⟩) summed directly (not as ℓ + Re D, which cancels once the mean field has dephased). */
  ell2: T;
  /** Im ln⟨b⟩ + Θ (the mean field's phase apart from Θ); without displacement, Im ln⟨b²⟩ + 2Θ. */
  phase: T;
  /** Size of the terms summed, for the error estimate. */
  size: number;
}

function moments<T>(R: Real<T>, N: number, start: GaussianStart, k: KerrIntegrals): Raw<T> {
  const C = complexOps(R);
  const { n, m } = fluctuationMoments(start);
  // N_α = N − n in the working precision (in doubles it would lose n's digits when n ≪ N)
  const NaR = R.sub(R.of(N), R.of(n));
  const Na = R.num(NaR);
  const mAbs = Math.hypot(m[0], m[1]);
  const one = C.c(R.of(1));
  const mm = C.c(R.of(m[0]), R.of(m[1]));
  const mMinusN = C.c(R.sub(R.of(m[0]), R.of(n)), R.of(m[1]));
  // λ± = n ± |m| and n + Re m in the working precision (the start's moments are exact doubles)
  const mAbsR = R.sqrt(R.add(R.mul(R.of(m[0]), R.of(m[0])), R.mul(R.of(m[1]), R.of(m[1]))));
  const lp = R.add(R.of(n), mAbsR);
  const lm = R.sub(R.of(n), mAbsR);
  const nPlusRe = R.add(R.of(n), R.of(m[0]));
  const eG = R.exp(R.of(-k.loss));
  const sh = R.sin(R.of(k.x / 2));
  const e1 = C.c(R.mul(R.of(-2), R.mul(sh, sh)), R.sub(R.of(0), R.sin(R.of(k.x))));
  const c1 = C.add(C.scale(e1, eG), C.c(R.of(k.lossPhase1[0]), R.of(k.lossPhase1[1])));
  const cq = C.add(C.scale(C.mul(e1, e1), eG), C.c(R.of(k.lossPhase2[0]), R.of(k.lossPhase2[1])));
  // c₂ = e^{−Γ}(e^{−2iX} − 1) + 2J₁ + J₂ (= 2c₁ + cq, which cancels near X = π)
  const s2 = R.sin(R.of(k.x));
  const e2 = C.c(R.mul(R.of(-2), R.mul(s2, s2)), R.sub(R.of(0), R.sin(R.of(2 * k.x))));
  const j12 = C.c(R.add(R.mul(R.of(2), R.of(k.lossPhase1[0])), R.of(k.lossPhase2[0])), R.add(R.mul(R.of(2), R.of(k.lossPhase1[1])), R.of(k.lossPhase2[1])));
  const c2 = C.add(C.scale(e2, eG), j12);
  const logDet = (c: Cx<T>) => C.add(C.log1p(C.scale(c, R.sub(R.of(0), lp))), C.log1p(C.scale(c, R.sub(R.of(0), lm))));
  const det = (c: Cx<T>) => C.mul(C.sub(one, C.scale(c, lp)), C.sub(one, C.scale(c, lm)));
  // c² N_α ((n + Re m) − c λ₊λ₋)/det(c)
  const quad = (c: Cx<T>) => C.scale(C.div(C.mul(C.mul(c, c), C.sub(C.c(nPlusRe), C.scale(c, R.mul(lp, lm)))), det(c)), NaR);
  const ld1 = logDet(c1);
  const ld2 = logDet(c2);
  const q1 = quad(c1);
  const q2 = quad(c2);
  if (!(Na > 0)) {
    // no displacement: ⟨b⟩ = 0 and |⟨b²⟩|/⟨n⟩ = e^{−Γ−2K} |m| |det(c₂)|^{−3/2} / (n e^{−Γ})
    const lnB2 = R.sub(R.sub(R.ln(R.of(mAbs / n)), R.of(2 * k.dephasing)), R.mul(R.of(1.5), ld2.re));
    const phase2 = R.sub(R.of(Math.atan2(m[1], m[0]) - k.x), R.mul(R.of(1.5), ld2.im));
    return { ell: R.of(-Infinity), d: C.c(lnB2), ell2: lnB2, phase: phase2, size: 4 };
  }
  // ln⟨b⟩ − ln α + iΘ + (Γ+K)/2 = c₁N_α + quad(c₁) − (3/2) ln det(c₁) + ln(1 + c₁(m − n))
  const e1Log = C.add(C.add(C.scale(c1, NaR), q1), C.sub(C.log1p(C.mul(c1, mMinusN)), C.scale(ld1, R.of(1.5))));
  const ell = R.add(R.sub(R.log1p(R.div(R.of(-n), R.of(N))), R.of(k.dephasing)), R.mul(R.of(2), e1Log.re));
  // ln[(1 + c₂(m − n))²/det(c₂) + m/N_α] = ln(1 + w), w = c₂(2m + c₂((m − n)² − λ₊λ₋))/det(c₂) + m/N_α
  // (both parts of w vanish with X and 1/N_α: the logarithm of 1 + w itself would lose them)
  const mu2 = C.sub(C.mul(mMinusN, mMinusN), C.c(R.mul(lp, lm)));
  const w2 = C.add(C.div(C.mul(c2, C.add(C.scale(mm, R.of(2)), C.mul(c2, mu2))), det(c2)), C.scale(mm, R.div(R.of(1), NaR)));
  const lnPair = C.log1p(w2);
  // ln(⟨b²⟩/⟨b⟩²) = −iX − K + N_α(c₂ − 2c₁) + quad(c₂) − 2 quad(c₁) − (3/2)(ln det(c₂) − 2 ln det(c₁))
  //                + ln[(1 + c₂(m − n))²/det(c₂) + m/N_α] − 2 ln(1 + c₁(m − n))
  // the −iX of e^{−iX} taken in (−π, π], so that D keeps its small parts near X = 2π
  let d = C.add(C.c(R.of(-k.dephasing), R.of(-Math.atan2(Math.sin(k.x), Math.cos(k.x)))), C.scale(cq, NaR));
  d = C.add(d, C.sub(q2, C.scale(q1, R.of(2))));
  d = C.sub(d, C.scale(C.sub(ld2, C.scale(ld1, R.of(2))), R.of(1.5)));
  d = C.add(d, lnPair);
  d = C.sub(d, C.scale(C.log1p(C.mul(c1, mMinusN)), R.of(2)));
  // ln(|⟨b²⟩|/⟨n⟩) = ln(N_α/N) − 2K + Re[c₂N_α + quad(c₂) − (3/2) ln det(c₂) + ln((1 + c₂(m − n))²/det(c₂) + m/N_α)]
  const logB2 = C.add(C.add(C.scale(c2, NaR), q2), C.sub(lnPair, C.scale(ld2, R.of(1.5))));
  const ell2 = R.add(R.sub(R.log1p(R.div(R.of(-n), R.of(N))), R.of(2 * k.dephasing)), logB2.re);
  const mag = (z: Cx<T>) => Math.hypot(R.num(z.re), R.num(z.im));
  // Im c₁ N_α (of size N_α X) enters only the phase of ⟨b⟩, not ℓ or D
  const terms = Na * (Math.abs(R.num(c1.re)) + mag(cq)) + mag(q1) + mag(q2) + mag(ld1) + mag(ld2) + 1;
  return { ell, d, ell2, phase: e1Log.im, size: terms };
}

/**
 * (V_min − ½)/⟨n⟩ = −expm1(ℓ) − e^ℓ |expm1(D)|, or 1 − |⟨b²⟩|/⟨n⟩ without displacement. When the mean
 * field has dephased (ℓ < −300) the product is taken as |e^{ℓ+D} − e^ℓ| so that neither factor overflows.
 */
function excess<T>(R: Real<T>, raw: Raw<T>, displaced: boolean): T {
  const C = complexOps(R);
  if (!displaced) return R.sub(R.of(1), R.exp(raw.d.re));
  const pair =
    R.num(raw.ell) > -300
      ? R.mul(R.exp(raw.ell), C.abs(C.expm1(raw.d)))
      : C.abs(C.sub(C.exp(C.add(raw.d, C.c(raw.ell))), C.c(R.exp(raw.ell))));
  return R.sub(R.sub(R.of(0), R.expm1(raw.ell)), pair);
}

/**
 * The mode's state at accumulated integrals `k` for a start of N quanta on
 * average (N > 0) in the Gaussian state `start`. The coherent closed system
 * is delegated to kerrState (same numbers, bit for bit).
 */
export function openKerrState(N: number, start: GaussianStart, k: KerrIntegrals): OpenKerrState {
  const closed = k.loss === 0 && k.dephasing === 0 && k.lossPhase1[0] === 0 && k.lossPhase1[1] === 0 && k.lossPhase2[0] === 0 && k.lossPhase2[1] === 0;
  if (closed && isCoherent(start)) return { ...kerrState(N, Math.abs(k.x), k.theta), meanNumber: N, digits: 16 };
  if (!(N > 0) || !Number.isFinite(N)) throw new RangeError(`N must be positive and finite, got ${N}`);
  const { n } = fluctuationMoments(start);
  const Na = Math.max(0, N - n);
  const nt = N * Math.exp(-k.loss);
  const raw = moments(DOUBLE, N, start, k);
  if (closed) return assemble(N, nt, Na, raw, closedVariance(N, start, k.x, raw), 16, k);
  let v = 0.5 + nt * excess(DOUBLE, raw, Na > 0);
  let digits = 16;
  // error of the double evaluation: the logs ℓ and D carry absolute errors ~ ε × (size of their terms),
  // which reach V through q = |⟨b⟩|²/⟨n⟩ and p = |⟨b²⟩|/⟨n⟩ (a dephased mean field cannot cancel anything)
  const weight = Math.min(1e300, Na > 0 ? Math.exp(raw.ell) + Math.exp(raw.ell + raw.d.re) : Math.exp(raw.d.re));
  const err = (d: number) => Math.pow(10, -d) * nt * 4 * (1 + weight * (1 + raw.size));
  // arbitrary precision when double precision cannot resolve V to 1e-11; repeat while the estimate grows
  for (let i = 0; i < 6 && !(err(digits) <= 1e-11 * Math.abs(v)); i++) {
    const floor = 1 / (2 + 8 * nt); // V ≥ 1/(4 λ_max) ≥ 1/(2 + 8⟨n⟩) for any state
    const guess = Math.ceil(14 + Math.log10(err(0) / Math.max(floor, Math.min(Math.abs(v), 1e300))));
    // a non-finite estimate (|⟨b²⟩|/⟨n⟩ overflowing in doubles) falls back to the bound 3 log₁₀⟨n⟩ + 30, capped
    const need = Math.min(2000, Number.isFinite(guess) ? guess : Math.ceil(30 + 3 * Math.log10(1 + nt + n)));
    if (need <= digits) digits = Math.min(2000, digits + 20);
    else digits = need;
    const R = decimalReal(digits);
    v = R.num(R.add(R.of(0.5), R.mul(R.of(nt), excess(R, moments(R, N, start, k), Na > 0))));
  }
  return assemble(N, nt, Na, raw, v, digits, k);
}

/**
 * V_min of the closed system in double precision, by the one of three forms
 * that has no cancellation where it is used: the near-Gaussian series of the
 * covariance determinant while the Kerr phase is small (near-gaussian.ts),
 * the direct form from |⟨b²⟩| once the mean field has dephased, and
 * ½ + ⟨n⟩(−expm1(ℓ) − e^ℓ|expm1(D)|) in between.
 */
function closedVariance(N: number, start: GaussianStart, x: number, raw: Raw<number>): number {
  const { n, m } = fluctuationMoments(start);
  const Na = Math.max(0, N - n);
  if (!(Na > 0)) return 0.5 + N * excess(DOUBLE, raw, false);
  const C = complexOps(DOUBLE);
  // X reduced to (−π, π] with full relative precision near multiples of 2π
  const det = nearGaussianDeterminant(Na, n, m, Math.atan2(Math.sin(x), Math.cos(x)));
  if (det !== undefined) {
    // V_min = det / (½ + n̄ + |m̄|): the larger variance has no cancellation
    return det / (0.5 + N * (-Math.expm1(raw.ell) + Math.exp(raw.ell) * C.abs(C.expm1(raw.d))));
  }
  if (raw.ell < DEPHASED) {
    // (V_min − ½)/⟨n⟩ = (1 − p) − q + q(2p cos ψ − q)/(p + |p e^{iψ} − q|), q = e^ℓ, p = e^{ℓ₂}, ψ = Im D
    const q = Math.exp(raw.ell);
    const p = Math.exp(raw.ell2);
    const far = Math.hypot(p * Math.cos(raw.d.im) - q, p * Math.sin(raw.d.im));
    const rest = p + far > 0 ? (q * (2 * p * Math.cos(raw.d.im) - q)) / (p + far) : 0;
    return 0.5 + N * (-Math.expm1(raw.ell2) - q + rest);
  }
  return 0.5 + N * excess(DOUBLE, raw, true);
}

/** ln q below which the mean field no longer enters V_min at double precision (q < 1e-20). */
const DEPHASED = -46;

/** ln(|⟨b⟩|²/⟨n⟩) alone, in double precision (it has no cancellation): −Infinity without displacement. */
export function logMeanFieldFraction(N: number, start: GaussianStart, k: KerrIntegrals): number {
  const Na = Math.max(0, N - fluctuationMoments(start).n);
  return Na > 0 ? moments(DOUBLE, N, start, k).ell : -Infinity;
}

function assemble(N: number, nt: number, Na: number, raw: Raw<number>, v: number, digits: number, k: KerrIntegrals): OpenKerrState {
  const S = 2 * v;
  const displaced = Na > 0;
  const ell = displaced ? raw.ell : -Infinity;
  const q = Math.exp(ell);
  // the squeezed quadrature's angle from ⟨b⟩: half the phase of −(⟨b²⟩ − ⟨b⟩²)/⟨b⟩² = −(e^D − 1)
  // (its direction only: past e^{700} the phase of e^D alone)
  const em = !displaced ? { re: 1, im: 0 } : raw.d.re < 700 ? complexOps(DOUBLE).expm1(raw.d) : { re: Math.cos(raw.d.im), im: Math.sin(raw.d.im) };
  let angle = (Math.atan2(em.im, em.re) - Math.PI) / 2;
  if (angle <= -Math.PI / 2) angle += Math.PI;
  if (angle > Math.PI / 2) angle -= Math.PI;
  const amp = Math.sqrt((q * nt) / N);
  const phase = displaced ? -k.theta + (raw.phase % (2 * Math.PI)) : 0;
  const d = raw.d;
  const amp2 = ((displaced ? q : 1) * nt * Math.exp(d.re)) / N;
  const phase2 = displaced ? 2 * phase + (d.im % (2 * Math.PI)) : -2 * k.theta + (raw.phase % (2 * Math.PI));
  return {
    meanFieldFraction: q,
    logMeanFieldFraction: ell,
    minVariance: v,
    relativeVariance: S,
    squeezingDb: 10 * Math.log10(S),
    squeezingParameter: -0.5 * Math.log(S),
    squeezingAngle: angle,
    meanField: [amp * Math.cos(phase), amp * Math.sin(phase)],
    secondMoment: [amp2 * Math.cos(phase2), amp2 * Math.sin(phase2)],
    pairCorrelation: Math.max(0, 0.5 + nt * (1 - q) - v) / N,
    meanNumber: nt,
    digits,
  };
}
