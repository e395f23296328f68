// Loss and dephasing of the Kerr mode: the closed forms against a direct integration of the Lindblad
// master equation dρ/dt = −i[H, ρ] + γ D[b]ρ + κ D[b†b]ρ in a truncated Fock basis (written here).
// H = ω n + (χ/2) n(n − 1) and both dissipators keep the diagonals ρ_{n+d, n} apart, so the bands
// d = 0, 1, 2 (all that ⟨n⟩, ⟨b⟩, ⟨b²⟩ need) are integrated with classical RK4 at a fixed step h.
// Stated tolerance: h λ ≤ 3e-3 for the rates λ of the populated levels (n ≤ N + 6√N), a global error
// of about (hλ)⁵/120 per step, below 1e-10 over the run; the basis holds the start to 1e-15.
import { describe, expect, it } from "vitest";
import { openKerrState, type KerrIntegrals } from "../../src/quantum/open-kerr.js";
import { advanceIntegrals, constantRateIntegrals } from "../../src/quantum/kerr-integrals.js";
import { kerrState } from "../../src/quantum/kerr.js";
import { fluctuationMoments, type GaussianStart } from "../../src/quantum/gaussian-start.js";
import { fockKit } from "../helpers/fock.js";

type Rates = (t: number) => { omega: number; chi: number; gamma: number; kappa: number };

/** ⟨n⟩, ⟨b⟩, ⟨b²⟩ at time T from the pure start with Fock amplitudes c (re, im). */
function masterEquation(c: [number, number][], rates: Rates, T: number, steps: number) {
  const M = c.length;
  const out: { re: number; im: number }[] = [];
  let mean = 0;
  for (const d of [0, 1, 2]) {
    const L = M - d;
    // z_n = ρ_{n+d, n} = c_{n+d} c_n*
    const zr = new Float64Array(L);
    const zi = new Float64Array(L);
    for (let n = 0; n < L; n++) {
      const [ar, ai] = c[n + d] as [number, number];
      const [br, bi] = c[n] as [number, number];
      zr[n] = ar * br + ai * bi;
      zi[n] = ai * br - ar * bi;
    }
    const f = (t: number, xr: Float64Array, xi: Float64Array, dr: Float64Array, di: Float64Array) => {
      const { omega, chi, gamma, kappa } = rates(t);
      for (let n = 0; n < L; n++) {
        const j = n + d;
        const dE = omega * d + (chi / 2) * (j * (j - 1) - n * (n - 1));
        const damp = gamma * (n + d / 2) + (kappa * d * d) / 2;
        let r = dE * (xi[n] as number) - damp * (xr[n] as number);
        let i = -dE * (xr[n] as number) - damp * (xi[n] as number);
        if (n + 1 < L) {
          const g = gamma * (roots[n] as number);
          r += g * (xr[n + 1] as number);
          i += g * (xi[n + 1] as number);
        }
        dr[n] = r;
        di[n] = i;
      }
    };
    const roots = Float64Array.from({ length: L }, (_, n) => Math.sqrt((n + d + 1) * (n + 1)));
    const h = T / steps;
    const k = Array.from({ length: 8 }, () => new Float64Array(L));
    const [k1r, k1i, k2r, k2i, k3r, k3i, k4r, k4i] = k as [Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array];
    const yr = new Float64Array(L);
    const yi = new Float64Array(L);
    const stage = (a: Float64Array, b: Float64Array, c: number) => {
      for (let n = 0; n < L; n++) {
        yr[n] = (zr[n] as number) + c * (a[n] as number);
        yi[n] = (zi[n] as number) + c * (b[n] as number);
      }
    };
    for (let s = 0; s < steps; s++) {
      const t = s * h;
      f(t, zr, zi, k1r, k1i);
      stage(k1r, k1i, h / 2);
      f(t + h / 2, yr, yi, k2r, k2i);
      stage(k2r, k2i, h / 2);
      f(t + h / 2, yr, yi, k3r, k3i);
      stage(k3r, k3i, h);
      f(t + h, yr, yi, k4r, k4i);
      for (let n = 0; n < L; n++) {
        zr[n] = (zr[n] as number) + (h / 6) * ((k1r[n] as number) + 2 * (k2r[n] as number) + 2 * (k3r[n] as number) + (k4r[n] as number));
        zi[n] = (zi[n] as number) + (h / 6) * ((k1i[n] as number) + 2 * (k2i[n] as number) + 2 * (k3i[n] as number) + (k4i[n] as number));
      }
    }
    // ⟨b^d⟩ = Σ_n √((n+1)…(n+d)) ρ_{n+d, n};  ⟨n⟩ = Σ n ρ_nn
    let re = 0;
    let im = 0;
    for (let n = 0; n < L; n++) {
      let w = 1;
      for (let q = 1; q <= d; q++) w *= n + q;
      w = Math.sqrt(w);
      if (d === 0) mean += n * (zr[n] as number);
      re += w * (zr[n] as number);
      im += w * (zi[n] as number);
    }
    out.push({ re, im });
  }
  const [, b1, b2] = out as [unknown, { re: number; im: number }, { re: number; im: number }];
  const mr = b2.re - (b1.re * b1.re - b1.im * b1.im);
  const mi = b2.im - 2 * b1.re * b1.im;
  const V = 0.5 + mean - (b1.re * b1.re + b1.im * b1.im) - Math.hypot(mr, mi);
  return { mean, b1, b2, V };
}

function coherentAmplitudes(N: number, M: number): [number, number][] {
  const c: [number, number][] = [];
  let lf = 0;
  for (let n = 0; n < M; n++) {
    if (n > 0) lf += Math.log(n);
    c.push([Math.exp(-N / 2 + (n / 2) * Math.log(N) - lf / 2), 0]);
  }
  return c;
}

function expectClose(st: ReturnType<typeof openKerrState>, ref: ReturnType<typeof masterEquation>, N: number, tol: number, tag: string) {
  const sq = Math.sqrt(N);
  expect(Math.abs(st.meanNumber - ref.mean) / N, `⟨n⟩ ${tag}`).toBeLessThan(tol);
  expect(Math.abs(st.meanField[0] * sq - ref.b1.re) / sq, `Re⟨b⟩ ${tag}`).toBeLessThan(tol);
  expect(Math.abs(st.meanField[1] * sq - ref.b1.im) / sq, `Im⟨b⟩ ${tag}`).toBeLessThan(tol);
  expect(Math.abs(st.secondMoment[0] * N - ref.b2.re) / N, `Re⟨b²⟩ ${tag}`).toBeLessThan(tol);
  expect(Math.abs(st.secondMoment[1] * N - ref.b2.im) / N, `Im⟨b²⟩ ${tag}`).toBeLessThan(tol);
  expect(Math.abs(st.minVariance / ref.V - 1), `V ${tag}`).toBeLessThan(tol);
}

describe("loss and dephasing against the master equation", () => {
  it("check value N = 50, χt = 0.1, γ = χ, κ = 0: ⟨b⟩ = 0.2023308774 + 5.320350418i, S = 13.56248042 (computed independently); ⟨n⟩ = N e^{−γt}", () => {
    const N = 50;
    const k = constantRateIntegrals(0, 1, 1, 0, 0.1);
    const st = openKerrState(N, { squeeze: 0, squeezeAngle: 0, thermal: 0 }, k);
    expect(st.meanField[0] * Math.sqrt(N)).toBeCloseTo(0.2023308774, 9);
    expect(st.meanField[1] * Math.sqrt(N)).toBeCloseTo(5.320350418, 8);
    expect(Math.abs(st.relativeVariance / 13.56248042 - 1)).toBeLessThan(1e-9);
    expect(st.meanNumber).toBe(N * Math.exp(-0.1));
    // and the master equation agrees (M = 180 states, h = 1e-5: hλ_max ≤ 2e-3)
    const ref = masterEquation(coherentAmplitudes(N, 180), () => ({ omega: 0, chi: 1, gamma: 1, kappa: 0 }), 0.1, 10000);
    expectClose(st, ref, N, 1e-8, "N=50");
  });

  it("constant rates with dephasing, N = 12: the Milburn–Holmes / Daniel–Milburn closed forms", () => {
    const N = 12;
    const T = 0.8;
    const ref = masterEquation(coherentAmplitudes(N, 80), () => ({ omega: 0.7, chi: -1.3, gamma: 0.25, kappa: 0.4 }), T, 20000);
    // closed forms for constant rates, written out (Daniel & Milburn 1989)
    const g = 0.25, chi = -1.3, kap = 0.4;
    const cexp = (re: number, im: number) => [Math.exp(re) * Math.cos(im), Math.exp(re) * Math.sin(im)] as const;
    const cdiv = (a: readonly number[], b: readonly number[]) => {
      const d = (b[0] as number) ** 2 + (b[1] as number) ** 2;
      return [((a[0] as number) * (b[0] as number) + (a[1] as number) * (b[1] as number)) / d, ((a[1] as number) * (b[0] as number) - (a[0] as number) * (b[1] as number)) / d];
    };
    const [er, ei] = cexp(-g * T, -chi * T);
    const [qr, qi] = cdiv([0, chi], [g, chi]) as [number, number]; // iχ/(γ + iχ)
    const ex = [N * (qr * (er - 1) - qi * ei), N * (qr * ei + qi * (er - 1))];
    const [br, bi] = cexp(-(g + kap) * T / 2 + (ex[0] as number), -0.7 * T + (ex[1] as number));
    const a = Math.sqrt(N);
    expect(Math.abs(a * br - ref.b1.re)).toBeLessThan(1e-9);
    expect(Math.abs(a * bi - ref.b1.im)).toBeLessThan(1e-9);
    const st = openKerrState(N, { squeeze: 0, squeezeAngle: 0, thermal: 0 }, constantRateIntegrals(0.7, chi, g, kap, T));
    expectClose(st, ref, N, 1e-8, "constant");
  });

  it("time-varying χ(t), γ(t), κ(t), coherent and squeezed starts: the accumulated integrals", () => {
    const rates: Rates = (t) => ({ omega: 0.3, chi: 1 + 0.5 * Math.sin(3 * t), gamma: 0.4 + 0.3 * Math.cos(2 * t), kappa: 0.2 + 0.1 * t });
    const T = 0.5;
    // the integrals by the accumulator over 2000 steps (Θ, X, Γ, K incremented exactly)
    const integrals = (): KerrIntegrals => {
      let k: KerrIntegrals = { theta: 0, x: 0, loss: 0, dephasing: 0, lossPhase1: [0, 0], lossPhase2: [0, 0] };
      const steps = 2000;
      const dt = T / steps;
      for (let s = 0; s < steps; s++) {
        // exact increments of Θ, X, Γ, K over the step
        const t0 = s * dt, t1 = t0 + dt;
        const X = (t: number) => t + (0.5 / 3) * (1 - Math.cos(3 * t));
        const G = (t: number) => 0.4 * t + 0.15 * Math.sin(2 * t);
        const K = (t: number) => 0.2 * t + 0.05 * t * t;
        k = advanceIntegrals(k, { dTheta: 0.3 * dt, dX: X(t1) - X(t0), gamma: (G(t1) - G(t0)) / dt, kappa: (K(t1) - K(t0)) / dt, dt });
      }
      return k;
    };
    const k = integrals();
    const coh = masterEquation(coherentAmplitudes(20, 110), rates, T, 20000);
    expectClose(openKerrState(20, { squeeze: 0, squeezeAngle: 0, thermal: 0 }, k), coh, 20, 1e-8, "coherent");
    const s: GaussianStart = { squeeze: 0.3, squeezeAngle: 0.5, thermal: 0 };
    const K = fockKit(40);
    const psi = K.squeezedCoherent(Math.sqrt(20), s.squeeze, s.squeezeAngle, 120).map((z) => [z.re.toNumber(), z.im.toNumber()] as [number, number]);
    const N = 20 + fluctuationMoments(s).n;
    const sq = masterEquation(psi, rates, T, 20000);
    expectClose(openKerrState(N, s, k), sq, N, 1e-8, "squeezed");
  });

  it("zero rates reproduce the coherent closed forms bit for bit", () => {
    const k = constantRateIntegrals(0.2, -0.05, 0, 0, 2);
    const a = openKerrState(1e6, { squeeze: 0, squeezeAngle: 0, thermal: 0 }, k);
    const b = kerrState(1e6, Math.abs(k.x), k.theta);
    for (const key of Object.keys(b) as (keyof typeof b)[]) expect(a[key]).toStrictEqual(b[key]);
  });
});
