// Background expansion and linear growth against closed forms and published values.
import { describe, expect, it } from "vitest";
import { LcdmBackground } from "../../src/physics/cosmology/background.js";
import { parseAs } from "../../src/physics/units.js";
import { YEAR_S } from "../../src/physics/constants.js";

const GYR = 1e9 * YEAR_S;
// Planck 2018 (Planck Collaboration 2020, A&A 641, A6, Table 2, TT,TE,EE+lowE+lensing).
const H0_PER_GYR = parseAs("67.36 km/s/Mpc", "rate") * GYR;
const OMEGA_M = 0.3153;

describe("flat ΛCDM background", () => {
  const bg = new LcdmBackground({ hubble0: H0_PER_GYR, omegaMatter: OMEGA_M, omegaRadiation: 0 });
  const closedForm = (a: number) => {
    const ol = 1 - OMEGA_M;
    return (2 / (3 * H0_PER_GYR * Math.sqrt(ol))) * Math.asinh(Math.sqrt(ol / OMEGA_M) * a ** 1.5);
  };

  it("t(a) matches the matter+Λ closed form t = 2/(3H0√Ω_Λ) asinh(√(Ω_Λ/Ω_m) a^{3/2}) to 1e-8", () => {
    for (const a of [1e-4, 0.01, 0.1, 0.5, 1, 2]) {
      expect(Math.abs(bg.time(a) / closedForm(a) - 1)).toBeLessThan(1e-8);
    }
    // 13.80072 Gyr for the Planck 2018 H0 and Ω_m (closed form, computed independently);
    // the published age 13.797 ± 0.023 Gyr includes radiation and neutrinos, so it compares within its error only.
    expect(bg.time(1)).toBeCloseTo(13.80072, 4);
    expect(Math.abs(bg.time(1) - 13.797)).toBeLessThan(0.023);
  });

  it("a(t) inverts t(a) and the step factors ∫dt/a, ∫dt/a² match direct quadrature", () => {
    for (const a of [0.02, 0.3, 1]) expect(Math.abs(bg.scaleFactor(bg.time(a)) / a - 1)).toBeLessThan(1e-12);
    const t1 = bg.time(0.5);
    const t2 = bg.time(0.6);
    // compare with a fine midpoint sum in t (an independent quadrature of the same integrals)
    let sumKick = 0;
    let sumDrift = 0;
    const n = 20000;
    for (let i = 0; i < n; i++) {
      const a = bg.scaleFactor(t1 + ((i + 0.5) * (t2 - t1)) / n);
      sumKick += 1 / a;
      sumDrift += 1 / (a * a);
    }
    sumKick *= (t2 - t1) / n;
    sumDrift *= (t2 - t1) / n;
    expect(Math.abs(bg.kickFactor(t1, t2) / sumKick - 1)).toBeLessThan(1e-8);
    expect(Math.abs(bg.driftFactor(t1, t2) / sumDrift - 1)).toBeLessThan(1e-8);
  });

  it("growth factor gives D(1) = 0.787985 and D(0.5) = 0.478036 for Ω_m = 0.3153 (Heath 1977 integral, computed independently)", () => {
    expect(Math.abs(bg.growth(1) - 0.787985)).toBeLessThan(1e-5 * 0.787985);
    expect(Math.abs(bg.growth(0.5) - 0.478036)).toBeLessThan(1e-5 * 0.478036);
    // Heath's integral D = (5Ω_m/2) E(a) ∫₀^a da'/(a'E)³ evaluated here as an independent code path
    const e = (a: number) => Math.sqrt(OMEGA_M / a ** 3 + 1 - OMEGA_M);
    let integral = 0;
    const n = 200000;
    for (let i = 0; i < n; i++) {
      const a = (i + 0.5) / n;
      integral += 1 / (a * e(a)) ** 3 / n;
    }
    expect(bg.growth(1)).toBeCloseTo(2.5 * OMEGA_M * e(1) * integral, 6);
    // f = dlnD/dlna ≈ Ω_m(a)^0.55 (Linder 2005, PRD 72, 043529) to better than 1% today
    const omegaMa = OMEGA_M / (OMEGA_M + (1 - OMEGA_M));
    expect(Math.abs(bg.growthRate(1) / omegaMa ** 0.55 - 1)).toBeLessThan(0.01);
  });

  it("Einstein–de Sitter: a ∝ t^{2/3} with t0 = 2/(3H0), D = a", () => {
    const eds = new LcdmBackground({ hubble0: 1, omegaMatter: 1, omegaRadiation: 0 });
    expect(eds.time(1)).toBeCloseTo(2 / 3, 13);
    for (const a of [0.01, 0.3, 1, 4]) {
      expect(Math.abs(eds.scaleFactor((2 / 3) * a ** 1.5) / a - 1)).toBeLessThan(1e-12);
      expect(Math.abs(eds.growth(a) / a - 1)).toBeLessThan(1e-9);
      expect(eds.growthRate(a)).toBeCloseTo(1, 9);
    }
  });

  it("with radiation, the early universe expands as a ∝ t^{1/2}: t = a²/(2H0√Ω_r)", () => {
    const rad = new LcdmBackground({ hubble0: 1, omegaMatter: 0.3, omegaRadiation: 1e-4 });
    const a = 1e-7;
    expect(Math.abs(rad.time(a) / (a * a / (2 * Math.sqrt(1e-4))) - 1)).toBeLessThan(1e-3);
  });
});
