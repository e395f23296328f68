// Linear theory of a uniform self-interacting, self-gravitating field in a static box: a density mode of
// wavenumber k obeys δ'' = −ω²δ with ω² = (ħk²/2m)² + (g n/m)k² − 4πGρ (the Bogoliubov dispersion of a
// condensate, e.g. Pethick & Smith, "Bose–Einstein Condensation in Dilute Gases", plus the Jeans term of
// Khlopov, Malomed & Zeldovich 1985, MNRAS 215, 575). In code units (ħ/m = 1, 4πG = 1, contact coefficient g
// on the mass density) ω² = (k²/2)² + gρ̄k² − ρ̄.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { evolve } from "../../src/simulation/evolve.js";
import { fillComplex, modeAmplitude } from "../helpers/fields.js";

const rhoBar = 1000;
const eps = 1e-6;
const grid = new Grid([64], [1]);

/** A stepper holding ρ = ρ̄(1 + ε cos kz) at rest (δ'(0) = 0), with contact coefficient g. */
function perturbed(mode: number, g: number): SplitStepper {
  const s = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), "auto", 1, [], g);
  s.setState(fillComplex(grid, (_x, _y, z) => [Math.sqrt(rhoBar * (1 + eps * Math.cos(2 * Math.PI * mode * z))), 0]), 0);
  return s;
}

const omega2 = (k: number, g: number) => (k * k / 2) ** 2 + g * rhoBar * k * k - rhoBar;

describe("Bogoliubov plus Jeans dispersion with a contact term", () => {
  it("an attractive term makes a mode above the quantum Jeans scale grow at √(−ω²), to 1%", () => {
    const [mode, g] = [2, -0.1];
    const k = 2 * Math.PI * mode;
    expect(omega2(k, 0)).toBeGreaterThan(0); // stable without the contact term
    const gamma = Math.sqrt(-omega2(k, g));
    const s = perturbed(mode, g);
    for (const t of [1, 2, 3, 4].map((x) => x / gamma)) {
      evolve(s, { safety: 0.25, maxDlnA: 0.01, fixedStep: 0.01 / gamma }, { endTime: t, massTolerance: 1e-8, maxSteps: 1e6 });
      // δ(0) = ε, δ'(0) = 0 ⇒ δ(t) = ε cosh(γt)
      expect(Math.abs(Math.acosh(modeAmplitude(grid, s.psi, mode) / eps) / t / gamma - 1)).toBeLessThan(0.01);
    }
  });

  it("a repulsive term makes a Jeans-unstable mode oscillate at √ω², to 1%", () => {
    const [mode, g] = [1, 0.05];
    const k = 2 * Math.PI * mode;
    expect(omega2(k, 0)).toBeLessThan(0); // unstable without the contact term
    const omega = Math.sqrt(omega2(k, g));
    const s = perturbed(mode, g);
    let worst = 0;
    for (let i = 1; i <= 40; i++) {
      const t = ((i / 40) * 4 * Math.PI) / omega; // two periods
      evolve(s, { safety: 0.25, maxDlnA: 0.01, fixedStep: 0.005 / omega }, { endTime: t, massTolerance: 1e-8, maxSteps: 1e6 });
      worst = Math.max(worst, Math.abs(modeAmplitude(grid, s.psi, mode) / eps - Math.cos(omega * t)));
    }
    expect(worst).toBeLessThan(0.01);
  });
});
