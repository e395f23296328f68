// Granules of random-phase fields with a Maxwellian velocity distribution (Bar-Or, Fouvry & Tremaine 2019).
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { granuleStats } from "../../src/diagnostics/granules.js";
import { lnGamma } from "../../src/math/special.js";
import { gaussianComplexField } from "../helpers/random-field.js";

// A random-phase field whose velocities (k = m v/ħ, a = 1) follow a Maxwellian of 1D dispersion σ: |ψ_k|² ∝ e^{−k²/2σ²}.
const maxwellian = (sigma: number) => (k2: number) => Math.exp(-k2 / (2 * sigma * sigma));

describe("granules", () => {
  const sigma = 0.25; // ħ/(mσ) = 4 cells
  const grid = new Grid([256, 256], [256, 256]);
  const stats = [31, 32, 33, 34, 35, 36].map((seed) => granuleStats(grid, gaussianComplexField(grid, maxwellian(sigma), seed), 1));

  it("the density PDF is exponential, e^{−ρ/ρ̄}/ρ̄ (Bar-Or, Fouvry & Tremaine 2019; from memory, re-derived), within 4 standard errors of six realisations in every bin", () => {
    for (let b = 0; b < 30; b++) {
      const values = stats.map((s) => s.pdf[b]!.pdf);
      const mean = values.reduce((t, v) => t + v, 0) / values.length;
      const sd = Math.sqrt(values.reduce((t, v) => t + (v - mean) ** 2, 0) / (values.length - 1));
      const se = sd / Math.sqrt(values.length);
      const expected = stats[0]!.pdf[b]!.exponential;
      expect(Math.abs(mean - expected), `bin ${b}: ${mean} vs ${expected} ± ${se}`).toBeLessThan(4 * se + 1e-4 * expected);
    }
    // a Gamma law of shape 1 is the exponential law
    for (const s of stats) expect(Math.abs(s.gammaShape - 1)).toBeLessThan(0.1);
  });

  it("the correlation length is ħ/(mσ) to 5% (Bar-Or, Fouvry & Tremaine 2019; from memory, re-derived), with σ the input dispersion", () => {
    for (const s of stats) {
      expect(Math.abs(s.velocityDispersion / sigma - 1)).toBeLessThan(0.02);
      expect(Math.abs(s.correlationLength / (1 / sigma) - 1)).toBeLessThan(0.05);
      expect(Math.abs(s.correlationLength / s.predictedLength - 1)).toBeLessThan(0.05);
    }
  });

  it("the quasi-particle mass ρ̄∫ξ d²r matches π ρ̄ (ħ/mσ)² (the 2D form of π^{3/2} ρ̄ (ħ/mσ)³; re-derived) to 10%", () => {
    for (const s of stats) expect(Math.abs(s.quasiParticleMass / s.predictedQuasiParticleMass - 1)).toBeLessThan(0.1);
  });

  it("3D: the quasi-particle mass is π^{3/2} ρ̄ (ħ/mσ)³ (Bar-Or, Fouvry & Tremaine 2019; from memory) to 10%, at a = 0.5 (comoving length ħ/(m a σ))", () => {
    const g3 = new Grid([64, 64, 64], [64, 64, 64]);
    const a = 0.5;
    const s = granuleStats(g3, gaussianComplexField(g3, maxwellian(0.3), 41), a);
    expect(Math.abs(s.velocityDispersion / (0.3 / a) - 1)).toBeLessThan(0.03);
    expect(Math.abs(s.correlationLength / (1 / 0.3) - 1)).toBeLessThan(0.05);
    expect(Math.abs(s.quasiParticleMass / s.predictedQuasiParticleMass - 1)).toBeLessThan(0.1);
  });

  it("a correlation length beyond a sixth of the box leaves the quasi-particle mass unmeasured: ξ sums to zero over a periodic box (⟨δ⟩ = 0; computed independently)", () => {
    const g = new Grid([64, 64], [64, 64]);
    const psi = gaussianComplexField(g, maxwellian(1 / 20), 61);
    const s = granuleStats(g, psi, 1);
    expect(s.correlationLength).toBeGreaterThan(64 / 6);
    expect(s.quasiParticleMass).toBeNaN();
    expect(s.predictedQuasiParticleMass).toBeGreaterThan(0);
    // the sum the ball would have taken: the whole box's ΔV Σ ξ = ΔV Σ δ(x) Σ δ(x + r) / N = 0
    const rho = Array.from({ length: g.size }, (_, i) => psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2);
    const mean = rho.reduce((t, v) => t + v, 0) / g.size;
    expect(Math.abs(rho.reduce((t, v) => t + (v / mean - 1), 0))).toBeLessThan(1e-9 * g.size);
  });

  it("two independent fields give a Gamma PDF of shape 2 (the sum of two exponential variables)", () => {
    const g = new Grid([256, 256], [256, 256]);
    const a1 = gaussianComplexField(g, maxwellian(sigma), 51);
    const a2 = gaussianComplexField(g, maxwellian(sigma), 52);
    // |ψ₁|² + |ψ₂|² as one field: ψ = (|ψ₁|² + |ψ₂|²)^{1/2}
    const psi = new Float64Array(a1.length);
    for (let i = 0; i < g.size; i++) psi[2 * i] = Math.sqrt(a1[2 * i]! ** 2 + a1[2 * i + 1]! ** 2 + a2[2 * i]! ** 2 + a2[2 * i + 1]! ** 2);
    const s = granuleStats(g, psi, 1);
    expect(Math.abs(s.gammaShape - 2)).toBeLessThan(0.15);
    // the Gamma law of the measured shape describes the PDF better than the exponential law does
    const misfit = (law: "gamma" | "exponential") => s.pdf.slice(0, 20).reduce((t, b) => t + (b.pdf - b[law]) ** 2, 0);
    expect(misfit("gamma")).toBeLessThan(0.05 * misfit("exponential"));
  });

  it("ln Γ: Γ(1/2) = √π, Γ(5) = 24, Γ(10.5) = 1133278.3889487854, Γ(40) = 39! (textbook values) to 1e-13", () => {
    expect(Math.abs(lnGamma(0.5) - 0.5 * Math.log(Math.PI))).toBeLessThan(1e-13);
    expect(Math.abs(lnGamma(5) - Math.log(24))).toBeLessThan(1e-13);
    expect(Math.abs(lnGamma(10.5) / Math.log(1133278.3889487854) - 1)).toBeLessThan(1e-13);
    let f = 0;
    for (let i = 2; i < 40; i++) f += Math.log(i);
    expect(Math.abs(lnGamma(40) / f - 1)).toBeLessThan(1e-13);
  });
});
