// Condensate-mode coefficients against the soliton's published constants, the virial theorem
// and a second code path; the clock accumulator against a constant-rate closed form.
import { beforeAll, describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { IsolatedPoisson, PeriodicPoisson } from "../../src/fields/poisson.js";
import type { GroundState } from "../../src/ground-state/imaginary-time.js";
import { modeCoefficients } from "../../src/quantum/mode.js";
import { ClockAccumulator } from "../../src/quantum/clocks.js";
import { estimateClocks } from "../../src/quantum/estimate.js";
import { kerrState, xForPhaseDiffusion } from "../../src/quantum/kerr.js";
import { C_M_PER_S, KG_PER_EV, M_SUN_KG } from "../../src/physics/constants.js";
import { fillComplex, seededRandom } from "../helpers/fields.js";
import { SOLITON_MASS, relaxedSoliton } from "../helpers/soliton.js";

describe("mode coefficients", () => {
  it("χ of a uniform field is zero (no density contrast, no self-gravity energy)", () => {
    const grid = new Grid([16, 16, 16], [1, 1, 1]);
    const psi = fillComplex(grid, () => [3, 0]);
    const m = modeCoefficients({ grid, psi, scaleFactor: 1, particleMass: 1e-6, gravity: new PeriodicPoisson(grid) });
    // zero up to round-off: the self-gravity rate is 1e-12 of the dynamical rate or less
    expect(m.rate / m.lambda).toBeLessThan(1e-12);
    expect(m.omega).toBe(0);
    expect(m.particles).toBeCloseTo(9e6, 3);
  });

  // The soliton (3D, isolated gravity, code units ħ/m = 1, 4πG = 1 so G = 1/4π): the tests' shared 32³ fixture.
  const grid = new Grid([32, 32, 32], [1, 1, 1]);
  const gravity = new IsolatedPoisson(grid);
  const mass = SOLITON_MASS;
  let gs: GroundState;
  let coeffs: ReturnType<typeof modeCoefficients>;
  const particleMass = mass / 1e12; // N = 1e12
  const perParticleUnit = (mass / (4 * Math.PI)) ** 2 * particleMass; // G²M²m³/ħ² in code units
  beforeAll(async () => {
    gs = (await relaxedSoliton(32)).gs;
    coeffs = modeCoefficients({ grid, psi: gs.psi, scaleFactor: 1, particleMass, gravity });
  }, 900_000);

  it("soliton: χ from the mode's own potential equals 2W/N² from the relaxation's potential energy (two code paths)", () => {
    const chiFromW = (2 * gs.potential) / (coeffs.particles ** 2 * particleMass); // ħχ = 2W/N², ħ = m in code units
    expect(Math.abs(coeffs.chi / chiFromW - 1)).toBeLessThan(1e-10);
    expect(coeffs.chi).toBeLessThan(0); // gravity is attractive
  });

  it("soliton: Nħχ = −0.217026 and ħω = 0.0542564 per particle in G²M²m³/ħ², summing to the eigenvalue (computed independently from the ground-state equation; the total energy as in Membrado, Pacheco & Sañudo 1989, Phys. Rev. A 39, 4207)", () => {
    const nChi = (coeffs.particles * coeffs.chi * particleMass) / perParticleUnit; // ħ = m in code units
    const omega = (coeffs.omega * particleMass) / perParticleUnit;
    expect(Math.abs(nChi / -0.217026 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(omega / 0.0542564 - 1)).toBeLessThan(2e-3);
    expect(Math.abs((nChi + omega) / -0.16277 - 1)).toBeLessThan(2e-3);
  });

  it("virialised soliton: N|χ| = 2m⟨v²⟩/ħ with ⟨v²⟩ = 2K/M, since N|χ| = 2|W|/(Nħ) and |W| = 2K (virial theorem)", () => {
    const v2 = (2 * coeffs.kinetic) / coeffs.mass;
    const ratio = coeffs.rate / (v2 / 1); // m/ħ = 1 in code units
    expect(Math.abs(ratio / 2 - 1)).toBeLessThan(5e-3);
    expect(Math.abs(coeffs.virialRatio - 1)).toBeLessThan(5e-3);
  });

  it("a sphere around the densest point that holds the soliton gives the whole-box mode", () => {
    const region = modeCoefficients({ grid, psi: gs.psi, scaleFactor: 1, particleMass, gravity, region: { kind: "densest", radius: 0.45 } });
    expect(region.center).toEqual([0.5, 0.5, 0.5]);
    // the window at 0.45 box lengths (1.5 r_99) leaves out the soliton's faint tail
    expect(Math.abs(region.particles / coeffs.particles - 1)).toBeLessThan(1e-3);
    expect(Math.abs(region.chi / coeffs.chi - 1)).toBeLessThan(3e-3);
    const core = modeCoefficients({ grid, psi: gs.psi, scaleFactor: 1, particleMass, gravity, region: { kind: "sphere", center: [0.5, 0.5, 0.5], radius: 0.1 } });
    expect(core.particles).toBeLessThan(coeffs.particles);
    expect(core.particles).toBeGreaterThan(0.15 * coeffs.particles);
  });
});

describe("clock accumulator", () => {
  it("with constant rates, X = χt, Θ = ωt, B = λt and the clocks ring at the closed-form times", () => {
    const N = 1e20;
    const chi = -2e-3;
    const rates = { omegaTilde: 0.7, chiTilde: chi, lambda: 0.01 };
    const acc = new ClockAccumulator(N, -10, 5, rates);
    const rnd = seededRandom(3);
    let t = 5;
    for (let i = 0; i < 500; i++) {
      const dt = 0.01 * (1.5 + rnd());
      acc.advance(t + dt, dt, dt, rates);
      t += dt;
    }
    expect(acc.chiIntegral).toBeCloseTo(chi * (t - 5), 12);
    expect(acc.theta).toBeCloseTo(0.7 * (t - 5), 12);
    expect(acc.breakdown).toBeCloseTo(0.01 * (t - 5), 12);
    const r = Object.fromEntries(acc.results().map((c) => [c.name, c]));
    expect(r["squeezing-onset"]!.reached).toBe(true);
    expect(r["squeezing-onset"]!.time).toBeCloseTo(1 / (N * Math.abs(chi)), 20); // inside the first step
    expect(kerrState(N, Math.abs(chi) * r["squeezing-level"]!.time!).squeezingDb).toBeCloseTo(-10, 6);
    expect(r["phase-diffusion"]!.reached).toBe(true);
    expect(r["phase-diffusion"]!.time! / (xForPhaseDiffusion(N) / Math.abs(chi))).toBeCloseTo(1, 12);
    expect(r["classical-breakdown"]!.reached).toBe(false); // projected with the last rate
    expect(r["classical-breakdown"]!.time! / (Math.log(N) / 0.01)).toBeCloseTo(1, 10);
  });
});

describe("estimate", () => {
  it("rule of thumb of the field (common practice, no source): m = 1e-5 eV, v² = 1e-6 c² squeezes in about 1e-4 s (within a factor of a few)", () => {
    const est = estimateClocks({ particleMassKg: 1e-5 * KG_PER_EV, modeMassKg: 1e-10 * M_SUN_KG, velocity: 1e-3 * C_M_PER_S, squeezingDb: -10 });
    const onset = est.clocks[0]!.timeS!;
    expect(onset).toBeGreaterThan(1e-4 / 5);
    expect(onset).toBeLessThan(1e-4 * 5);
    // ħ/(2 m v²) exactly: 6.582119569e-16 eV s / (2 × 1e-5 eV × 1e-6) (CODATA ħ)
    expect(onset / (6.582119569e-16 / 2e-11)).toBeCloseTo(1, 9);
  });

  it("a worked example (computed independently) from the simulation-free formulas, with the soliton's exact virial numbers", () => {
    // a 1e9 Msun soliton of m22 = 1: N = 1.1154e97, 1/(N|χ|) = 1.716 Myr, 1/(|χ|√N) = 5.73e54 yr (computed independently)
    // N|χ| = 2|W|/(Nħ) = 4|E|/(Nħ) with |E| = 0.0542564 G²M³m²/ħ² ⇒ ⟨v²⟩ = 2|E|/M = 0.1085128 G²M²m²/ħ²
    const m = 1e-22 * KG_PER_EV;
    const M = 1e9 * M_SUN_KG;
    const G = 6.6743e-11;
    const hbar = 6.62607015e-34 / (2 * Math.PI);
    const v = Math.sqrt(0.1085128 * (G * M * m / hbar) ** 2);
    const est = estimateClocks({ particleMassKg: m, modeMassKg: M, velocity: v, squeezingDb: -10 });
    expect(est.particles / 1.1154e97).toBeCloseTo(1, 3);
    const myr = 1e6 * 365.25 * 86400;
    expect(est.clocks[0]!.timeS! / myr / 1.716).toBeCloseTo(1, 3);
    expect(est.clocks[2]!.timeS! / (myr / 1e6) / 5.73e54).toBeCloseTo(1, 2);
  });
});
