// The exact Kerr evolution of a coherent state against arbitrary precision, Fock-space sums,
// published limits and a check table computed independently.
import { Decimal } from "decimal.js";
import { describe, expect, it } from "vitest";
import { bestSqueezing, kerrState, xForPhaseDiffusion, xForSqueezing } from "../../src/quantum/kerr.js";

const D = Decimal.clone({ precision: 420 });

/** The naive closed form V_min = 1/2 + N(1 − e^{−u}) − N e^{−u}|e^z − 1| at 420 significant digits (decimal.js). */
function reference(N: number, X: number): { S: Decimal; logFraction: Decimal } {
  // the exact binary values of the doubles (toPrecision(100) prints them exactly)
  const n = new D(N.toPrecision(100));
  const x = new D(X.toPrecision(100));
  const u = n.times(4).times(D.sin(x.div(2)).pow(2));
  const q = D.exp(u.neg());
  // q²|e^z − 1|² = q²(e^{2Re z} − 2e^{Re z} cos(Im z) + 1) with q e^{Re z} = e^{−u(1 + cos X)} (no huge exponents)
  const qez = D.exp(u.neg().times(D.cos(x).plus(1)));
  const zi = u.times(D.sin(x)).minus(x);
  const qAbs2 = qez.pow(2).minus(qez.times(q).times(D.cos(zi)).times(2)).plus(q.pow(2));
  const V = new D(0.5).plus(n.times(new D(1).minus(q))).minus(n.times(qAbs2.sqrt()));
  return { S: V.times(2), logFraction: u.neg() };
}

const Ns = [1, 3, 10, 100, 1e3, 1e5, 1e8, 1e12, 1e20, 1e40, 1e60, 1e90, 1e120];

describe("Kerr coherent state: stable double-precision closed forms", () => {
  it("agree with a 420-digit evaluation of the exact expressions from N = 1 to 1e120, X from 1e-3/N to 2π (relative 1e-8)", () => {
    let worst = 0;
    let checked = 0;
    for (const N of Ns) {
      const uAt = (u: number) => 2 * Math.asin(Math.min(1, Math.sqrt(u / (4 * N))));
      const xs = [1e-3 / N, 0.1 / N, 1 / N, 0.5 * N ** (-5 / 6), N ** (-5 / 6), 2 * N ** (-5 / 6), N ** (-2 / 3), uAt(0.3), uAt(0.999), uAt(1.001), uAt(3), 3 / Math.sqrt(N), 1e-2, 0.3, 1, Math.PI - 1e-5, Math.PI, 2 * Math.PI - 1e-3, 2 * Math.PI];
      for (const X of xs) {
        if (!(X <= 2 * Math.PI)) continue;
        const got = kerrState(N, X);
        const ref = reference(N, X);
        const S = ref.S.toNumber();
        const relS = Math.abs(got.relativeVariance / S - 1);
        const dB = 10 * Math.log10(S);
        const relDb = Math.abs(got.squeezingDb - dB) / Math.max(1, Math.abs(dB));
        const logF = ref.logFraction.toNumber();
        const relF = Math.abs(got.logMeanFieldFraction - logF) / Math.max(1, Math.abs(logF));
        const fracRef = Math.exp(logF);
        const relFrac = fracRef > 1e-300 ? Math.abs(got.meanFieldFraction / fracRef - 1) : got.meanFieldFraction;
        worst = Math.max(worst, relS, relDb, relF, relFrac);
        expect(relS, `S at N=${N}, X=${X}`).toBeLessThan(1e-8);
        expect(relDb, `dB at N=${N}, X=${X}`).toBeLessThan(1e-8);
        expect(relF, `ln fraction at N=${N}, X=${X}`).toBeLessThan(1e-8);
        expect(relFrac, `fraction at N=${N}, X=${X}`).toBeLessThan(1e-8);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(230);
    expect(worst).toBeLessThan(1e-8);
  });

  it("match a direct sum over Fock states for N = 1 … 200 (1e-10; the sums in 40-digit decimal arithmetic)", () => {
    const F = Decimal.clone({ precision: 40 });
    for (const N of [1, 2, 7, 30, 200]) {
      for (const X of [1e-4, 0.01, 0.05, 0.3, 1.7, Math.PI]) {
        const nMax = Math.ceil(N + 12 * Math.sqrt(N) + 40);
        const x = new F(X);
        const re: Decimal[] = [];
        const im: Decimal[] = [];
        let lnFact = new F(0);
        for (let n = 0; n <= nMax; n++) {
          if (n > 0) lnFact = lnFact.plus(F.ln(n));
          const mag = F.exp(new F(-N / 2).plus(new F(n / 2).times(F.ln(N))).minus(lnFact.div(2)));
          const ph = x.times((-n * (n - 1)) / 2);
          re.push(mag.times(F.cos(ph)));
          im.push(mag.times(F.sin(ph)));
        }
        let b1r = new F(0), b1i = new F(0), b2r = new F(0), b2i = new F(0);
        for (let n = 0; n + 1 <= nMax; n++) {
          const f = F.sqrt(n + 1);
          b1r = b1r.plus(f.times(re[n]!.times(re[n + 1]!).plus(im[n]!.times(im[n + 1]!))));
          b1i = b1i.plus(f.times(re[n]!.times(im[n + 1]!).minus(im[n]!.times(re[n + 1]!))));
          if (n + 2 <= nMax) {
            const g = F.sqrt((n + 1) * (n + 2));
            b2r = b2r.plus(g.times(re[n]!.times(re[n + 2]!).plus(im[n]!.times(im[n + 2]!))));
            b2i = b2i.plus(g.times(re[n]!.times(im[n + 2]!).minus(im[n]!.times(re[n + 2]!))));
          }
        }
        const mr = b2r.minus(b1r.pow(2).minus(b1i.pow(2)));
        const mi = b2i.minus(b1r.times(b1i).times(2));
        const V = new F(0.5).plus(N).minus(b1r.pow(2).plus(b1i.pow(2))).minus(F.sqrt(mr.pow(2).plus(mi.pow(2)))).toNumber();
        const got = kerrState(N, X);
        expect(Math.abs(got.minVariance - V) / V, `N=${N} X=${X}`).toBeLessThan(1e-10);
        expect(Math.abs(got.meanField[0] * Math.sqrt(N) - b1r.toNumber())).toBeLessThan(1e-10 * Math.sqrt(N));
        expect(Math.abs(got.meanField[1] * Math.sqrt(N) - b1i.toNumber())).toBeLessThan(1e-10 * Math.sqrt(N));
        expect(Math.abs(got.secondMoment[0] * N - b2r.toNumber())).toBeLessThan(1e-10 * N);
        expect(Math.abs(got.secondMoment[1] * N - b2i.toNumber())).toBeLessThan(1e-10 * N);
      }
    }
  });

  it("with time-varying ω(t), χ(t), a numerical Fock-basis integration matches the accumulated-phase solution", () => {
    // i dc_n/dt = (ω n + χ n(n−1)/2) c_n, RK4 in the Fock basis; Θ = ∫ω dt, X = ∫χ dt in closed form
    const N = 5;
    const omega = (t: number) => 1 + 0.5 * Math.sin(t);
    const chi = (t: number) => 0.1 + 0.3 * Math.cos(2 * t);
    const T = 3;
    const nMax = 60;
    const c: [number, number][] = [];
    let lnFact = 0;
    for (let n = 0; n <= nMax; n++) {
      if (n > 0) lnFact += Math.log(n);
      c.push([Math.exp(-N / 2 + (n / 2) * Math.log(N) - lnFact / 2), 0]);
    }
    const deriv = (t: number, y: [number, number][]) =>
      y.map(([r, i], n) => {
        const e = omega(t) * n + (chi(t) * n * (n - 1)) / 2;
        return [e * i, -e * r] as [number, number]; // −i e (r + i i)
      });
    const steps = 30000;
    const h = T / steps;
    let y = c;
    for (let k = 0; k < steps; k++) {
      const t = k * h;
      const add = (a: [number, number][], b: [number, number][], f: number) => a.map(([r, i], n) => [r + f * b[n]![0], i + f * b[n]![1]] as [number, number]);
      const k1 = deriv(t, y);
      const k2 = deriv(t + h / 2, add(y, k1, h / 2));
      const k3 = deriv(t + h / 2, add(y, k2, h / 2));
      const k4 = deriv(t + h, add(y, k3, h));
      y = y.map(([r, i], n) => [
        r + (h / 6) * (k1[n]![0] + 2 * k2[n]![0] + 2 * k3[n]![0] + k4[n]![0]),
        i + (h / 6) * (k1[n]![1] + 2 * k2[n]![1] + 2 * k3[n]![1] + k4[n]![1]),
      ]);
    }
    let br = 0, bi = 0;
    for (let n = 0; n < nMax; n++) {
      const [r0, i0] = y[n]!;
      const [r1, i1] = y[n + 1]!;
      br += Math.sqrt(n + 1) * (r0 * r1 + i0 * i1);
      bi += Math.sqrt(n + 1) * (r0 * i1 - i0 * r1);
    }
    const Theta = T + 0.5 * (1 - Math.cos(T));
    const X = 0.1 * T + 0.15 * Math.sin(2 * T);
    const exact = kerrState(N, X, Theta).meanField;
    expect(Math.abs(br - exact[0] * Math.sqrt(N))).toBeLessThan(1e-9);
    expect(Math.abs(bi - exact[1] * Math.sqrt(N))).toBeLessThan(1e-9);
  });
});

describe("Kerr squeezing: published limits and check values", () => {
  it("reproduces a check table to 1e-9 (computed independently)", () => {
    const table: [number, number, number, number, number][] = [
      [10, 0.01, 3.144907136, -0.315537932, 0.8194932318],
      [10, 0.1, 1.629539348, -2.528582509, 0.5919338692],
      [100, 0.01, 5.376215137, -8.372652055, 0.2176760592],
      [1000, 0.001, 17.07732276, -26.59634463, 0.1762250654],
    ];
    for (const [N, X, re, im, S] of table) {
      const st = kerrState(N, X);
      expect(st.meanField[0] * Math.sqrt(N)).toBeCloseTo(re, 8);
      expect(st.meanField[1] * Math.sqrt(N)).toBeCloseTo(im, 8);
      expect(Math.abs(st.relativeVariance - S)).toBeLessThan(1e-9);
    }
  });

  it("linear regime: r = asinh(NX), S = 1/(√(1+s²) + s)² (Gaussian squeezing)", () => {
    let checked = 0;
    for (const N of [1e8, 1e20, 1e60, 1e120]) {
      for (const s of [1e-3, 0.3, 1, 10, 100]) {
        if (8 * s ** 6 > 1e-8 * N) continue; // the crescent term 2Nu² must be negligible beside 1/(4s²)
        checked++;
        const st = kerrState(N, s / N);
        expect(Math.abs(st.squeezingParameter / Math.asinh(s) - 1)).toBeLessThan(1e-6);
        expect(Math.abs(st.relativeVariance * (Math.sqrt(1 + s * s) + s) ** 2 - 1)).toBeLessThan(1e-6);
      }
    }
    expect(checked).toBeGreaterThanOrEqual(14);
  });

  it("best squeezing: the exact optima (computed independently) to 1e-5, and S_min → (3/2)(4N)^{-1/3} at X_opt → 2^{-2/3} N^{-5/6} (shear plus crescent curvature; Kitagawa & Yamamoto 1986)", () => {
    const optima: [number, number, number][] = [
      [10, 6.3231e-2, 0.415449],
      [100, 1.13696e-2, 0.210838],
      [1000, 1.83728e-3, 0.0981153],
      [1e4, 2.81758e-4, 0.0448955],
      [1e6, 6.25003e-6, 9.50637e-3],
    ];
    for (const [N, X, S] of optima) {
      const best = bestSqueezing(N);
      expect(Math.abs(best.X / X - 1)).toBeLessThan(1e-5);
      expect(Math.abs(best.relativeVariance / S - 1)).toBeLessThan(1e-5);
    }
    // the asymptotic law: the relative deviation shrinks with N and is below 1e-4 from N = 1e12 on
    let previous = Infinity;
    for (const N of [1e6, 1e9, 1e12, 1e20, 1e40, 1e80, 1e120]) {
      const best = bestSqueezing(N);
      const dev = Math.abs(best.relativeVariance / (1.5 * Math.pow(4 * N, -1 / 3)) - 1);
      if (previous > 1e-12) expect(dev).toBeLessThanOrEqual(previous);
      previous = dev;
      if (N >= 1e12) {
        expect(dev).toBeLessThan(1e-4);
        expect(Math.abs(best.X / (Math.pow(2, -2 / 3) * Math.pow(N, -5 / 6)) - 1)).toBeLessThan(1e-3);
      }
    }
  });

  it("revives exactly at X = 2π (Yurke & Stoler 1986, PRL 57, 13) and is a cat state at X = π", () => {
    // (in double precision 2π is off by δ ≈ 2.4e-16, which matters once Nδ is not small: N ≤ 1e4 here)
    for (const N of [1, 10, 1e4]) {
      const st = kerrState(N, 2 * Math.PI);
      expect(Math.abs(st.relativeVariance - 1)).toBeLessThan(1e-6);
      expect(Math.abs(st.meanFieldFraction - 1)).toBeLessThan(1e-6);
    }
    // at X = π: (e^{−iπ/4}|iα⟩ + e^{iπ/4}|−iα⟩)/√2 has ⟨b⟩ = α e^{−2N} (the overlap ⟨iα|−iα⟩ = e^{−2N})
    const N = 2;
    expect(kerrState(N, Math.PI).meanFieldFraction).toBeCloseTo(Math.exp(-4 * N), 12);
  });

  it("mean-field collapse |⟨b⟩|²/N = exp(−2N(1 − cos X)) reaches 1/e at X = arccos(1 − 1/(2N)), against 420 digits up to N = 1e120", () => {
    // in double precision 1 − 1/(2N) rounds to 1 beyond N ≈ 1e16, so the reference is evaluated with decimal.js
    // (computed independently) at the exact binary value of N
    for (const N of [1, 10, 1e6, 1e20, 1e50, 1e120]) {
      const n = new D(N.toPrecision(100));
      const xRef = D.acos(new D(1).minus(new D(1).div(n.times(2))));
      const X = xForPhaseDiffusion(N);
      expect(X).toBeGreaterThan(0);
      expect(Math.abs(X / xRef.toNumber() - 1), `X at N = ${N}`).toBeLessThan(1e-13);
      // the fraction at the X found, also evaluated in 420 digits at that exact double
      const x = new D(X.toPrecision(100));
      const fraction = D.exp(n.times(-2).times(new D(1).minus(D.cos(x)))).toNumber();
      expect(Math.abs(fraction * Math.E - 1), `reference fraction at N = ${N}`).toBeLessThan(1e-12);
      expect(Math.abs(kerrState(N, X).meanFieldFraction / fraction - 1), `fraction at N = ${N}`).toBeLessThan(1e-12);
    }
  });

  it("finds the X at which a squeezing level is first reached, or says it never is", () => {
    const X = xForSqueezing(1e6, -10)!;
    expect(kerrState(1e6, X).squeezingDb).toBeCloseTo(-10, 9);
    expect(X).toBeLessThan(bestSqueezing(1e6).X);
    expect(xForSqueezing(10, -10)).toBeUndefined(); // best for N = 10 is −3.8 dB
  });
});
