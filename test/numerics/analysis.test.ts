// Diagnostics against known spectra, Parseval, exact profiles, the solver's own energies and a moving packet.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { LinearPower } from "../../src/physics/cosmology/power.js";
import { gaussianRandomField } from "../../src/initial-conditions/cosmological.js";
import { gaussian } from "../../src/initial-conditions/shapes.js";
import { SOLITON_MASS_CORE } from "../../src/config/resolve-initial.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { kineticEnergy } from "../../src/diagnostics/energies.js";
import { relaxedSoliton } from "../helpers/soliton.js";
import { coreProfile, densestPoints, densityPowerSpectrum, densityVariance, fitCoreProfile, kineticSplit, radialProfile } from "../../src/diagnostics/analysis.js";

describe("density power spectrum", () => {
  const h = 0.6736;
  const power = new LinearPower({ littleH: h, omegaMatter: 0.3153, omegaBaryon: 0.0493, cmbTemperature: 2.7255, spectralIndex: 0.9649, sigma8: 0.8111, transfer: "eisenstein-hu", m22: undefined });
  const grid = new Grid([64, 64, 64], [1, 1, 1]);
  const lengthMpc = 200 / h;
  const growth = 0.02; // small δ: ρ = ρ̄(1 + δ) keeps the input spectrum
  const fields = [11, 12, 13].map((seed) => gaussianRandomField(grid, power, { seed, fixedAmplitude: false, paired: false, growthRatio: growth, flowFactor: 0, lengthUnitMpc: lengthMpc }));
  const toPsi = (delta: Float64Array) => {
    const psi = new Float64Array(2 * delta.length);
    for (let i = 0; i < delta.length; i++) psi[2 * i] = Math.sqrt(1 + delta[i]!);
    return psi;
  };

  it("recovers the spectrum a field was built with, within the cosmic variance of each bin", () => {
    const runs = fields.map((f) => densityPowerSpectrum(grid, toPsi(f.delta)));
    const vol = lengthMpc ** 3;
    for (let b = 0; b < 20; b++) {
      const modes = runs.reduce((s, r) => s + r[b]!.modes, 0);
      const measured = runs.reduce((s, r) => s + r[b]!.power * r[b]!.modes, 0) / modes; // in box units
      const expected = (growth * growth * power.at(runs[0]![b]!.k / lengthMpc)) / vol;
      const sigma = 1 / Math.sqrt(modes / 2);
      expect(Math.abs(measured / expected - 1), `bin ${b}`).toBeLessThan(4 * sigma + 0.05);
    }
  });

  it("Parseval: Σ P(k)·modes / V equals the variance of δ to round-off", () => {
    const psi = toPsi(fields[0]!.delta);
    const bins = densityPowerSpectrum(grid, psi);
    const total = bins.reduce((s, b) => s + (b.power * b.modes) / grid.volume, 0);
    expect(Math.abs(total / densityVariance(psi) - 1)).toBeLessThan(1e-12);
  });
});

describe("soliton core fit", () => {
  it("recovers ρ_c and r_c of a synthetic core profile exactly", () => {
    const points = Array.from({ length: 40 }, (_, i) => ({ r: 0.05 * i, density: coreProfile(0.05 * i, 3.7e5, 0.41) }));
    const fit = fitCoreProfile(points, 1.2);
    expect(fit.rhoC / 3.7e5).toBeCloseTo(1, 9);
    expect(fit.rC / 0.41).toBeCloseTo(1, 9);
  });

  it("fits the imaginary-time soliton within 2% of its exact ρ_c and r_c (M r_c = 2.67941 ħ²/(Gm²), computed independently from the ground-state equation)", { timeout: 900_000 }, async () => {
    const { gs, grid, mass } = await relaxedSoliton(64); // the tests' shared fixture, centred in a unit box (computed once per code version)
    const peak = densestPoints(grid, gs.psi, 1, 4)[0]!;
    expect(peak.coords).toEqual([0.5, 0.5, 0.5]);
    const rc = SOLITON_MASS_CORE / mass;
    const fit = fitCoreProfile(radialProfile(grid, gs.psi, peak.coords, 0.3), 2 * rc);
    expect(Math.abs(fit.rC / rc - 1)).toBeLessThan(0.02);
    expect(Math.abs(fit.rhoC / peak.density - 1)).toBeLessThan(0.02);
  });
});

describe("kinetic energy split", () => {
  it("agrees with the solver's kinetic energy (two code paths) and splits a moving packet into ½Mv² and M(ħ/m)²d/(8σ²)", () => {
    const grid = new Grid([64, 64], [1, 1]);
    const sigma = 0.05;
    const v = [30, -20];
    const psi = gaussian(grid, 2.5, sigma, [0.5, 0.5], v);
    const split = kineticSplit(grid, psi, 1);
    const solver = kineticEnergy(grid, psi, 1, new ComplexFft(grid.shape), new Float64Array(psi.length));
    expect(Math.abs(split.kinetic / solver - 1)).toBeLessThan(1e-12);
    // textbook: a Gaussian packet with |ψ|² ∝ exp(−r²/2σ²) and wave vector k has K = M(k²/2 + d/(8σ²)), ħ/m = 1
    expect(split.bulk / (0.5 * 2.5 * (v[0]! ** 2 + v[1]! ** 2))).toBeCloseTo(1, 6);
    expect(split.quantum / ((2.5 * 2) / (8 * sigma * sigma))).toBeCloseTo(1, 6);
    expect(split.meanVelocity[0]).toBeCloseTo(30, 6);
    expect(split.meanVelocity[1]).toBeCloseTo(-20, 6);
    expect(split.velocityDispersion).toBeLessThan(1e-4);
  });
});
