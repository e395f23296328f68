// The adiabatic phase-diffusion coefficient χ_ad = (1/ħ) dμ/dN (Lewenstein & You 1996 for the principle):
// for the exact soliton, N dμ/dN / (Nħχ) = 3/2 (computed independently: μ ∝ N² by the scaling symmetry and
// the virial theorem give N dμ/dN = 3W/N against Nħχ = 2W/N), here by finite differences of relaxed ground
// states of neighbouring masses and by the stationary-state formula, at 16³ and 32³ (64³ in
// scripts/adiabatic-ratio.mjs; the twin field of a run: test/e2e/twin.test.ts).
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { IsolatedPoisson, NoGravity } from "../../src/fields/poisson.js";
import { relaxGroundState } from "../../src/ground-state/imaginary-time.js";
import { modeCoefficients } from "../../src/quantum/mode.js";
import { stationaryAdiabaticChi } from "../../src/quantum/adiabatic.js";
import { fillComplex } from "../helpers/fields.js";

/** N dμ/dN / (Nħχ) by finite differences at M(1 ± 1%), and χ_ad/χ by the stationary-state formula, on n³ cells. */
function ratios(n: number): { finiteDifference: number; stationary: number } {
  const grid = new Grid([n, n, n], [1, 1, 1]);
  const gravity = new IsolatedPoisson(grid);
  const mass = (9.94583 * 4 * Math.PI) / 0.3; // r₉₉ = 0.3 box sides (Chavanis 2011)
  const s = 0.08;
  const amp = Math.sqrt(mass / Math.pow(2 * Math.PI * s * s, 1.5));
  const guess = fillComplex(grid, (x, y, z) => [amp * Math.exp(-((x - 0.5) ** 2 + (y - 0.5) ** 2 + (z - 0.5) ** 2) / (4 * s * s)), 0]);
  const gs = relaxGroundState(grid, gravity, guess);
  const eps = 0.01;
  const scaled = (f: number) => gs.psi.map((v) => v * Math.sqrt(f));
  const up = relaxGroundState(grid, gravity, scaled(1 + eps));
  const down = relaxGroundState(grid, gravity, scaled(1 - eps));
  // eigenvalue = μ/m per unit mass in code units; N dμ/dN = M² d(eigenvalue)/dM · m/M … over Nħχ = 2W m/M
  const dEig = (up.eigenvalue - down.eigenvalue) / (up.mass - down.mass);
  const coeffs = modeCoefficients({ grid, psi: gs.psi, scaleFactor: 1, particleMass: mass / 1e12, gravity });
  return { finiteDifference: (gs.mass * gs.mass * dEig) / (2 * gs.potential), stationary: stationaryAdiabaticChi(coeffs) / coeffs.chi };
}

describe("adiabatic coefficient of the soliton", () => {
  it("N dμ/dN / (Nħχ) = 3/2 by finite differences of relaxed ground states: error 1.5e-2 at 16³, below 3e-3 at 32³, falling more than 4-fold", () => {
    const coarse = ratios(16);
    const fine = ratios(32);
    const error = (r: number) => Math.abs(r / 1.5 - 1);
    process.stdout.write(`N dμ/dN / (Nħχ) − 3/2, relative: 16³ ${error(coarse.finiteDifference).toExponential(2)}, 32³ ${error(fine.finiteDifference).toExponential(2)}\n`);
    expect(error(coarse.finiteDifference)).toBeLessThan(0.03); // measured 1.54e-2
    expect(error(fine.finiteDifference)).toBeLessThan(3e-3); // measured 2.35e-3 (64³: scripts/adiabatic-ratio.mjs)
    expect(error(fine.finiteDifference)).toBeLessThan(error(coarse.finiteDifference) / 4); // at least second order (measured 6.5-fold)
    // the stationary-state formula χ_ad = 2ω/N + 2χ (virial theorem on the grid) gives the same
    expect(error(coarse.stationary)).toBeLessThan(5e-3); // measured 1.9e-3
    expect(error(fine.stationary)).toBeLessThan(1e-4); // measured 2e-6
  });

  it("is zero without gravity: the free equation is linear, so a packet of (1 + e)N quanta has the same μ (computed independently)", () => {
    const grid = new Grid([64], [1]);
    const envelope = (x: number) => Math.exp(-((x - 0.5) ** 2) / 0.01);
    const packet = (amp: number) => fillComplex(grid, (_x, _y, z) => [amp * envelope(z) * Math.cos(20 * z), amp * envelope(z) * Math.sin(20 * z)]);
    const of = (amp: number) => modeCoefficients({ grid, psi: packet(amp), scaleFactor: 1, particleMass: 1e-6, gravity: new NoGravity() });
    const one = of(1);
    const more = of(Math.sqrt(1.01));
    expect(one.chi).toBe(0);
    expect(one.omega).toBeGreaterThan(0);
    // μ/ħ = ω + Nχ with χ = 0: the same for both packets to round-off, so dμ/dN = 0
    expect(Math.abs(more.omega - one.omega)).toBeLessThan(1e-12 * one.omega);
    expect(stationaryAdiabaticChi(one)).toBe(0);
  });
});
