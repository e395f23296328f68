/**
 * Linear growth factor of matter perturbations on scales far above the
 * quantum Jeans length:
 *   D'' + (2 + d ln H / d ln a) D' − (3/2) Ω_m(a) D = 0   (' = d/d ln a),
 * integrated with classical RK4 in ln a from a = 1e−6, started on the
 * Mészáros growing mode D = (2/3) a_eq + a (exact in matter + radiation;
 * D = a without radiation), and tabulated for cubic Hermite interpolation.
 */

/** What the growth integration needs from a background. */
export interface GrowthBackground {
  readonly params: { readonly omegaMatter: number; readonly omegaRadiation: number };
  readonly omegaLambda: number;
}

const LN_A_START = Math.log(1e-6);
const LN_A_END = Math.log(100);
const STEP = 1e-3;

/** D(a) and D'(a) = dD/d ln a on a uniform ln a grid. */
export class GrowthTable {
  private readonly d: Float64Array;
  private readonly dPrime: Float64Array;
  private readonly dSecond: Float64Array;

  constructor(bg: GrowthBackground) {
    const { omegaMatter: m, omegaRadiation: r } = bg.params;
    const lam = bg.omegaLambda;
    const n = Math.ceil((LN_A_END - LN_A_START) / STEP) + 1;
    this.d = new Float64Array(n);
    this.dPrime = new Float64Array(n);
    this.dSecond = new Float64Array(n);
    const rhs = (lnA: number, D: number, Dp: number): [number, number] => {
      const a = Math.exp(lnA);
      const ra = r / (a * a * a * a);
      const ma = m / (a * a * a);
      const e2 = ra + ma + lam;
      const dlnH = (-4 * ra - 3 * ma) / (2 * e2);
      return [Dp, -(2 + dlnH) * Dp + 1.5 * (ma / e2) * D];
    };
    const aStart = Math.exp(LN_A_START);
    const aEq = r / m;
    let D = (2 / 3) * aEq + aStart;
    let Dp = aStart;
    this.d[0] = D;
    this.dPrime[0] = Dp;
    this.dSecond[0] = rhs(LN_A_START, D, Dp)[1];
    for (let i = 1; i < n; i++) {
      const x = LN_A_START + (i - 1) * STEP;
      const [k1, l1] = rhs(x, D, Dp);
      const [k2, l2] = rhs(x + STEP / 2, D + (STEP / 2) * k1, Dp + (STEP / 2) * l1);
      const [k3, l3] = rhs(x + STEP / 2, D + (STEP / 2) * k2, Dp + (STEP / 2) * l2);
      const [k4, l4] = rhs(x + STEP, D + STEP * k3, Dp + STEP * l3);
      D += (STEP / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
      Dp += (STEP / 6) * (l1 + 2 * l2 + 2 * l3 + l4);
      this.d[i] = D;
      this.dPrime[i] = Dp;
      this.dSecond[i] = rhs(x + STEP, D, Dp)[1];
    }
  }

  private locate(a: number): { i: number; s: number } {
    const x = (Math.log(a) - LN_A_START) / STEP;
    if (!(x >= 0) || x > this.d.length - 1) {
      throw new RangeError(`growth factor asked at a = ${a}, outside [1e-6, 100]`);
    }
    const i = Math.min(Math.floor(x), this.d.length - 2);
    return { i, s: x - i };
  }

  /** D(a) by cubic Hermite interpolation with the tabulated slopes. */
  growth(a: number): number {
    const { i, s } = this.locate(a);
    return hermite(s, this.d[i]!, this.d[i + 1]!, this.dPrime[i]! * STEP, this.dPrime[i + 1]! * STEP);
  }

  /** f = d ln D / d ln a, with D' interpolated by cubic Hermite from D''. */
  growthRate(a: number): number {
    const { i, s } = this.locate(a);
    const dp = hermite(s, this.dPrime[i]!, this.dPrime[i + 1]!, this.dSecond[i]! * STEP, this.dSecond[i + 1]! * STEP);
    return dp / this.growth(a);
  }
}

function hermite(s: number, y0: number, y1: number, m0: number, m1: number): number {
  const s2 = s * s;
  const s3 = s2 * s;
  return (2 * s3 - 3 * s2 + 1) * y0 + (s3 - 2 * s2 + s) * m0 + (-2 * s3 + 3 * s2) * y1 + (s3 - s2) * m1;
}
