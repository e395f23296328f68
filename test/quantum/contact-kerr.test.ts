// The contact part of the mode's Kerr coefficient, ħχ_SI = g∫|φ|⁴ (φ the mode normalised to one), against the
// closed form of a Gaussian mode, ∫|φ|⁴ = (4πσ²)^{−3/2} for |φ|² = (2πσ²)^{−3/2} e^{−r²/2σ²} (computed
// independently); the run's sidecar tracker from the step's sums and the snapshot path (modeCoefficients) agree;
// and `psibox estimate`'s soliton density constant against shooting.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { IsolatedPoisson } from "../../src/fields/poisson.js";
import { modeCoefficients } from "../../src/quantum/mode.js";
import { SidecarTracker } from "../../src/quantum/tracker.js";
import { SOLITON_MEAN_DENSITY } from "../../src/quantum/estimate.js";
import { fillComplex } from "../helpers/fields.js";
import { shootSoliton } from "../helpers/gpp-shooting.js";

describe("the contact Kerr coefficient", () => {
  // a Gaussian 2 cells wide in a 32³ box (8σ to each face): sampling and truncation errors of its grid sums are below 1e-14
  const grid = new Grid([32, 32, 32], [1, 1, 1]);
  const sigma = 2 / 32;
  const [mass, g, particleMass] = [50, -0.02, 1e-9];
  const amp = Math.sqrt(mass / Math.pow(2 * Math.PI * sigma * sigma, 1.5));
  const psi = fillComplex(grid, (x, y, z) => [amp * Math.exp(-((x - 0.5) ** 2 + (y - 0.5) ** 2 + (z - 0.5) ** 2) / (4 * sigma * sigma)), 0]);
  // code units (ħ/m = 1, so ħ = m): χ_SI = g m ∫|φ|⁴ with ∫|φ|⁴ = ∫ρ²/M²
  const closedForm = g * particleMass * Math.pow(4 * Math.PI * sigma * sigma, -1.5);

  it("of a normalised Gaussian mode is g∫|φ|⁴ = g (4πσ²)^{−3/2}, to 1e-10", () => {
    const c = modeCoefficients({ grid, psi, scaleFactor: 1, particleMass, gravity: new IsolatedPoisson(grid), contact: g });
    expect(Math.abs(c.chiContact / closedForm - 1)).toBeLessThan(1e-10);
    const plain = modeCoefficients({ grid, psi, scaleFactor: 1, particleMass, gravity: new IsolatedPoisson(grid) });
    expect(plain.chiContact).toBe(0);
    expect(Math.abs((c.chi - plain.chi) / closedForm - 1)).toBeLessThan(1e-10); // χ = χ_grav + χ_SI
  });

  it("is the same in the run's tracker, from the step's sums, and is reported beside the gravitational part", () => {
    let rho = 0;
    let rho2 = 0;
    for (let i = 0; i < psi.length; i += 2) {
      const r = psi[i]! ** 2 + psi[i + 1]! ** 2;
      rho += r;
      rho2 += r * r;
    }
    const sums = { rho, rho2, rhoPhi: -1e3 };
    const tracker = new SidecarTracker(particleMass, mass / particleMass, -10, 0, grid.cellVolume, { sums, kineticTilde: 1, a: 1 }, undefined, undefined, undefined, g);
    expect(Math.abs(tracker.chiContact / closedForm - 1)).toBeLessThan(1e-10);
    const gravityPart = (sums.rhoPhi * grid.cellVolume * particleMass) / mass ** 2;
    expect(Math.abs((tracker.rates.chiTilde - tracker.chiContact) / gravityPart - 1)).toBeLessThan(1e-10);
  });

  it("of the estimate's soliton uses ∫ρ² dV/M = 0.00135492 G³M⁴m⁶/ħ⁶, the soliton of self-gravity alone by shooting", () => {
    // units ħ = m = 1, 4πG = 1: G³M⁴ = M⁴/(4π)³
    const s = shootSoliton(1, 0, 0.005);
    expect(Math.abs(((s.rho2 / s.mass) * (4 * Math.PI) ** 3) / s.mass ** 4 / SOLITON_MEAN_DENSITY - 1)).toBeLessThan(1e-5);
  });
});
