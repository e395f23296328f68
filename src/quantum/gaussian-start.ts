/**
 * The mode's initial state: a displaced Gaussian state of N quanta on
 * average. Coherent (the default), squeezed (parameter r ≥ 0 at angle θ),
 * thermal (n_th ≥ 0 thermal quanta) and their combination, a displaced
 * squeezed thermal state D(α) S(ζ) ρ_th S(ζ)† D(α)†, ζ = r e^{iθ}.
 *
 * The fluctuation δb = b − α has the normally ordered moments
 *   n = ⟨δb†δb⟩ = (n_th + ½) cosh 2r − ½,   m = ⟨δb δb⟩ = −(n_th + ½) e^{iθ} sinh 2r,
 * and α = √(N − n) is taken real, so θ is measured from the direction of the
 * mean field: θ = 0 squeezes the amplitude (number), θ = π the phase. The
 * number spread of the state is
 *   ΔN² = |α|²(1 + 2n) + 2 Re(α*² m) + n(n + 1) + |m|²
 * (the second moment of b†b for a Gaussian state, by Wick's theorem).
 */

/** The Gaussian part of the start, on top of the displacement. */
export interface GaussianStart {
  /** Squeeze parameter r ≥ 0 (0: no squeezing). */
  readonly squeeze: number;
  /** Squeeze angle θ [rad] from the direction of the mean field (0: amplitude squeezed). */
  readonly squeezeAngle: number;
  /** Mean thermal quanta n_th ≥ 0 before squeezing (0: pure state). */
  readonly thermal: number;
}

/** The coherent start (today's default). */
export const COHERENT: GaussianStart = { squeeze: 0, squeezeAngle: 0, thermal: 0 };

/** True for the coherent start (no squeezing and no thermal quanta). */
export function isCoherent(s: GaussianStart): boolean {
  return s.squeeze === 0 && s.thermal === 0;
}

/** The fluctuation's moments n = ⟨δb†δb⟩ and m = ⟨δb δb⟩ (complex, [re, im]). */
export function fluctuationMoments(s: GaussianStart): { n: number; m: [number, number] } {
  const h = s.thermal + 0.5;
  // (n_th + ½) cosh 2r − ½ = n_th cosh 2r + sinh² r, without cancellation at small r
  const sh = Math.sinh(s.squeeze);
  const n = s.thermal * Math.cosh(2 * s.squeeze) + sh * sh;
  const mAbs = h * Math.sinh(2 * s.squeeze);
  return { n, m: [-mAbs * Math.cos(s.squeezeAngle), -mAbs * Math.sin(s.squeezeAngle)] };
}

/**
 * Check a start against the mode's N; throws RangeError naming the bad
 * parameter (`squeeze`, `squeeze-angle` or `thermal`) and what would be valid.
 */
export function validateStart(N: number, s: GaussianStart): void {
  if (!(Number.isFinite(s.squeeze) && s.squeeze >= 0)) throw new RangeError(`squeeze: must be a finite number ≥ 0, got ${s.squeeze}`);
  if (!Number.isFinite(s.squeezeAngle)) throw new RangeError(`squeeze-angle: must be a finite angle in radians, got ${s.squeezeAngle}`);
  if (!(Number.isFinite(s.thermal) && s.thermal >= 0)) throw new RangeError(`thermal: must be a finite number of quanta ≥ 0, got ${s.thermal}`);
  const { n } = fluctuationMoments(s);
  if (!(n <= N)) {
    throw new RangeError(
      `thermal: the state's fluctuation holds ${n.toPrecision(4)} quanta (thermal ${s.thermal}, squeeze ${s.squeeze}), more than the mode's N = ${N.toPrecision(4)}: ` +
        `give at most N quanta in thermal and squeezing (n_th cosh 2r + sinh² r ≤ N)`,
    );
  }
}

/** |α|² = N − n, the quanta in the displacement (≥ 0 for a valid start). */
export function displacedQuanta(N: number, s: GaussianStart): number {
  return isCoherent(s) ? N : Math.max(0, N - fluctuationMoments(s).n);
}

/** ΔN, the number spread of the start (√N for a coherent start). */
export function numberSpread(N: number, s: GaussianStart): number {
  if (isCoherent(s)) return Math.sqrt(N);
  const { n, m } = fluctuationMoments(s);
  const a2 = Math.max(0, N - n);
  return Math.sqrt(Math.max(0, a2 * (1 + 2 * n) + 2 * a2 * m[0] + n * (n + 1) + m[0] * m[0] + m[1] * m[1]));
}

/** A short description, e.g. "coherent" or "squeezed r = 0.3 at 0 rad, thermal 2". */
export function describeStart(s: GaussianStart): string {
  if (isCoherent(s)) return "coherent";
  const parts: string[] = [];
  if (s.squeeze > 0) parts.push(`squeezed r = ${s.squeeze} at ${s.squeezeAngle} rad`);
  if (s.thermal > 0) parts.push(`thermal ${s.thermal} quanta`);
  return parts.join(", ");
}
