/**
 * The quadrature covariance determinant of a Gaussian start under the closed
 * Kerr evolution while the Kerr phase is small, as a series without
 * cancellation.
 *
 * For a displaced Gaussian start (N_α quanta in the displacement, fluctuation
 * moments n = ⟨δb†δb⟩, m = a + ib = ⟨δb δb⟩), det = (½ + n̄)² − |m̄|² is
 * ¼ + n + n² − |m|² at the start and stays so under any quadratic evolution;
 * the Kerr evolution is quadratic to leading order in X, and the exact closed
 * forms of ⟨b⟩ and ⟨b²⟩ make n̄² and |m̄|² agree to N⁴X⁴ and N²X². Expanded in
 * h = 1/N_α at fixed y = N_α X (so that N_α X² = y²h), the terms that grow
 * with N_α cancel identically and what is left is
 *   det = ¼ + d₀ + h d₁(y) + h² d₂(y) + O(h³ y¹⁰),
 * with d₀ = n + n² − |m|² and d₁, d₂ polynomials in y (of degree 6 and 8)
 * whose coefficients are polynomials in n, a, b: for the coherent start
 * d₁ = 2y⁶ + (9/2)y⁴ (the leading terms of the exact coherent form).
 * The coefficients were derived by series algebra on the closed forms of
 * open-kerr.ts (scripts/derive-near-gaussian.py, with sympy) and are checked
 * in the tests against 330-digit evaluations of the published Gaussian-integral
 * form. The truncation error relative to det is at most about
 * (g N_α X²)² + (g²/N_α)³ with g = 1 + 2n + 2|m|, so the series is used only
 * while g N_α X² ≤ 1e-5 and g²/N_α ≤ 1e-5, where the direct forms would lose
 * up to 1/(N_α X²) of the sixteen digits; outside it they lose at most five.
 */

/** [power of h, power of y, coefficient] for the state's n, a = Re m, b = Im m. */
function coefficients(n: number, a: number, b: number): readonly (readonly [number, number, number])[] {
  const pow = Math.pow;
  return [
  // h^0
  [0, 0, -pow(a, 2) - pow(b, 2) + n*(n + 1)],
  // h^1
  [1, 2, a*(a*(28*a + 16) + 28*pow(b, 2)) + 16*pow(b, 2) + n*(a*(32*a + 8) + 32*pow(b, 2) + n*(8*a + 4*n + 6) + 2)],
  [1, 3, a*(-4*a*b - 36*b) + b*(-4*pow(b, 2) - 18) + n*(-72*a*b - 68*b*n - 68*b)],
  [1, 4, a*(a*(12*a + 30) + 48*pow(b, 2) + 21) + 24*pow(b, 2) + n*(a*(60*a + 84) + 48*pow(b, 2) + n*(84*a + 36*n + 54) + 27) + 9/2],
  [1, 5, a*(-48*a*b - 48*b) - 12*b + n*(-96*a*b - 48*b*n - 48*b)],
  [1, 6, a*(a*(16*a + 24) + 12) + n*(a*(48*a + 48) + n*(48*a + 16*n + 24) + 12) + 2],
  // h^2
  [2, 2, pow(a, 2)*(12*pow(a, 2) + 24*pow(b, 2)) + 12*pow(b, 4) + n*(12*pow(a, 2) + 12*pow(b, 2) + n*(12*pow(a, 2) + 12*pow(b, 2)))],
  [2, 3, -30*pow(a, 2)*b - 30*pow(b, 3) + n*(-60*pow(a, 2)*b + b*(-60*pow(b, 2) - 18) + n*(-36*b*n - 54*b))],
  [2, 4, a*(a*(a*(-244*a - 184) - 168*pow(b, 2) - 4) - 184*pow(b, 2) + 12) + pow(b, 2)*(76*pow(b, 2) - 44) + n*(a*(a*(-368*a - 112) - 368*pow(b, 2) + 48) - 128*pow(b, 2) + n*(a*(72 - 112*a) - 128*pow(b, 2) + n*(48*a + 36*n + 72) + 48) + 12)],
  [2, 5, a*(a*(-160*a*b + 152*b) + b*(252 - 160*pow(b, 2))) + b*(62 - 56*pow(b, 2)) + n*(a*(304*a*b + 800*b) + b*(292 - 112*pow(b, 2)) + n*(800*a*b + 336*b*n + 504*b))],
  [2, 6, a*(a*(a*(-4/3*a - 224/3) - 288*pow(b, 2) - 114) - 240*pow(b, 2) - 176/3) + pow(b, 2)*(-36*pow(b, 2) - 42) + n*(a*(a*(-448/3*a - 392) - 480*pow(b, 2) - 288) - 192*pow(b, 2) + n*(a*(-392*a - 512) - 192*pow(b, 2) + n*(-1024/3*a - 292/3*n - 584/3) - 162) - 194/3) - 31/3],
  [2, 7, a*(a*(256*a*b + 384*b) + 192*b) + 32*b + n*(a*(768*a*b + 768*b) + 192*b + n*(768*a*b + 256*b*n + 384*b))],
  [2, 8, a*(a*(a*(-64*a - 128) - 96) - 32) + n*(a*(a*(-256*a - 384) - 192) + n*(a*(-384*a - 384) + n*(-256*a - 64*n - 128) - 96) - 32) - 4],
  ];
}

/** Where the series is used: g N_α X² and g²/N_α at most this (see above). */
export const NEAR_GAUSSIAN_LIMIT = 1e-5;

/**
 * det of the quadrature covariance at Kerr phase x (reduced to (−π, π]) for a
 * start with Na > 0 quanta in the displacement and fluctuation moments n, m;
 * undefined outside the series' range.
 */
export function nearGaussianDeterminant(Na: number, n: number, m: readonly [number, number], x: number): number | undefined {
  const g = 1 + 2 * n + 2 * Math.hypot(m[0], m[1]);
  const h = 1 / Na;
  if (!(g * Na * x * x <= NEAR_GAUSSIAN_LIMIT && g * g * h <= NEAR_GAUSSIAN_LIMIT)) return undefined;
  const y = Na * x;
  const lnH = Math.log(h);
  const lnY = Math.log(Math.abs(y));
  let det = 0.25;
  for (const [k, j, c] of coefficients(n, m[0], m[1])) {
    if (c === 0 || (j > 0 && y === 0)) continue;
    // h^k y^j through logarithms: either factor alone may overflow or underflow (y up to 1e58, h down to 1e-120)
    const size = Math.exp(k * lnH + (j > 0 ? j * lnY : 0));
    det += c * (y < 0 && j % 2 === 1 ? -size : size);
  }
  return det;
}
