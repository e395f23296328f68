/** Radial profiles of a centred, spherically symmetric field, for tests. */
import type { Grid } from "../../src/grid/grid.js";
import { integrate } from "../../src/math/quadrature.js";

/**
 * ρ(r) of a field centred on cell (n0/2, n1/2, n2/2), from the band-limited
 * (trigonometric) interpolant of ψ along the last axis through the centre.
 */
export function radialDensity(grid: Grid, psi: Float64Array): (r: number) => number {
  const [n0, n1, n2] = grid.shape;
  const start = ((n0 >> 1) * n1 + (n1 >> 1)) * n2;
  const re = new Float64Array(n2);
  const im = new Float64Array(n2);
  for (let j = 0; j < n2; j++) {
    re[j] = psi[2 * (start + j)]!;
    im[j] = psi[2 * (start + j) + 1]!;
  }
  // DFT coefficients c_m, m = −n/2 … n/2 (Nyquist split evenly).
  const cr = new Float64Array(n2);
  const ci = new Float64Array(n2);
  for (let m = 0; m < n2; m++) {
    for (let j = 0; j < n2; j++) {
      const ang = (-2 * Math.PI * m * j) / n2;
      cr[m] = cr[m]! + (re[j]! * Math.cos(ang) - im[j]! * Math.sin(ang)) / n2;
      ci[m] = ci[m]! + (re[j]! * Math.sin(ang) + im[j]! * Math.cos(ang)) / n2;
    }
  }
  const dx = grid.spacing[2];
  const centre = (n2 >> 1) * dx;
  return (r: number) => {
    const x = (centre + r) / dx;
    let sr = 0;
    let si = 0;
    for (let m = 0; m < n2; m++) {
      const mm = m < n2 / 2 ? m : m - n2;
      const w = m === n2 / 2 ? 0.5 : 1;
      const angles = mm === -n2 / 2 ? [mm, -mm] : [mm];
      for (const q of angles) {
        const ang = (2 * Math.PI * q * x) / n2;
        const c = Math.cos(ang);
        const s = Math.sin(ang);
        sr += w * (cr[m]! * c - ci[m]! * s);
        si += w * (cr[m]! * s + ci[m]! * c);
      }
    }
    return sr * sr + si * si;
  };
}

/** Enclosed mass M(<r) = ∫₀^r 4πs² ρ(s) ds. */
export function enclosedMass(rho: (r: number) => number, r: number): number {
  return integrate((s) => 4 * Math.PI * s * s * rho(s), 0, r, 1e-10);
}

/** The radius where M(<r) reaches `fraction` of `total`, by bisection. */
export function massRadius(rho: (r: number) => number, total: number, fraction: number, rMax: number): number {
  let lo = 0;
  let hi = rMax;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (enclosedMass(rho, mid) < fraction * total) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
