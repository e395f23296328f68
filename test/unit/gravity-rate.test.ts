// The rate of the sidecar's gravitational breakdown estimate: none without gravity; in an expanding box the
// linear growth rate f H, which is H in an Einstein–de Sitter universe (D ∝ a: Peebles 1980, The Large-Scale
// Structure of the Universe) and in flat ΛCDM f H from the growing mode D ∝ H ∫da/(aH)³ (Heath 1977, MNRAS
// 179, 351; computed independently here by quadrature); √(4πG ρ_eff) in a static box.
import { describe, expect, it } from "vitest";
import { gravityRate } from "../../src/quantum/gravity-rate.js";
import { makeBackground } from "../../src/physics/cosmology/background.js";

const H0 = 0.07;

describe("gravitational breakdown rate", () => {
  it("is 0 without gravity, whatever the density", () => {
    const r = gravityRate(false, makeBackground({ kind: "static" }));
    expect(r.rate(1e6, 1)).toBe(0);
    expect(r.label).toMatch(/gravity is off/);
  });

  it("is H in an Einstein–de Sitter box, not √(4πGρ̄) = √(3/2) H", () => {
    const eds = makeBackground({ kind: "lcdm", hubble0: H0, omegaMatter: 1, omegaRadiation: 0, littleH: 0.7 });
    const r = gravityRate(true, eds);
    for (const a of [0.01, 0.1, 0.5, 1]) {
      const h = eds.hubble(a);
      const rhoBar = 1.5 * h * h; // 4πGρ̄ = (3/2) H² (code units, 4πG = 1)
      expect(Math.abs(r.rate(rhoBar, a) / h - 1)).toBeLessThan(1e-4);
    }
  });

  it("is f H in flat ΛCDM with f from Heath's integral, to 1e-4", () => {
    const bg = makeBackground({ kind: "lcdm", hubble0: H0, omegaMatter: 0.3, omegaRadiation: 0, littleH: 0.7 });
    const r = gravityRate(true, bg);
    const E = (a: number) => Math.sqrt(0.3 / a ** 3 + 0.7);
    for (const a of [0.2, 0.5, 1]) {
      // I(a) = ∫₀ᵃ dx/(x E(x))³ by the midpoint rule in u = x^(5/2) (the integrand ∝ x^(3/2) near 0)
      const n = 20000;
      let I = 0;
      for (let i = 0; i < n; i++) {
        const x = (((i + 0.5) / n) * a ** 2.5) ** 0.4;
        I += (1 / (x * E(x)) ** 3) * (0.4 * x ** -1.5) * (a ** 2.5 / n);
      }
      const dlnE = (-1.5 * 0.3) / a ** 3 / E(a) ** 2; // d ln E / d ln a
      const f = dlnE + a / (a * E(a)) ** 3 / I;
      expect(Math.abs(r.rate(0, a) / (f * bg.hubble(a)) - 1)).toBeLessThan(1e-4);
    }
  });

  it("is √(4πG ρ_eff) in a static box", () => {
    expect(gravityRate(true, makeBackground({ kind: "static" })).rate(9, 1)).toBe(3);
  });
});
