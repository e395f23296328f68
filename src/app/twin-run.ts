/**
 * The twin nonlinear run that cross-checks the tangent-linear Lyapunov rate
 * (`breakdown.twin_offset = e`): a second field ψ₂ advanced by the full
 * nonlinear step with its own gravity, started at ψ₂ = ψ + e·u with u the
 * tangent's own start (‖u‖ = ‖ψ‖), so the separation δ = ψ₂ − ψ has the
 * relative size e. At every renormalisation of the tangent, the same
 * Benettin step (Benettin, Galgani, Giorgilli & Strelcyn 1980, Meccanica 15,
 * 9) on the difference: the neutral directions are removed,
 * δ⊥ = δ − ψ⟨ψ|δ⟩/⟨ψ|ψ⟩, the growth ln(‖δ⊥‖/‖δ₀‖) is added to the twin's
 * ∫λ dt (in the region's window w when there is one, as for the tangent),
 * and the twin is reset to ψ₂ = ψ + e‖ψ‖ δ⊥/‖δ⊥‖. While e·e^(λτ) stays
 * small the twin's rate is the tangent's up to O(e e^(λτ)) and the round-off
 * of the difference, 1e-16/e relative.
 */

/** The twin's running values (checkpointed with the plug-in's state). */
export interface TwinState {
  readonly offset: number;
  /** ‖w δ‖² right after the last reset (the whole norm without a region). */
  w0sq: number;
  lnSum: number;
  lastRate: number;
}

/** ψ + e·u, the twin's start. */
export function twinStart(psi: Float64Array, u: Float64Array, e: number): Float64Array {
  const out = new Float64Array(psi.length);
  for (let i = 0; i < out.length; i++) out[i] = psi[i]! + e * u[i]!;
  return out;
}

/** Σ w²|f|² over cells (w = 1 without a window), without the cell volume. */
function norm2(f: Float64Array, w: Float64Array | undefined): number {
  let sum = 0;
  for (let p = 0; p < f.length / 2; p++) {
    const a = f[2 * p]! * f[2 * p]! + f[2 * p + 1]! * f[2 * p + 1]!;
    sum += w ? w[p]! * w[p]! * a : a;
  }
  return sum;
}

/**
 * One renormalisation of the twin at the current ψ: returns its growth ln(‖wδ⊥‖/‖wδ₀‖) over the
 * interval and the reset twin ψ + e‖ψ‖δ⊥/‖δ⊥‖ (updating `state.w0sq`).
 */
export function renormaliseTwin(psi: Float64Array, twin: Float64Array, state: TwinState, cellVolume: number, w?: Float64Array): { growth: number; reset: Float64Array } {
  const delta = new Float64Array(psi.length);
  let cr = 0;
  let ci = 0;
  for (let i = 0; i < psi.length; i += 2) {
    const [dr, di] = [twin[i]! - psi[i]!, twin[i + 1]! - psi[i + 1]!];
    [delta[i], delta[i + 1]] = [dr, di];
    cr += psi[i]! * dr + psi[i + 1]! * di;
    ci += psi[i]! * di - psi[i + 1]! * dr;
  }
  const mass = norm2(psi, undefined);
  [cr, ci] = [cr / mass, ci / mass];
  for (let i = 0; i < psi.length; i += 2) {
    delta[i] = delta[i]! - (cr * psi[i]! - ci * psi[i + 1]!);
    delta[i + 1] = delta[i + 1]! - (cr * psi[i + 1]! + ci * psi[i]!);
  }
  const perp = norm2(delta, undefined);
  if (!(perp > 0) || !Number.isFinite(perp)) throw new Error(`the twin's separation is ${perp} after projection; it cannot be renormalised`);
  const growth = 0.5 * Math.log((norm2(delta, w) * cellVolume) / state.w0sq);
  const scale = state.offset * Math.sqrt(mass / perp);
  state.w0sq = scale * scale * norm2(delta, w) * cellVolume;
  return { growth, reset: twinStart(psi, delta, scale) };
}

/** The twin's first reference norm ‖w e u‖², from its start. */
export function twinStartNorm(psi: Float64Array, twin: Float64Array, cellVolume: number, w?: Float64Array): number {
  const delta = new Float64Array(psi.length);
  for (let i = 0; i < psi.length; i++) delta[i] = twin[i]! - psi[i]!;
  return norm2(delta, w) * cellVolume;
}
