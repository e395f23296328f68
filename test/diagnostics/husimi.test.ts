// The Husimi distribution (Widrow & Kaiser 1993): its momentum integral, its total, and the Wehrl entropy (Lieb 1978).
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { husimiAt, husimiImage1D, husimiWindowRange, wehrlEntropy } from "../../src/diagnostics/husimi.js";
import { fillComplex } from "../helpers/fields.js";
import { gaussianComplexField } from "../helpers/random-field.js";

/** Σ_y K_η²(y − x)|ψ(y)|² ΔV over every cell with minimum-image distances: |ψ|² smoothed by a normalised Gaussian of variance η² (computed independently, no cut-off). */
function smoothedDensity(grid: Grid, psi: Float64Array, point: number[], eta: number): number {
  const axes = [0, 1, 2].filter((ax) => grid.shape[ax]! > 1);
  let s = 0;
  const [n0, n1, n2] = grid.shape;
  let i = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++)
      for (let c = 0; c < n2; c++, i++) {
        const y = [a * grid.spacing[0], b * grid.spacing[1], c * grid.spacing[2]];
        let r2 = 0;
        axes.forEach((ax, j) => {
          let d = y[ax]! - point[j]!;
          d -= grid.extent[ax]! * Math.round(d / grid.extent[ax]!);
          r2 += d * d;
        });
        s += Math.pow(2 * Math.PI * eta * eta, -axes.length / 2) * Math.exp(-r2 / (2 * eta * eta)) * (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) * grid.cellVolume;
      }
  return s;
}

describe("Husimi distribution", () => {
  it("∫ f(x, k) dk = |ψ|² smoothed by a Gaussian of variance η² (Widrow & Kaiser 1993), to 1e-10, in 1D, 2D and 3D at points between cells", () => {
    const cases = [
      { grid: new Grid([256], [10]), eta: 0.3, point: [3.217] },
      { grid: new Grid([64, 64], [10, 10]), eta: 0.4, point: [3.217, 9.91] },
      { grid: new Grid([32, 32, 32], [10, 10, 10]), eta: 0.5, point: [0.13, 5.55, 7.02] },
    ];
    for (const { grid, eta, point } of cases) {
      const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 8), 7);
      const h = husimiAt(grid, psi, point, eta);
      const dk = h.dk.reduce((p, v) => p * v, 1);
      const integral = h.f.reduce((t, v) => t + v, 0) * dk;
      expect(Math.abs(integral / smoothedDensity(grid, psi, point, eta) - 1), `${grid.dims}D`).toBeLessThan(1e-10);
    }
  });

  it("the 1D x–k image integrates to the mass (∫∫ f = M), to 1e-10", () => {
    const grid = new Grid([512], [20]);
    const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 4), 8);
    const img = husimiImage1D(grid, psi, 0.4);
    let mass = 0;
    for (let i = 0; i < grid.size; i++) mass += (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) * grid.cellVolume;
    const dk = img.k[1]! - img.k[0]!;
    const total = img.f.reduce((t, v) => t + v, 0) * dk * grid.cellVolume;
    expect(Math.abs(total / mass - 1)).toBeLessThan(1e-10);
  });

  it("the Wehrl entropy is d for the coherent state matching the window (Lieb 1978), to 1e-6, in 1D and 2D", () => {
    const g1 = new Grid([256], [20]);
    const eta = 0.5;
    const coherent1 = fillComplex(g1, (_a, _b, x) => {
      const amp = 3 * Math.exp(-((x - 7.3) ** 2) / (4 * eta * eta));
      return [amp * Math.cos(2.1 * x), amp * Math.sin(2.1 * x)];
    });
    expect(Math.abs(wehrlEntropy(g1, coherent1, eta) - 1)).toBeLessThan(1e-6);
    const g2 = new Grid([64, 64], [20, 20]);
    const coherent2 = fillComplex(g2, (_a, x, y) => {
      const amp = Math.exp(-((x - 9.1) ** 2 + (y - 11.7) ** 2) / (4 * eta * eta));
      return [amp * Math.cos(1.3 * x - 0.7 * y), amp * Math.sin(1.3 * x - 0.7 * y)];
    });
    expect(Math.abs(wehrlEntropy(g2, coherent2, eta, 1) - 2)).toBeLessThan(1e-6);
  });

  it("the Wehrl entropy exceeds d for other states (Lieb 1978): a mismatched width, two packets, a random field", () => {
    const g = new Grid([256], [20]);
    const eta = 0.5;
    const narrow = fillComplex(g, (_a, _b, x) => [Math.exp(-((x - 10) ** 2) / (4 * 0.2 * 0.2)), 0]);
    const pair = fillComplex(g, (_a, _b, x) => [Math.exp(-((x - 6) ** 2) / (4 * eta * eta)) + Math.exp(-((x - 14) ** 2) / (4 * eta * eta)), 0]);
    const random = gaussianComplexField(g, (k2) => Math.exp(-k2 / 4), 9);
    const sNarrow = wehrlEntropy(g, narrow, eta);
    const sPair = wehrlEntropy(g, pair, eta);
    expect(sNarrow).toBeGreaterThan(1.05);
    // two well-separated coherent states: 1 + ln 2 (mixing entropy of two equal parts)
    expect(Math.abs(sPair - (1 + Math.LN2))).toBeLessThan(1e-6);
    expect(wehrlEntropy(g, random, eta)).toBeGreaterThan(2);
  });

  it("refuses a window narrower than a cell or wider than 1/16 of the box", () => {
    const g = new Grid([64, 64], [10, 10]);
    expect(husimiWindowRange(g)).toEqual({ min: 10 / 64, max: 10 / 16 });
    expect(() => husimiAt(g, new Float64Array(2 * g.size), [1, 1], 0.1)).toThrow(RangeError);
    expect(() => husimiAt(g, new Float64Array(2 * g.size), [1, 1], 0.7)).toThrow(RangeError);
  });
});
