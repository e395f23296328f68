// Spherical-overdensity halos: an NFW halo sampled on the grid against the analytic enclosed mass
// (Navarro, Frenk & White 1996), a moving Gaussian blob's bulk velocity and dispersion against closed forms
// and quadrature (computed independently), peaks inside a halo absorbed, and the virial overdensity of
// Bryan & Norman (1998) in its limits.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { ballVolume, findHalos } from "../../src/diagnostics/halo-catalogue.js";
import { bryanNormanDelta, omegaMatterAt, overdensityThreshold } from "../../src/physics/cosmology/overdensity.js";

/** ψ = √ρ(x) e^{i k·x} on an n³ grid of unit cells, minimum-image distances from `centre`. */
function field(n: number, centre: readonly number[], rho: (r: number) => number, k: readonly number[] = [0, 0, 0]): { grid: Grid; psi: Float64Array } {
  const grid = new Grid([n, n, n], [n, n, n]);
  const psi = new Float64Array(2 * grid.size);
  const wrap = (d: number) => d - n * Math.round(d / n);
  for (let a = 0, p = 0; a < n; a++)
    for (let b = 0; b < n; b++)
      for (let c = 0; c < n; c++, p++) {
        const r = Math.hypot(wrap(a - centre[0]!), wrap(b - centre[1]!), wrap(c - centre[2]!));
        const amp = Math.sqrt(rho(r));
        const phase = k[0]! * a + k[1]! * b + k[2]! * c;
        psi[2 * p] = amp * Math.cos(phase);
        psi[2 * p + 1] = amp * Math.sin(phase);
      }
  return { grid, psi };
}

describe("spherical-overdensity halos", () => {
  it("an NFW halo (r_s = 4 cells, c = 5) sampled on 64³ cells: R and M at the threshold within 1% of the analytic values", () => {
    const rs = 4;
    const conc = 5;
    const R = conc * rs; // 20 cells
    const rhoS = 1;
    const nfw = (r: number) => rhoS / (Math.max(r, 1e-3) / rs) / (1 + r / rs) ** 2;
    // M(<R) = 4π ρ_s r_s³ [ln(1+c) − c/(1+c)] (Navarro, Frenk & White 1996)
    const mass = 4 * Math.PI * rhoS * rs ** 3 * (Math.log(1 + conc) - conc / (1 + conc));
    const threshold = mass / ((4 / 3) * Math.PI * R ** 3);
    const { grid, psi } = field(64, [32.3, 31.7, 32.45], nfw);
    const halos = findHalos(grid, psi, { threshold, minMass: 0, a: 1 });
    expect(halos).toHaveLength(1);
    const h = halos[0]!;
    expect(Math.abs(h.radius / R - 1)).toBeLessThan(0.01 / 3);
    expect(Math.abs(h.mass / mass - 1)).toBeLessThan(0.01);
    h.centre.forEach((x, i) => expect(Math.abs(x - [32.3, 31.7, 32.45][i]!)).toBeLessThan(0.5));
  });

  it("a soliton core (Schive et al. 2014 profile, r_c = 3 cells) on a uniform background: R₂₀₀ and M₂₀₀ within 1% of quadrature", () => {
    const rc = 3;
    const background = 1;
    const rho = (r: number) => background + 4000 / (1 + 0.091 * (r / rc) ** 2) ** 8;
    // R where the mean enclosed density is 200 × the background, by quadrature (midpoint, 1e5 points) and bisection
    const enclosed = (R: number) => {
      let m = 0;
      const n = 100000;
      for (let i = 0; i < n; i++) {
        const r = ((i + 0.5) * R) / n;
        m += rho(r) * r * r;
      }
      return (4 * Math.PI * m * R) / n;
    };
    let lo = 1;
    let hi = 30;
    for (let i = 0; i < 60; i++) {
      const mid = 0.5 * (lo + hi);
      if (enclosed(mid) / ballVolume(3, mid) > 200 * background) lo = mid;
      else hi = mid;
    }
    const R200 = 0.5 * (lo + hi);
    expect(R200).toBeGreaterThan(8);
    const { grid, psi } = field(64, [31.2, 33.6, 32.1], rho);
    const halos = findHalos(grid, psi, { threshold: 200 * background, minMass: 0, a: 1 });
    expect(halos).toHaveLength(1);
    expect(Math.abs(halos[0]!.radius / R200 - 1)).toBeLessThan(0.01 / 3);
    expect(Math.abs(halos[0]!.mass / enclosed(R200) - 1)).toBeLessThan(0.01);
  });

  it("a Gaussian blob moving at k/a: bulk velocity to the fourth-order difference error, dispersion to the hard-sphere quadrature", () => {
    const s = 3;
    const k = (2 * Math.PI * 3) / 64;
    const a = 0.5;
    const blob = (r: number) => Math.exp(-(r * r) / (2 * s * s));
    const R = 2.5 * s;
    // threshold: the blob's mean density inside R (quadrature of 4π∫ρ r² dr, midpoint rule, 2e5 points)
    const quad = (f: (r: number) => number) => {
      let sum = 0;
      const n = 200000;
      for (let i = 0; i < n; i++) sum += f(((i + 0.5) * R) / n);
      return (sum * R) / n;
    };
    const inside = 4 * Math.PI * quad((r) => blob(r) * r * r);
    const threshold = inside / ballVolume(3, R);
    const { grid, psi } = field(64, [20, 33, 40], blob, [k, 0, 0]);
    const [h] = findHalos(grid, psi, { threshold, minMass: 0, a });
    expect(Math.abs(h!.radius / R - 1)).toBeLessThan(2e-3);
    // Im(ψ*∂ψ)/|ψ|² = k up to the fourth-order difference error: (kΔx)⁴/30 = 2.5e-4 for the wave and
    // terms of order (kΔx)²(Δx/s)²/12 ≈ 1e-3 from the envelope
    expect(Math.abs(h!.velocity[0]! / (k / a) - 1)).toBeLessThan(3e-3);
    expect(Math.abs(h!.velocity[1]!) + Math.abs(h!.velocity[2]!)).toBeLessThan(1e-10);
    // |∇√ρ|² = r²ρ/(4s⁴): σ² = ⟨r²/(4s⁴)⟩/(3a²) over the ball
    const sigma2 = quad((r) => (r * r * blob(r) * r * r) / (4 * s ** 4)) / quad((r) => blob(r) * r * r) / (3 * a * a);
    expect(Math.abs(h!.dispersion / Math.sqrt(sigma2) - 1)).toBeLessThan(0.02);
  });

  it("finds separate halos densest first, absorbs a peak inside a halo, and leaves out those below the minimum mass", () => {
    const g = (c: readonly number[], amp: number, s: number) => (x: readonly number[]) =>
      amp * Math.exp(-x.reduce((t, v, i) => t + (v - c[i]!) ** 2, 0) / (2 * s * s));
    const big = g([16, 16, 16], 100, 3);
    const bump = g([22, 16, 16], 40, 0.7); // a peak of its own, inside the big halo's radius
    const other = g([44, 40, 44], 50, 2.5);
    const tiny = g([50, 10, 12], 10, 0.6); // a peak above the threshold, of about half the minimum mass
    const grid = new Grid([64, 64, 64], [64, 64, 64]);
    const psi = new Float64Array(2 * grid.size);
    for (let a = 0, p = 0; a < 64; a++) for (let b = 0; b < 64; b++) for (let c = 0; c < 64; c++, p++) psi[2 * p] = Math.sqrt(0.01 + big([a, b, c]) + bump([a, b, c]) + other([a, b, c]) + tiny([a, b, c]));
    const threshold = 2;
    const minMass = threshold * ballVolume(3, 2);
    const halos = findHalos(grid, psi, { threshold, minMass, a: 1 });
    expect(halos.map((h) => h.centre.map(Math.round))).toEqual([
      [16, 16, 16],
      [44, 40, 44],
    ]);
    expect(halos[0]!.mass).toBeGreaterThan(halos[1]!.mass);
  });
});

describe("overdensity definitions", () => {
  const planck = { omegaMatter: 0.3153, omegaRadiation: 0 };
  it("Bryan & Norman's virial overdensity: 18π² in the matter era, about 101 at Ω_m = 0.3 today (their eq. 6; the value from memory)", () => {
    expect(bryanNormanDelta(1e4, planck)).toBeCloseTo(18 * Math.PI ** 2, 3);
    expect(bryanNormanDelta(0, { omegaMatter: 0.3, omegaRadiation: 0 })).toBeCloseTo(101.1, 1);
    // x = Ω_m − 1 at z = 0, evaluated here independently: 18π² + 82x − 39x²
    const x = 0.3153 - 1;
    expect(bryanNormanDelta(0, planck)).toBeCloseTo(18 * Math.PI ** 2 + 82 * x - 39 * x * x, 12);
    expect(omegaMatterAt(1, planck)).toBeCloseTo((0.3153 * 8) / (0.3153 * 8 + 0.6847), 14);
  });

  it("thresholds: 200 × critical, 200 × mean matter, Δ_c × critical; a static box only by its mean, with a one-line error otherwise", () => {
    expect(overdensityThreshold("200c", 0, 2, 1, planck, "s.h5").density).toBe(400);
    expect(overdensityThreshold("200m", 0, 2, 1, planck, "s.h5").density).toBeCloseTo(200 * 0.3153 * 2, 12);
    expect(overdensityThreshold("vir", 0, 2, 1, planck, "s.h5").density).toBeCloseTo(2 * bryanNormanDelta(0, planck), 12);
    expect(overdensityThreshold("200m", 0, undefined, 3, undefined, "s.h5")).toMatchObject({ density: 600, reference: "box mean" });
    expect(() => overdensityThreshold("vir", 0, undefined, 3, undefined, "s.h5")).toThrow(/^--overdensity: "vir" needs a cosmology, and s\.h5 is a static box; use e\.g\. 200m/);
  });
});
