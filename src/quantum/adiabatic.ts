/**
 * The adiabatic phase-diffusion coefficient χ_ad = (1/ħ) dμ/dN of a
 * self-gravitating condensate (Lewenstein & You 1996, PRL 77, 3489; Castin &
 * Dalibard 1997, PRA 55, 4330): a spread ΔN in the number of quanta spreads
 * the phase at the rate ΔN dμ/dN/ħ, with μ the chemical potential of the
 * stationary state of N quanta, which relaxes as N changes. The frozen-mode χ
 * keeps the mode function fixed instead.
 *
 * Stationary states. Schrödinger–Poisson without a box or expansion has the
 * scaling symmetry ψ(x) → λ² ψ(λx) (N → λN, energies per particle → λ² ×), so
 * a stationary state has μ ∝ N² and N dμ/dN = 2μ, with μ = (K + 2W)/N. In
 * code units (ħ/m = 1) μ/ħ = ω + Nχ, ω = K/M, χ = 2Wm/M², hence
 *   χ_ad = 2μ/(ħN) = 2ω/N + 2χ,
 * and with the virial theorem (2K + W = 0) χ_ad = (3/2)χ exactly.
 *
 * With a contact term (U = (g/2)∫ρ², χ_SI = 2Um/M², ħχ_SI = g∫|φ|⁴) the scaling ψ_λ(x) = λ²ψ(λx)
 * (N → λN) takes K, W → λ³K, λ³W but U → λ⁵U, so the ground-state energy obeys E(λN, g) = λ³E(N, λ²g). With ∂E/∂g = U/g (Hellmann–Feynman) this gives Nμ = 3E + 2U (the same as
 * μN = K + 2W + 2U through the virial theorem 2K + W + 3U = 0) and, differentiating μ(λN, g) = λ²μ(N, λ²g),
 *   N dμ/dN = 2μ + 2 dU/dN,
 * exact, but dU/dN needs how the profile changes with N. psibox takes it from the one-parameter family of
 * dilations of the state's own profile, E(R) = K(R) + W(R) + U(R) with K ∝ N/R², W ∝ N²/R, U ∝ N²/R³,
 * stationary in R (the virial theorem): dU/dN = (U/N)[2 − 6(K + W + 3U)/(6K + 2W + 12U)], hence
 *   χ_ad = 2ω/N + 2χ + χ_SI [2 − 6(K + W + 3U)/(6K + 2W + 12U)]   (χ = χ_grav + χ_SI).
 * It is exact for gravity alone (the bracket's factor χ_SI = 0), exact to first order in g about the
 * self-gravity soliton (the bracket is 5 there: ∫ρ² ∝ N⁵ on that branch), and exact in the Thomas–Fermi
 * limit (K → 0, W = −3U: the bracket is 2, μ ∝ N at a fixed radius); between them it is the dilation
 * estimate (test/quantum/adiabatic-contact.test.ts measures it against shot ground states). It diverges
 * where 6K + 2W + 12U → 0, the attractive soliton's largest stable mass, as dμ/dN does.
 *
 * Any field (measured). A twin field ψ₂(0) = (1 + e/2) ψ₁(0) holds (1 + e)N
 * quanta to first order (ΔN = ((1 + e/2)² − 1) N exactly); both evolve with
 * the same equations, and the phase of their overlap advances at
 * −(μ₂ − μ₁)/ħ ≈ −ΔN χ_ad, so
 *   χ_ad ≈ −(d/dt) arg ∫ conj(ψ₁) ψ₂ dV / ΔN ≈ −(d/dt) arg ∫ conj(ψ₁) ψ₂ dV / (e N).
 * A one-sided difference: where μ ∝ N² it gives dμ/dN at N + ΔN/2, a bias of
 * ΔN/(2N) ≈ e/2, so e is kept small (1e-3 by default in runs).
 */
import type { ModeCoefficients } from "./mode.js";

/**
 * χ_ad from the coefficients of a stationary state (code units, 1/code time), with χ the whole frozen-mode
 * coefficient and χ_SI its contact part (0 without a contact term; see "With a contact term" above):
 *   χ_ad = 2ω/N + 2χ + χ_SI [2 − 6(K + W + 3U)/(6K + 2W + 12U)],
 * K : W : U = ω/N : χ_grav/2 : χ_SI/2. Without self-gravity (χ_grav = 0) a field is held by its box,
 * whose shape does not follow N: μ = g n of a uniform field gives χ_ad = χ_SI, and without a contact term
 * either the equation is linear, μ does not depend on N and χ_ad = 0.
 */
export function stationaryAdiabaticChi(c: Pick<ModeCoefficients, "omega" | "chi" | "particles"> & { readonly chiContact?: number }): number {
  const chiContact = c.chiContact ?? 0;
  const chiGravity = c.chi - chiContact;
  if (chiGravity === 0) return chiContact;
  const base = (2 * c.omega) / c.particles + 2 * c.chi;
  if (chiContact === 0) return base;
  const [k, w, u] = [c.omega / c.particles, chiGravity / 2, chiContact / 2];
  return base + chiContact * (2 - (6 * (k + w + 3 * u)) / (6 * k + 2 * w + 12 * u));
}

/**
 * χ_ad on the self-gravity soliton branch to first order in g, from the frozen-mode coefficients of the
 * soliton of gravity alone (what psibox estimate has): (3/2)χ_grav + 10 χ_SI. First-order perturbation
 * theory gives the energy E(N) = E_grav(N) + U(N) with U evaluated on the unperturbed soliton, where
 * ∫ρ² ∝ N⁵ (radius ∝ 1/N), so ħ d²U/dN² = 20U/N² = 10 ħχ_SI (ħχ_SI = 2U/N²), and d²E_grav/dN² = (3/2)ħχ_grav.
 * Its error is of order g² (test/quantum/adiabatic-contact.test.ts against shot ground states).
 */
export function solitonBranchAdiabaticChi(chiGravity: number, chiContact: number): number {
  return 1.5 * chiGravity + 10 * chiContact;
}

/** Samples the twin tracker keeps for its fit (thinned by halves beyond this, so checkpoints stay small). */
const MAX_SAMPLES = 512;

/**
 * Follows the overlap phase continuously (unwrapped), gives the adiabatic phase integral
 * ∫χ_ad dt = −(arg − arg₀)/ΔN as it goes, and fits χ_ad by least squares over the samples.
 * ΔN = ((1 + e/2)² − 1) N is the twin's extra quanta.
 */
export class TwinPhaseTracker {
  readonly deltaN: number;
  private t: number[] = [];
  private phase: number[] = [];
  /** Every stride-th sample is kept for the fit. */
  private stride = 1;
  private count = 0;
  private first: number | undefined;
  private last: number | undefined;
  /**
   * @param e the twin's relative extra amplitude (ψ₂ = (1 + e/2) ψ₁ at the start)
   * @param particles N of the first field
   */
  constructor(
    readonly e: number,
    readonly particles: number,
  ) {
    this.deltaN = (e + (e * e) / 4) * particles;
  }

  /**
   * Add a sample; consecutive samples must differ in phase by less than π. Returns the increment of
   * ∫χ_ad dt since the previous sample, −Δarg/ΔN (0 for the first).
   */
  add(t: number, phase: number): number {
    const last = this.last;
    const p = last === undefined ? phase : last + Math.atan2(Math.sin(phase - last), Math.cos(phase - last));
    this.first ??= p;
    this.last = p;
    if (this.count++ % this.stride === 0) {
      this.t.push(t);
      this.phase.push(p);
      if (this.t.length >= MAX_SAMPLES) {
        this.t = this.t.filter((_, i) => i % 2 === 0);
        this.phase = this.phase.filter((_, i) => i % 2 === 0);
        this.stride *= 2;
      }
    }
    return last === undefined ? 0 : -(p - last) / this.deltaN;
  }

  /** ∫χ_ad dt since the first sample, −(arg − arg₀)/ΔN. */
  get integral(): number {
    return this.first === undefined ? 0 : -((this.last as number) - this.first) / this.deltaN;
  }

  /** The samples kept for the fit (times and unwrapped phases). */
  get samples(): { readonly t: readonly number[]; readonly phase: readonly number[] } {
    return { t: this.t, phase: this.phase };
  }

  /**
   * χ_ad = −b/ΔN from a least-squares fit of the phase by a + b t + c sin Ωt + d cos Ωt, with Ω
   * chosen to minimise the residual (undefined with fewer than 8 samples). The twin starts with the
   * frozen-mode rate (its mode function has not relaxed) and oscillates about the adiabatic one at
   * the breathing frequency Ω, so the line alone would be biased unless the run spans many periods;
   * the fit needs the run to span about one period or more.
   */
  chi(): number | undefined {
    const n = this.t.length;
    if (n < 8) return undefined;
    const T = (this.t.at(-1) as number) - (this.t[0] as number);
    let best = { res: Infinity, b: 0 };
    for (let j = 0; j <= 240; j++) {
      const omega = ((2 * Math.PI) / T) * Math.pow(40, j / 240) * 0.5; // periods from 2T down to T/20
      const fit = leastSquares(this.t, this.phase, (t) => [1, t, Math.sin(omega * t), Math.cos(omega * t)]);
      if (fit && fit.residual < best.res) best = { res: fit.residual, b: fit.coef[1] as number };
    }
    return -best.b / this.deltaN;
  }

  /** Plain state for a checkpoint (exact: JSON round-trips doubles). */
  save(): TwinState {
    return { t: [...this.t], phase: [...this.phase], stride: this.stride, count: this.count, first: this.first ?? null, last: this.last ?? null };
  }

  restore(s: TwinState): void {
    this.t = [...s.t];
    this.phase = [...s.phase];
    this.stride = s.stride;
    this.count = s.count;
    this.first = s.first ?? undefined;
    this.last = s.last ?? undefined;
  }
}

/** What a twin tracker keeps in a checkpoint. */
export interface TwinState {
  t: number[];
  phase: number[];
  stride: number;
  count: number;
  first: number | null;
  last: number | null;
}

/** Least squares y ≈ Σ c_k f_k(t) by the normal equations (4 unknowns), with the residual sum of squares. */
function leastSquares(ts: readonly number[], ys: readonly number[], basis: (t: number) => number[]): { coef: number[]; residual: number } | undefined {
  const t0 = ts[0] as number;
  const k = basis(0).length;
  const A = Array.from({ length: k }, () => new Array<number>(k + 1).fill(0));
  for (let i = 0; i < ts.length; i++) {
    const f = basis((ts[i] as number) - t0);
    for (let r = 0; r < k; r++) {
      for (let c = 0; c < k; c++) (A[r] as number[])[c] = ((A[r] as number[])[c] as number) + (f[r] as number) * (f[c] as number);
      (A[r] as number[])[k] = ((A[r] as number[])[k] as number) + (f[r] as number) * (ys[i] as number);
    }
  }
  // Gaussian elimination with partial pivoting
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs((A[r] as number[])[c] as number) > Math.abs((A[p] as number[])[c] as number)) p = r;
    [A[c], A[p]] = [A[p] as number[], A[c] as number[]];
    const pivot = (A[c] as number[])[c] as number;
    if (!(Math.abs(pivot) > 1e-300)) return undefined;
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const f = ((A[r] as number[])[c] as number) / pivot;
      for (let q = c; q <= k; q++) (A[r] as number[])[q] = ((A[r] as number[])[q] as number) - f * ((A[c] as number[])[q] as number);
    }
  }
  const coef = A.map((row, r) => (row[k] as number) / (row[r] as number));
  let residual = 0;
  for (let i = 0; i < ts.length; i++) {
    const f = basis((ts[i] as number) - t0);
    const y = f.reduce((sum, v, q) => sum + v * (coef[q] as number), 0);
    residual += (y - (ys[i] as number)) ** 2;
  }
  return { coef, residual };
}
