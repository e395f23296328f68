// The stationary-state χ_ad = (1/ħ) dμ/dN with a contact term (quantum/adiabatic.ts: the dilation estimate
// χ_ad = 2ω/N + 2χ + χ_SI[2 − 6(K + W + 3U)/(6K + 2W + 12U)]) against dμ/dN of the exact spherical ground states,
// computed independently: the stationary Gross–Pitaevskii–Poisson equations shot at central amplitudes ψ₀(1 ± 1e-3)
// (test/helpers/gpp-shooting.ts), dμ/dM by central differences. Code units ħ = m = 1, 4πG = 1, so N = M. The
// energies of the shot state follow from its μ, M and ∫ρ²: U = (g/2)∫ρ², Mμ = K + 2W + 2U and the virial theorem
// 2K + W + 3U = 0 (both exact for a stationary state).
import { describe, expect, it } from "vitest";
import { solitonBranchAdiabaticChi, stationaryAdiabaticChi } from "../../src/quantum/adiabatic.js";
import { shootSoliton } from "../helpers/gpp-shooting.js";

/** The formula's χ_ad and the gravity-only one (2ω/N + 2χ_grav) against dμ/dM of the shot ground states of ψ₀ = 1. */
function compare(g: number): { uOverW: number; formula: number; gravityOnly: number } {
  const at = (p: number) => shootSoliton(p, g, 0.01, 60);
  const s = at(1);
  const [up, down] = [at(1.001), at(0.999)];
  const reference = (up.mu - down.mu) / (up.mass - down.mass);
  const M = s.mass;
  const U = 0.5 * g * s.rho2;
  const K = -(s.mu * M + 4 * U) / 3;
  const W = -2 * K - 3 * U;
  const formula = stationaryAdiabaticChi({ omega: K / M, chi: (2 * W + 2 * U) / (M * M), chiContact: (2 * U) / (M * M), particles: M });
  const gravityOnly = stationaryAdiabaticChi({ omega: K / M, chi: (2 * W) / (M * M), particles: M });
  return { uOverW: U / Math.abs(W), formula: formula / reference - 1, gravityOnly: gravityOnly / reference - 1 };
}

describe("the adiabatic Kerr coefficient with a contact term, from the formula", () => {
  it("matches dμ/dN of shot ground states: exact to first order in g (error ∝ g²), within 1% between the limits", () => {
    const none = compare(0);
    expect(Math.abs(none.formula)).toBeLessThan(1e-6); // gravity alone: exact (measured 6e-8, the differences' error)
    const weak = compare(0.01); // U = 0.0033|W|
    const weaker = compare(0.1); // U = 0.032|W|
    expect(Math.abs(weak.formula)).toBeLessThan(1e-5); // measured 3.8e-6, where gravity alone misses by 1.6%
    expect(Math.abs(weak.gravityOnly)).toBeGreaterThan(0.01);
    expect(Math.abs(weaker.formula) / Math.abs(weak.formula)).toBeGreaterThan(30); // second order: 77 measured for 10× g
    const attractive = compare(-0.1); // U = −0.035|W|
    expect(Math.abs(attractive.formula)).toBeLessThan(1e-3); // measured 4.3e-4; gravity alone 16%
    for (const g of [1, 3]) {
      // U = 0.21|W| and 0.31|W| (near Thomas–Fermi, where U → |W|/3 and the formula becomes exact)
      const c = compare(g);
      expect(Math.abs(c.formula)).toBeLessThan(0.01); // measured 6.0e-3 and 3.0e-3; gravity alone 118% and 181%
      expect(Math.abs(c.gravityOnly)).toBeGreaterThan(1);
    }
  });

  it("is χ_SI without gravity (a field the box holds: μ = g n of a uniform field), and 0 with neither term", () => {
    expect(stationaryAdiabaticChi({ omega: 0, chi: 0.3, chiContact: 0.3, particles: 10 })).toBe(0.3);
    expect(stationaryAdiabaticChi({ omega: 0.5, chi: 0, particles: 10 })).toBe(0);
  });

  it("psibox estimate's form (3/2)χ_grav + 10χ_SI, from the soliton of gravity alone, is exact to first order in g", () => {
    // χ_grav and χ_SI of the g = 0 soliton of the same mass (mass scaling M → λM: ∫ρ² ∝ λ⁵, K ∝ λ³), against dμ/dM
    // of the shot ground states at g; the first-order error falls as g² (measured 7.3e-4 at g = 0.01, 6.5e-5 at 0.003)
    const s0 = shootSoliton(1, 0, 0.01, 60);
    const error = (g: number): number => {
      const at = (p: number) => shootSoliton(p, g, 0.01, 60);
      const [s, up, down] = [at(1), at(1.001), at(0.999)];
      const lambda = s.mass / s0.mass;
      const W0 = ((2 * s0.mu * s0.mass) / 3) * lambda ** 3; // W = −2K, Mμ = K + 2W = −3K at g = 0
      const U0 = 0.5 * g * s0.rho2 * lambda ** 5;
      const chi = solitonBranchAdiabaticChi((2 * W0) / s.mass ** 2, (2 * U0) / s.mass ** 2);
      return chi / ((up.mu - down.mu) / (up.mass - down.mass)) - 1;
    };
    const [coarse, fine] = [error(0.01), error(0.003)];
    expect(Math.abs(coarse)).toBeLessThan(2e-3);
    expect(Math.abs(coarse / fine)).toBeGreaterThan(6); // second order: (10/3)² = 11 for exact g² scaling
  });
});
