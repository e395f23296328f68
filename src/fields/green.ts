/**
 * Free-space Green's functions of ∇²G = δ in 1, 2 and 3 dimensions and the
 * self-cell weight that makes the lattice sum Σ G(xᵢ − xⱼ) ρⱼ ΔV a
 * high-order quadrature of the convolution ∫ G(x − y) ρ(y) dy.
 *
 * The weight comes from the punctured-trapezoidal-rule correction for a
 * singular kernel (Navot 1961; Marin, Runborg & Tornberg 2014): with the
 * singular point removed from the sum, the missing part is
 *   ΔV · w · ρ(x),   w = lim_{r→0} [G(r) − G_per(r)],
 * where G_per is the zero-mean periodic Green's function of the lattice of
 * cell centres. In 1D w = h/12 (from ζ(−1) = −1/12); in 2D and 3D w is
 * evaluated by Ewald summation for any rectangular cell.
 */
import { erfc, expint1, EULER_GAMMA } from "../math/special.js";

/** G(r) = −1/(4πr) in 3D, ln(r)/(2π) in 2D, |x|/2 in 1D. */
export function freeGreen(dims: number, r: number): number {
  if (dims === 3) return -1 / (4 * Math.PI * r);
  if (dims === 2) return Math.log(r) / (2 * Math.PI);
  return 0.5 * r;
}

/**
 * Self-cell weight w for cells of the given spacings (1, 2 or 3 of them).
 * For cubic 3D cells of side h, w = Z/(4π h) with Z = −2.8372974794806…,
 * the regularised lattice sum Σ′ 1/|n| of the simple cubic lattice.
 */
export function selfCellWeight(spacings: readonly number[]): number {
  const d = spacings.length;
  if (d === 1) return (spacings[0] as number) / 12;
  const volume = spacings.reduce((p, h) => p * h, 1);
  const alpha = Math.sqrt(Math.PI) / Math.pow(volume, 1 / d);
  // Lattice ranges: real-space terms decay as erfc(αr) / E₁(α²r²), reciprocal ones as e^{−k²/4α²}.
  const nMax = spacings.map((h) => Math.ceil(6.5 / (alpha * h)) + 1);
  const mMax = spacings.map((h) => Math.ceil((6.5 * alpha * h) / Math.PI) + 1);
  let real = 0;
  forEachLatticePoint(nMax, (idx) => {
    let r2 = 0;
    for (let i = 0; i < d; i++) r2 += ((idx[i] as number) * (spacings[i] as number)) ** 2;
    if (r2 === 0) return;
    const r = Math.sqrt(r2);
    real += d === 3 ? erfc(alpha * r) / (4 * Math.PI * r) : expint1(alpha * alpha * r2) / (4 * Math.PI);
  });
  let recip = 0;
  forEachLatticePoint(mMax, (idx) => {
    let k2 = 0;
    for (let i = 0; i < d; i++) k2 += ((2 * Math.PI * (idx[i] as number)) / (spacings[i] as number)) ** 2;
    if (k2 === 0) return;
    recip += Math.exp(-k2 / (4 * alpha * alpha)) / k2;
  });
  recip /= volume;
  const background = 1 / (4 * alpha * alpha * volume);
  const selfTerm = d === 3 ? alpha / (2 * Math.pow(Math.PI, 1.5)) : (EULER_GAMMA + 2 * Math.log(alpha)) / (4 * Math.PI);
  // G_per(r) − G(r) → c as r → 0, and w = −c.
  const c = -recip - real + background + selfTerm;
  return -c;
}

function forEachLatticePoint(max: readonly number[], visit: (idx: number[]) => void): void {
  const d = max.length;
  const idx = max.map((m) => -m);
  for (;;) {
    visit(idx);
    let axis = 0;
    while (axis < d) {
      idx[axis] = (idx[axis] as number) + 1;
      if ((idx[axis] as number) <= (max[axis] as number)) break;
      idx[axis] = -(max[axis] as number);
      axis++;
    }
    if (axis === d) return;
  }
}
