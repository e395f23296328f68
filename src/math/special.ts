/**
 * Special functions in double precision: erf, erfc and the exponential
 * integral E₁. Series and continued fractions from Abramowitz & Stegun
 * (7.1.6, 7.1.14; 5.1.11, 5.1.22) evaluated with the modified Lentz method.
 */

const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI);
/** Euler–Mascheroni constant γ. */
export const EULER_GAMMA = 0.5772156649015329;

/** erf(x) via the positive series A&S 7.1.6 (no cancellation) for |x| ≤ 3, else 1 − erfc. */
export function erf(x: number): number {
  const ax = Math.abs(x);
  if (ax > 3) return Math.sign(x) * (1 - erfcContinuedFraction(ax));
  let term = ax;
  let sum = ax;
  const x2 = ax * ax;
  for (let n = 1; n < 200; n++) {
    term *= (2 * x2) / (2 * n + 1);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return Math.sign(x) * TWO_OVER_SQRT_PI * Math.exp(-x2) * sum;
}

/** erfc(x) = 1 − erf(x), accurate in relative terms for large positive x. */
export function erfc(x: number): number {
  if (x > 3) return erfcContinuedFraction(x);
  return 1 - erf(x);
}

function erfcContinuedFraction(x: number): number {
  // erfc x = e^{−x²}/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + ...)))) (A&S 7.1.14)
  const tiny = 1e-300;
  let f = x;
  let C = x;
  let D = 0;
  for (let n = 1; n < 500; n++) {
    const an = n / 2;
    D = x + an * D;
    D = Math.abs(D) < tiny ? tiny : D;
    C = x + an / C;
    C = Math.abs(C) < tiny ? tiny : C;
    D = 1 / D;
    const delta = C * D;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(-x * x) / (Math.sqrt(Math.PI) * f);
}

/** Exponential integral E₁(x) = ∫₁^∞ e^{−xt}/t dt for x > 0. */
export function expint1(x: number): number {
  if (!(x > 0)) throw new RangeError(`E1 needs x > 0, got ${x}`);
  if (x <= 1) {
    // A&S 5.1.11: E₁(x) = −γ − ln x − Σ (−x)^n / (n n!)
    let sum = 0;
    let term = 1;
    for (let n = 1; n < 200; n++) {
      term *= -x / n;
      const add = term / n;
      sum += add;
      if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
    }
    return -EULER_GAMMA - Math.log(x) - sum;
  }
  // Continued fraction (A&S 5.1.22), modified Lentz.
  const tiny = 1e-300;
  let b = x + 1;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * i;
    b += 2;
    d = 1 / (an * d + b);
    c = b + an / c;
    const del = c * d;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return h * Math.exp(-x);
}

/**
 * ln Γ(x) for x > 0: the recurrence Γ(x) = Γ(x + n)/(x(x+1)…(x+n−1)) up to
 * x + n ≥ 15, then Stirling's series to the x⁻¹¹ term (Abramowitz & Stegun
 * 6.1.40; relative error below 1e-15 there).
 */
export function lnGamma(x: number): number {
  if (!(x > 0)) return NaN;
  let shift = 0;
  while (x < 15) {
    shift += Math.log(x);
    x += 1;
  }
  const z = 1 / (x * x);
  const series = (1 / x) * (1 / 12 + z * (-1 / 360 + z * (1 / 1260 + z * (-1 / 1680 + z * (1 / 1188 + z * (-691 / 360360))))));
  return (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + series - shift;
}
