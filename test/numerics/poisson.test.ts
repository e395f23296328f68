// Poisson solvers against closed-form potentials.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { IsolatedPoisson, PeriodicPoisson } from "../../src/fields/poisson.js";
import { selfCellWeight } from "../../src/fields/green.js";
import { erf, expint1 } from "../../src/math/special.js";
import { fillReal, maxAbs, maxAbsDiff } from "../helpers/fields.js";

describe("periodic Poisson", () => {
  it("solves a single Fourier mode exactly (spectral k²: φ = −cos(k·x)/k²)", () => {
    const grid = new Grid([16, 8, 32], [2, 1, 3]);
    const k = [2 * Math.PI * 3 / 2, 2 * Math.PI * 2 / 1, 2 * Math.PI * 5 / 3];
    const k2 = k[0]! ** 2 + k[1]! ** 2 + k[2]! ** 2;
    const src = fillReal(grid, (x, y, z) => 4 + Math.cos(k[0]! * x + k[1]! * y + k[2]! * z));
    const expected = fillReal(grid, (x, y, z) => -Math.cos(k[0]! * x + k[1]! * y + k[2]! * z) / k2);
    new PeriodicPoisson(grid).solveInPlace(src);
    expect(maxAbsDiff(src, expected)).toBeLessThan(1e-15 * grid.size);
  });

  it("uses the finite-difference symbol Σ(2 sin(k dx/2)/dx)² when asked", () => {
    const grid = new Grid([32], [1]);
    const k = 2 * Math.PI * 4;
    const dx = 1 / 32;
    const kfd2 = (2 * Math.sin((k * dx) / 2) / dx) ** 2;
    const src = fillReal(grid, (_x, _y, z) => Math.sin(k * z));
    new PeriodicPoisson(grid, "finite-difference").solveInPlace(src);
    const expected = fillReal(grid, (_x, _y, z) => -Math.sin(k * z) / kfd2);
    expect(maxAbsDiff(src, expected)).toBeLessThan(1e-15);
  });
});

describe("isolated Poisson (Hockney & Eastwood zero padding)", () => {
  const sigma = 1 / 12;
  const mass = 2.5;
  // Closed forms for a Gaussian of total mass M and width σ with ∇²φ = ρ (Newton's shell theorem, textbook):
  //   3D: φ = −M erf(r/(√2σ)) / (4πr)
  //   2D: φ = (M/2π) [ln r + E₁(r²/2σ²)/2]
  //   1D: φ = (M/2) [x erf(x/(√2σ)) + σ√(2/π) e^{−x²/2σ²}]
  const cases = [
    {
      dims: 3,
      cells: [32, 32, 32],
      density: (r2: number) => (mass / (2 * Math.PI * sigma * sigma) ** 1.5) * Math.exp(-r2 / (2 * sigma * sigma)),
      potential: (r: number) =>
        r === 0 ? (-mass / (4 * Math.PI)) * Math.sqrt(2 / Math.PI) / sigma : (-mass * erf(r / (Math.SQRT2 * sigma))) / (4 * Math.PI * r),
    },
    {
      dims: 2,
      cells: [64, 64],
      density: (r2: number) => (mass / (2 * Math.PI * sigma * sigma)) * Math.exp(-r2 / (2 * sigma * sigma)),
      potential: (r: number) =>
        r === 0
          ? (mass / (4 * Math.PI)) * (Math.log(2 * sigma * sigma) - 0.5772156649015329)
          : (mass / (2 * Math.PI)) * (Math.log(r) + 0.5 * expint1((r * r) / (2 * sigma * sigma))),
    },
    {
      dims: 1,
      cells: [64],
      density: (r2: number) => (mass / Math.sqrt(2 * Math.PI * sigma * sigma)) * Math.exp(-r2 / (2 * sigma * sigma)),
      potential: (r: number) =>
        (mass / 2) * (r * erf(r / (Math.SQRT2 * sigma)) + sigma * Math.sqrt(2 / Math.PI) * Math.exp(-(r * r) / (2 * sigma * sigma))),
    },
  ];
  for (const c of cases) {
    it(`matches the analytic potential of a Gaussian in ${c.dims}D to 1e-3`, () => {
      const grid = new Grid(c.cells, c.cells.map(() => 1));
      const centre = 0.5;
      const r2 = (x: number, y: number, z: number): number => {
        let s = (z - centre) ** 2;
        if (grid.shape[1] > 1) s += (y - centre) ** 2;
        if (grid.shape[0] > 1) s += (x - centre) ** 2;
        return s;
      };
      const field = fillReal(grid, (x, y, z) => c.density(r2(x, y, z)));
      const expected = fillReal(grid, (x, y, z) => c.potential(Math.sqrt(r2(x, y, z))));
      new IsolatedPoisson(grid).solveInPlace(field);
      const err = maxAbsDiff(field, expected) / maxAbs(expected);
      expect(err).toBeLessThan(1e-3);
    });
  }

  it("self-cell weight of the simple cubic lattice is the regularised lattice sum Z/(4πh), Z = −2.8372974794806 (from memory)", () => {
    expect(selfCellWeight([1, 1, 1]) * 4 * Math.PI).toBeCloseTo(-2.8372974794806, 11);
    expect(selfCellWeight([0.25, 0.25, 0.25]) * 4 * Math.PI * 0.25).toBeCloseTo(-2.8372974794806, 11);
    // 1D: w = h/12 follows from ζ(−1) = −1/12 (Euler–Maclaurin with a kink; Navot 1961).
    expect(selfCellWeight([0.3])).toBeCloseTo(0.025, 15);
  });
});
