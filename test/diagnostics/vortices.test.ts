// Vortices by phase winding: Gaussian random fields against Berry & Dennis (2000), planted zeros at known positions.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { findVortices } from "../../src/diagnostics/vortices.js";
import { fillComplex } from "../helpers/fields.js";
import { gaussianComplexField, meanK2 } from "../helpers/random-field.js";

// Resolution criterion (ours, measured): √⟨k²⟩ Δx ≤ 0.35, i.e. at least 18 cells per 2π/√⟨k²⟩. Coarser sampling merges
// close vortex pairs inside one plaquette and undercounts (−3% at 0.5, −5% at 0.7 in our runs).
describe("vortices of Gaussian random fields", () => {
  const kc = 0.25; // spectrum e^{−k²/2kc²} with Δx = 1: √⟨k²⟩ Δx = √2 kc = 0.354
  it("2D: ⟨k²⟩/(4π) vortices per unit area (Berry & Dennis 2000, Proc. R. Soc. A 456, 2059; from memory) within 3%, net charge zero", () => {
    const grid = new Grid([512, 512], [512, 512]);
    const spectrum = (k2: number) => Math.exp(-k2 / (2 * kc * kc));
    expect(Math.sqrt(meanK2(grid, spectrum))).toBeLessThanOrEqual(0.36);
    const census = findVortices(grid, gaussianComplexField(grid, spectrum, 21));
    const expected = meanK2(grid, spectrum) / (4 * Math.PI);
    expect(census.netCharge).toBe(0);
    expect(census.positive).toBeGreaterThan(1000);
    expect(Math.abs(census.density / expected - 1)).toBeLessThan(0.03);
  });

  it("3D: line length ⟨k²⟩/(3π) per unit volume (Berry & Dennis 2000; from memory) within 3%, net flux zero through every orientation", () => {
    const kc3 = 0.2; // √⟨k²⟩ Δx = √3 kc = 0.35
    const grid = new Grid([128, 128, 128], [128, 128, 128]);
    const spectrum = (k2: number) => Math.exp(-k2 / (2 * kc3 * kc3));
    expect(Math.sqrt(meanK2(grid, spectrum))).toBeLessThanOrEqual(0.35);
    const census = findVortices(grid, gaussianComplexField(grid, spectrum, 22));
    const expected = meanK2(grid, spectrum) / (3 * Math.PI);
    expect(Math.abs(census.density / expected - 1)).toBeLessThan(0.03);
    for (const normal of [0, 1, 2]) expect(census.points.filter((p) => p.normal === normal).reduce((s, p) => s + p.charge, 0)).toBe(0);
  });
});

describe("planted vortices", () => {
  it("2D: the four zeros of sin(2π(x−x₀)/L) + i sin(2π(y−y₀)/L) are found at their positions (to 1e-3 cells) with charges +1, −1, −1, +1 (exact zeros of the field)", () => {
    const L = 10;
    const grid = new Grid([64, 64], [L, L]);
    const [x0, y0] = [3.1377, 1.2391];
    const k = (2 * Math.PI) / L;
    const psi = fillComplex(grid, (_a, x, y) => [Math.sin(k * (x - x0)), Math.sin(k * (y - y0))]);
    const census = findVortices(grid, psi);
    expect(census.points.length).toBe(4);
    expect(census.netCharge).toBe(0);
    const h = L / 64;
    for (const [dx, dy, charge] of [[0, 0, 1], [L / 2, 0, -1], [0, L / 2, -1], [L / 2, L / 2, 1]] as const) {
      const want = [(x0 + dx) % L, (y0 + dy) % L];
      const found = census.points.find((p) => Math.hypot(p.position[0]! - want[0]!, p.position[1]! - want[1]!) < h);
      expect(found, `vortex at ${want}`).toBeDefined();
      expect(Math.abs(found!.position[0]! - want[0]!) / h).toBeLessThan(1e-3);
      expect(Math.abs(found!.position[1]! - want[1]!) / h).toBeLessThan(1e-3);
      expect(found!.charge).toBe(charge);
    }
  });

  it("3D: straight lines along (1, 0, 1) have total length 4√2 L (the isotropic count would say 4·4L/3, 6% short) to 1%", () => {
    const L = 4;
    const grid = new Grid([32, 32, 32], [L, L, L]);
    const k = (2 * Math.PI) / L;
    const psi = fillComplex(grid, (x, y, z) => [Math.sin(k * (x - z) + 0.3), Math.sin(k * y + 0.7)]);
    const census = findVortices(grid, psi);
    expect(Math.abs(census.lineLength / (4 * Math.SQRT2 * L) - 1)).toBeLessThan(0.01);
    expect(census.netCharge).toBe(0);
  });

  it("the plane-by-plane scan lists exactly the plaquettes whose phase winding is nonzero, in order (a direct count over every plaquette, computed independently)", () => {
    for (const [cells, lengths] of [[[16, 8, 32], [1, 0.6, 1.6]], [[16, 32], [1, 1.8]]] as const) {
      const grid = new Grid([...cells], [...lengths]);
      const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 200), 7);
      const [n0, n1, n2] = grid.shape;
      const phase = (a: number, b: number, c: number) => {
        const i = ((a % n0) * n1 + (b % n1)) * n2 + (c % n2);
        return Math.atan2(psi[2 * i + 1]!, psi[2 * i]!);
      };
      const wrap = (d: number) => d - 2 * Math.PI * Math.round(d / (2 * Math.PI));
      const expected: string[] = [];
      const orientations = grid.dims === 2 ? [[1, 2, -1]] : [[1, 2, 0], [2, 0, 1], [0, 1, 2]];
      for (const [p, q, normal] of orientations)
        for (let a = 0; a < n0; a++)
          for (let b = 0; b < n1; b++)
            for (let c = 0; c < n2; c++) {
              const at = [a, b, c];
              const step = (x: number[], ax: number) => x.map((v, k) => (k === ax ? v + 1 : v));
              const corners = [at, step(at, p!), step(step(at, p!), q!), step(at, q!)].map((x) => phase(x[0]!, x[1]!, x[2]!));
              const w = corners.reduce((sum, f, k) => sum + wrap(corners[(k + 1) % 4]! - f), 0);
              const charge = Math.round(w / (2 * Math.PI));
              if (charge !== 0) expected.push(`${grid.dims === 2 ? [b, c] : at} ${normal} ${charge}`);
            }
      const census = findVortices(grid, psi);
      const axes = grid.dims === 2 ? [1, 2] : [0, 1, 2];
      const found = census.points.map((pt) => `${pt.position.map((x, k) => Math.floor(x / grid.spacing[axes[k]!]!))} ${pt.normal < 0 ? -1 : axes[pt.normal]} ${pt.charge}`);
      expect(expected.length).toBeGreaterThan(10);
      expect(found).toEqual(expected);
    }
  });

  it("1D fields are refused", () => {
    expect(() => findVortices(new Grid([16], [1]), new Float64Array(32))).toThrow(RangeError);
  });
});
