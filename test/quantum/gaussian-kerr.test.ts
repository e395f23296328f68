// The Kerr mode from squeezed, thermal and displaced Gaussian starts (closed system): the closed forms
// against a direct evolution in a truncated Fock basis (the state built there from its operators), and
// against a 330-digit evaluation of the published Gaussian-integral form of the moments at large N.
import { Decimal } from "decimal.js";
import { describe, expect, it } from "vitest";
import { closedIntegrals, openKerrState, type KerrIntegrals } from "../../src/quantum/open-kerr.js";
import { constantRateIntegrals } from "../../src/quantum/kerr-integrals.js";
import { kerrState } from "../../src/quantum/kerr.js";
import { fluctuationMoments, numberSpread, validateStart, type GaussianStart } from "../../src/quantum/gaussian-start.js";
import { meanFieldCollapseX } from "../../src/quantum/state-clocks.js";
import { fockKit, type DC } from "../helpers/fock.js";

const start = (squeeze: number, squeezeAngle: number, thermal: number): GaussianStart => ({ squeeze, squeezeAngle, thermal });

describe("Gaussian starts against a direct Fock-space evolution (N ≤ 200, 1e-10)", () => {
  it("check value: α = √20, r = 0.3 at angle 0, X = 0.05 gives ⟨b⟩ = 2.4078495342 − 3.6958681678i, S = 0.3588636862 (computed independently)", () => {
    const r = 0.3;
    const N = 20 + Math.sinh(r) ** 2; // ⟨b†b⟩ = |α|² + sinh² r
    const st = openKerrState(N, start(r, 0, 0), closedIntegrals(0.05));
    expect(st.meanField[0] * Math.sqrt(N)).toBeCloseTo(2.4078495342, 9);
    expect(st.meanField[1] * Math.sqrt(N)).toBeCloseTo(-3.6958681678, 9);
    expect(Math.abs(st.relativeVariance / 0.3588636862 - 1)).toBeLessThan(3e-10);
  });

  it("pure squeezed starts, N = 1 … 200, X from 1e-3 to π, all moments", () => {
    const K = fockKit(70); // the raising series cancels to ~1e-45 at N = 200

    const cases = [
      { a2: 200, r: 0.4, angle: 1.0, M: 450, xs: [1e-3, 0.01, 0.3] },
      { a2: 7, r: 0.8, angle: 2.5, M: 160, xs: [0.05, 1.7, Math.PI] },
      { a2: 1, r: 0.2, angle: Math.PI, M: 60, xs: [0.02, 0.9] },
      { a2: 0, r: 0.5, angle: 0.4, M: 80, xs: [0.03, 1.1] }, // squeezed vacuum: no mean field
    ];
    for (const { a2, r, angle, M, xs } of cases) {
      const psi = K.squeezedCoherent(Math.sqrt(a2), r, angle, M);
      expect(Math.abs(K.norm2(psi).toNumber() - 1)).toBeLessThan(1e-14); // the basis holds the state
      const N = a2 + fluctuationMoments(start(r, angle, 0)).n;
      for (const X of xs) compare(K, [{ weight: 1, psi }], N, start(r, angle, 0), X);
    }
  });

  it("thermal and squeezed thermal starts (mixtures of D(α)S(ζ)|k⟩ with thermal weights)", () => {
    const K = fockKit(40);
    for (const s of [start(0, 0, 0.3), start(0.3, 0.7, 0.25)]) {
      const a2 = 6;
      const nth = s.thermal;
      const comps: { weight: number; psi: DC[] }[] = [];
      for (let k = 0; k < 40; k++) {
        const weight = Math.pow(nth / (nth + 1), k) / (nth + 1); // thermal (Bose–Einstein) weights
        if (weight < 1e-14) break;
        comps.push({ weight, psi: K.gaussianState(Math.sqrt(a2), s.squeeze, s.squeezeAngle, k, 80) });
      }
      const N = a2 + fluctuationMoments(s).n;
      for (const X of [0.02, 0.4, 2.5]) compare(K, comps, N, s, X);
    }
  });
});

function compare(K: ReturnType<typeof fockKit>, comps: { weight: number; psi: DC[] }[], N: number, s: GaussianStart, X: number): void {
  const ref = K.kerrMoments(comps, X);
  expect(Math.abs(ref.n.toNumber() / N - 1), `⟨n⟩ for ${JSON.stringify(s)}`).toBeLessThan(1e-12);
  const st = openKerrState(N, s, closedIntegrals(X));
  const tag = `${JSON.stringify(s)} N=${N} X=${X}`;
  expect(Math.abs(st.minVariance / ref.V.toNumber() - 1), `V ${tag}`).toBeLessThan(1e-10);
  const sq = Math.sqrt(N);
  expect(Math.abs(st.meanField[0] * sq - ref.b1.re.toNumber()), `Re⟨b⟩ ${tag}`).toBeLessThan(1e-10 * sq);
  expect(Math.abs(st.meanField[1] * sq - ref.b1.im.toNumber()), `Im⟨b⟩ ${tag}`).toBeLessThan(1e-10 * sq);
  expect(Math.abs(st.secondMoment[0] * N - ref.b2.re.toNumber()), `Re⟨b²⟩ ${tag}`).toBeLessThan(1e-10 * N);
  expect(Math.abs(st.secondMoment[1] * N - ref.b2.im.toNumber()), `Im⟨b²⟩ ${tag}`).toBeLessThan(1e-10 * N);
}

// The published form of the moments (Gaussian integral of the normally ordered generating function):
// Σ = ½[[n + Re m, Im m], [Im m, n − Re m]], μ = (α, 0), A(c) = I − 2cΣ, F(c) = det(A)^{−1/2} exp(c μᵀA⁻¹μ),
// ⟨b⟩ = F(c₁)(1, i)·A(c₁)⁻¹μ, ⟨b²⟩ = e^{−iX} F(c₂)[((1, i)·A(c₂)⁻¹μ)² + S_xx − S_yy + 2iS_xy], S = ΣA(c₂)⁻¹,
// c_k = e^{−ikX} − 1, evaluated naively at 330 digits. Both factors of det(A) have positive real part,
// so the principal square root is the continuous branch.
const P = Decimal.clone({ precision: 330, toExpNeg: -9e15, toExpPos: 9e15 });
type PC = { re: Decimal; im: Decimal };
const pc = (re: Decimal | number, im: Decimal | number = 0): PC => ({ re: new P(re), im: new P(im) });
const pmul = (a: PC, b: PC): PC => ({ re: a.re.times(b.re).minus(a.im.times(b.im)), im: a.re.times(b.im).plus(a.im.times(b.re)) });
const padd = (a: PC, b: PC): PC => ({ re: a.re.plus(b.re), im: a.im.plus(b.im) });
const psub = (a: PC, b: PC): PC => ({ re: a.re.minus(b.re), im: a.im.minus(b.im) });
const pabs = (a: PC) => P.sqrt(a.re.pow(2).plus(a.im.pow(2)));
const pdiv = (a: PC, b: PC): PC => {
  const d = b.re.pow(2).plus(b.im.pow(2));
  return { re: a.re.times(b.re).plus(a.im.times(b.im)).div(d), im: a.im.times(b.re).minus(a.re.times(b.im)).div(d) };
};
const pexp = (a: PC): PC => {
  // e^x below e^{−1e5} = 10^{−43429} is far below the 330 digits of the sums it enters (decimal.js is slow there)
  const e = a.re.lt(-1e5) ? new P(0) : P.exp(a.re);
  return e.isZero() ? pc(0) : { re: e.times(P.cos(a.im)), im: e.times(P.sin(a.im)) };
};
const psqrt = (a: PC): PC => {
  const r = pabs(a);
  const re = P.sqrt(r.plus(a.re).div(2));
  const im = P.sqrt(r.minus(a.re).div(2));
  return { re, im: a.im.isNeg() ? im.neg() : im };
};
const exact = (x: number) => new P(x === 0 ? "0" : x.toPrecision(100));

function referenceV(N: number, s: GaussianStart, X: number, k?: KerrIntegrals): Decimal {
  const { n, m } = fluctuationMoments(s);
  const nD = exact(n);
  const a0 = P.sqrt(exact(N).minus(nD));
  const sxx = nD.plus(exact(m[0])).div(2);
  const syy = nD.minus(exact(m[0])).div(2);
  const sxy = exact(m[1]).div(2);
  const x = exact(X);
  const parts = (c: PC) => {
    // A = I − 2cΣ; A⁻¹ = adj(A)/det
    const axx = psub(pc(1), pmul(c, pc(sxx.times(2))));
    const ayy = psub(pc(1), pmul(c, pc(syy.times(2))));
    const axy = pmul(c, pc(sxy.times(-2)));
    const det = psub(pmul(axx, ayy), pmul(axy, axy));
    const ixx = pdiv(ayy, det);
    const iyy = pdiv(axx, det);
    const ixy = pdiv({ re: axy.re.neg(), im: axy.im.neg() }, det);
    const muAmu = pmul(ixx, pc(a0.pow(2)));
    const F = pdiv(pexp(pmul(c, muAmu)), psqrt(det));
    const lin = padd(pmul(ixx, pc(a0)), pmul(pc(0, 1), pmul(ixy, pc(a0)))); // (1, i)·A⁻¹μ
    // S = ΣA⁻¹
    const Sxx = padd(pmul(pc(sxx), ixx), pmul(pc(sxy), ixy));
    const Syy = padd(pmul(pc(sxy), ixy), pmul(pc(syy), iyy));
    const Sxy = padd(pmul(pc(sxx), ixy), pmul(pc(sxy), iyy));
    return { F, lin, Sxx, Syy, Sxy };
  };
  // with loss and dephasing: c_k = e^{−Γ}(e^{−ikX} − 1) + (J₁ for k = 1; 2J₁ + J₂ for k = 2), ⟨b⟩ gains
  // e^{−(Γ+K)/2}, ⟨b²⟩ e^{−Γ−2K} and ⟨n⟩ = N e^{−Γ} (the integrals are the test's inputs, taken exactly)
  const eG = k ? P.exp(exact(-k.loss)) : new P(1);
  const j1 = k ? pc(exact(k.lossPhase1[0]), exact(k.lossPhase1[1])) : pc(0);
  const j2 = k ? padd(pmul(pc(2), j1), pc(exact(k.lossPhase2[0]), exact(k.lossPhase2[1]))) : pc(0);
  const c1 = padd(pmul(pc(eG), pc(P.cos(x).minus(1), P.sin(x).neg())), j1);
  const c2 = padd(pmul(pc(eG), pc(P.cos(x.times(2)).minus(1), P.sin(x.times(2)).neg())), j2);
  const p1 = parts(c1);
  const b1 = pmul(pmul(p1.F, p1.lin), pc(k ? P.exp(exact(-(k.loss + k.dephasing) / 2)) : 1));
  const p2 = parts(c2);
  const br = padd(psub(pmul(p2.lin, p2.lin), p2.Syy), padd(p2.Sxx, pmul(pc(0, 2), p2.Sxy)));
  const b2 = pmul(pmul(pmul(pc(P.cos(x), P.sin(x).neg()), p2.F), br), pc(k ? P.exp(exact(-k.loss - 2 * k.dephasing)) : 1));
  const mm = psub(b2, pmul(b1, b1));
  return new P(0.5).plus(exact(N).times(eG)).minus(b1.re.pow(2).plus(b1.im.pow(2))).minus(pabs(mm));
}

describe("Gaussian starts at large N: the double-precision forms against 330-digit arithmetic (1e-8 relative)", () => {
  // a grid of 15 N from 1 to 1e120, log-spaced and denser below 1e10 where the series' edge g²/N_α = 1e-5 lies,
  // and 11 X per N from 1e-3/N to 2π (the points where the evaluation
  // changes form among them: u = N_α X² = 1e-5 and 3e-4 around the near-Gaussian series' edge, the best squeezing
  // near X = N^{−5/6}, the mean field's collapse at u ≈ 1, the cat state at X = π and the revival at 2π); the six
  // starts take turns over the grid, so that each meets every regime
  const states = [start(0.5, 0.3, 0), start(1, Math.PI, 0), start(0.2, 2, 1.5), start(0, 0, 3), start(0.8, 4, 0.4), start(0.3, -1, 0)];
  const LOG_N = [0, 1, 2, 3, 4.5, 6, 7, 8, 10, 13, 17, 25, 40, 70, 120];
  it("squeezed (several r and angles), thermal and squeezed thermal starts, N = 1 … 1e120, X = 1e-3/N … 2π", () => {
    let worst = 0;
    let checked = 0;
    for (let i = 0; i < 15; i++) {
      const N = Math.pow(10, LOG_N[i] as number);
      const uAt = (u: number) => 2 * Math.asin(Math.min(1, Math.sqrt(u / (4 * N))));
      const xs = [1e-3 / N, 1 / N, N ** (-5 / 6), uAt(1e-5), uAt(3e-4), uAt(0.3), uAt(3), Math.PI - 1e-5, Math.PI, 2 * Math.PI - 1e-3, 2 * Math.PI];
      xs.forEach((X, j) => {
        const s = states[(i + j) % states.length] as GaussianStart;
        if (fluctuationMoments(s).n > N) return;
        const ref = referenceV(N, s, X).toNumber();
        const st = openKerrState(N, s, closedIntegrals(X));
        const rel = Math.abs(st.minVariance / ref - 1);
        worst = Math.max(worst, rel);
        expect(st.digits).toBe(16);
        expect(rel, `V at N=${N}, X=${X}, ${JSON.stringify(s)}`).toBeLessThan(1e-8);
        checked++;
      });
    }
    expect(checked).toBeGreaterThanOrEqual(150);
    expect(worst).toBeLessThan(1e-8);
  });
});

describe("with loss and dephasing at large N against 330-digit arithmetic (1e-8 relative)", () => {
  it("constant rates, N = 1 … 1e120, coherent, squeezed and squeezed thermal starts (doubles where their error estimate allows, decimal digits otherwise)", () => {
    const states = [start(0, 0, 0), start(0.5, 0.3, 0), start(0.2, 2, 1.5)];
    const rates = [[1e-3, 0], [0, 1e-4], [0.02, 2e-4], [1, 0.5]] as const;
    let checked = 0;
    [0, 2, 6, 12, 30, 60, 97, 120].forEach((lgN, i) => {
      const N = Math.pow(10, lgN);
      [1e-3 / N, N ** (-5 / 6), N ** -0.5, 0.3].forEach((X, j) => {
        const s = states[(i + j) % states.length] as GaussianStart;
        const [gamma, kappa] = rates[(i + 2 * j) % rates.length] as readonly [number, number];
        if (fluctuationMoments(s).n > N) return;
        // Γ = γt and K = κt with t = 1: the loss integrals J₁, J₂ by the sidecar's own quadrature
        const k = constantRateIntegrals(0, X, gamma, kappa, 1);
        const ref = referenceV(N, s, X, k).toNumber();
        const rel = Math.abs(openKerrState(N, s, k).minVariance / ref - 1);
        expect(rel, `V at N=${N}, X=${X}, γt=${gamma}, κt=${kappa}, ${JSON.stringify(s)}`).toBeLessThan(1e-8);
        checked++;
      });
    });
    expect(checked).toBeGreaterThanOrEqual(30);
  });
});

describe("limits", () => {
  it("zero squeezing and no thermal quanta reproduce the coherent closed forms bit for bit", () => {
    for (const N of [1, 50, 1e6, 1e40]) {
      for (const X of [1e-3 / N, 1 / N, 0.2, Math.PI, -0.3]) {
        const a = openKerrState(N, start(0, 1.2, 0), closedIntegrals(X, 0.7));
        const b = kerrState(N, Math.abs(X), 0.7);
        for (const key of Object.keys(b) as (keyof typeof b)[]) expect(a[key]).toStrictEqual(b[key]);
      }
    }
  });

  it("the mean field collapses at X_c ≈ 1/ΔN for the start's own number spread (Gaussian phase spread)", () => {
    const N = 1e8;
    for (const s of [start(0, 0, 0), start(1, 0, 0), start(1, Math.PI, 0), start(0.3, 1, 2)]) {
      const dN = numberSpread(N, s);
      const Xc = meanFieldCollapseX(N, s);
      expect(Math.abs(Xc * dN - 1), JSON.stringify(s)).toBeLessThan(2e-3);
    }
    // amplitude squeezing slows phase diffusion by e^{r}, phase squeezing speeds it up
    expect(numberSpread(N, start(1, 0, 0)) / Math.sqrt(N)).toBeCloseTo(Math.exp(-1), 3);
    expect(numberSpread(N, start(1, Math.PI, 0)) / Math.sqrt(N)).toBeCloseTo(Math.exp(1), 3);
  });

  it("rejects negative, non-finite and oversized starts, naming the parameter", () => {
    expect(() => validateStart(100, start(-0.1, 0, 0))).toThrow(/^squeeze:/);
    expect(() => validateStart(100, start(Number.NaN, 0, 0))).toThrow(/^squeeze:/);
    expect(() => validateStart(100, start(0, 0, -1))).toThrow(/^thermal:/);
    expect(() => validateStart(100, start(0, 0, Number.POSITIVE_INFINITY))).toThrow(/^thermal:/);
    expect(() => validateStart(100, start(0, 0, 1e4))).toThrow(/^thermal: .*more than the mode's N/);
    expect(() => validateStart(100, start(0, 0, 99))).not.toThrow();
  });
});
