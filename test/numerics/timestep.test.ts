// chooseTimestep against the phase limits it states: the kinetic phase of the grid's corner mode
// k²_max D/2 ≤ 2πs, the potential phase (max φ − min φ) K ≤ πs, and Δ ln a ≤ max_dln_a, with D = ∫dt/a² and
// K = ∫dt/a over the step. References: the corner wavenumber Σ(πN/L)² and a single mode's potential
// φ = −ρ̄ε cos(kx)/k² (∇²φ = ρ − ρ̄, code units 4πG = 1), both analytic; H(a) = H0 √(Ω_m a⁻³ + Ω_Λ).
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { makeBackground, type Background } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { chooseTimestep } from "../../src/integrators/timestep.js";

const N = 64;
const L = 2;

/** A stepper on a 1D periodic box of N cells and side L holding ρ = ρ̄(1 + ε cos 2πx/L) at time t. */
function planeWave(background: Background, rhoBar: number, eps: number, t: number): SplitStepper {
  const grid = new Grid([N], [L]);
  const s = new SplitStepper(grid, background, makePoissonSolver(grid, "periodic"), "js");
  const psi = new Float64Array(2 * N);
  for (let i = 0; i < N; i++) psi[2 * i] = Math.sqrt(rhoBar * (1 + eps * Math.cos((2 * Math.PI * i) / N)));
  s.setState(psi, t);
  return s;
}

const kMax2 = (Math.PI * N / L) ** 2; // the corner (Nyquist) mode in 1D, analytic
const k = (2 * Math.PI) / L;

describe("chooseTimestep", () => {
  const bg = makeBackground({ kind: "static" });

  it("kinetic limit: the corner mode turns by exactly 2πs in one step (static box, weak potential)", () => {
    for (const safety of [0.05, 0.25, 1]) {
      const s = planeWave(bg, 1e-3, 0.1, 0);
      const { dt, limiter } = chooseTimestep(s, { safety, maxDlnA: 0.01 });
      expect(limiter).toBe("kinetic");
      expect((kMax2 * bg.driftFactor(0, dt)) / 2 / (2 * Math.PI * safety)).toBeCloseTo(1, 12);
    }
  });

  it("potential limit: the potential's range times K is exactly πs (static box, deep potential)", () => {
    const rhoBar = 1e5;
    const eps = 0.3;
    const range = (2 * rhoBar * eps) / (k * k); // max − min of −ρ̄ε cos(kx)/k² on a grid holding x = 0 and x = L/2
    for (const safety of [0.1, 0.5]) {
      const s = planeWave(bg, rhoBar, eps, 0);
      const { dt, limiter } = chooseTimestep(s, { safety, maxDlnA: 0.01 });
      expect(limiter).toBe("potential");
      expect((range * bg.kickFactor(0, dt)) / (Math.PI * safety)).toBeCloseTo(1, 10);
      expect((kMax2 * bg.driftFactor(0, dt)) / 2).toBeLessThan(2 * Math.PI * safety); // the other limit holds too
    }
  });

  it("a fixed step overrides the phase rules", () => {
    expect(chooseTimestep(planeWave(bg, 1e4, 0.3, 0), { safety: 0.25, maxDlnA: 0.01, fixedStep: 0.125 })).toEqual({ dt: 0.125, limiter: "fixed" });
  });

  describe("in flat ΛCDM (Ω_m = 0.3, H0 = 50 in code units)", () => {
    const H0 = 50;
    const lcdm = makeBackground({ kind: "lcdm", hubble0: H0, omegaMatter: 0.3, omegaRadiation: 0, littleH: 0.7 });
    const hubble = (a: number) => H0 * Math.sqrt(0.3 / a ** 3 + 0.7);

    it("expansion limit: H(a) Δt = max_dln_a at the step's start, and Δ ln a over the step matches it to O(Δ ln a²)", () => {
      const t = lcdm.time(0.5);
      const s = planeWave(lcdm, 1e-6, 0.01, t);
      const { dt, limiter } = chooseTimestep(s, { safety: 1, maxDlnA: 0.001 });
      expect(limiter).toBe("expansion");
      expect((hubble(0.5) * dt) / 0.001).toBeCloseTo(1, 8);
      expect(Math.abs(Math.log(lcdm.scaleFactor(t + dt) / 0.5) - 0.001)).toBeLessThan(0.001 ** 2);
    });

    it("kinetic limit: the corner phase with D = ∫dt/a² stays at or below 2πs and within 2HΔt of it", () => {
      for (const a of [0.01, 0.2, 1]) {
        const t = lcdm.time(a);
        const s = planeWave(lcdm, 1e-9, 0.01, t);
        const { dt, limiter } = chooseTimestep(s, { safety: 0.25, maxDlnA: 10 });
        expect(limiter).toBe("kinetic");
        const phase = (kMax2 * lcdm.driftFactor(t, t + dt)) / 2;
        expect(phase).toBeLessThanOrEqual(2 * Math.PI * 0.25 * (1 + 1e-12));
        expect(phase).toBeGreaterThan(2 * Math.PI * 0.25 * (1 - 2 * hubble(a) * dt));
      }
    });
  });
});
