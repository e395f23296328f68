// Vortices by phase winding: Gaussian random fields against Berry & Dennis (2000), planted zeros at known positions.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { findVortices } from "../../src/diagnostics/vortices.js";
import { HIT, orientationsOf, scanPlanes } from "../../src/diagnostics/vortex-scan.js";
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

  /** The pierced plaquettes by the definition, plaquette by plaquette: phases by atan2, differences wrapped into (−π, π], their sum / 2π rounded (computed independently). */
  function definitionCensus(grid: Grid, psi: Float64Array): string[] {
    const [n0, n1, n2] = grid.shape;
    const phase = (a: number, b: number, c: number) => {
      const i = ((a % n0) * n1 + (b % n1)) * n2 + (c % n2);
      return Math.atan2(psi[2 * i + 1]!, psi[2 * i]!);
    };
    const wrap = (d: number) => (d > Math.PI ? d - 2 * Math.PI : d <= -Math.PI ? d + 2 * Math.PI : d);
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
    return expected;
  }

  /** findVortices' points as definitionCensus writes them (the cell from the position: exact in 3D, where it is the plaquette's centre; the cell's floor in 2D). */
  function foundCensus(grid: Grid, psi: Float64Array): string[] {
    const axes = grid.dims === 2 ? [1, 2] : [0, 1, 2];
    return findVortices(grid, psi).points.map((pt) => `${pt.position.map((x, k) => Math.floor(x / grid.spacing[axes[k]!]!))} ${pt.normal < 0 ? -1 : axes[pt.normal]} ${pt.charge}`);
  }

  /** The scan's pierced plaquettes as definitionCensus writes them (2D positions are refined within the plaquette, so the cell is taken from the scan). */
  function scannedCensus(grid: Grid, psi: Float64Array): string[] {
    const [, n1, n2] = grid.shape;
    const orientations = orientationsOf(grid);
    return scanPlanes(grid, psi).flatMap((hits, o) => {
      const rows: string[] = [];
      for (let k = 0; k < hits.length; k += HIT) {
        const i = hits[k]!;
        const at = [Math.floor(i / (n1 * n2)), Math.floor(i / n2) % n1, i % n2];
        rows.push(`${grid.dims === 2 ? at.slice(1) : at} ${orientations[o]![2]} ${hits[k + 1]}`);
      }
      return rows;
    });
  }

  const shapes = [[[16, 8, 32], [1, 0.6, 1.6]], [[16, 32], [1, 1.8]], [[4, 4, 8], [1, 1, 1]]] as const;

  it("the plane-by-plane scan lists exactly the plaquettes whose phase winding is nonzero, in order (the definition, computed independently)", () => {
    for (const [cells, lengths] of shapes) {
      const grid = new Grid([...cells], [...lengths]);
      const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 200), 7);
      const expected = definitionCensus(grid, psi);
      if (grid.size > 64) expect(expected.length).toBeGreaterThan(10);
      expect(foundCensus(grid, psi)).toEqual(expected);
    }
  });

  it("the same where the phases are delicate: exact zeros of either sign, NaN, infinities, values near underflow and overflow, neighbours nearly opposite or on the axes (the definition, computed independently)", () => {
    const special = [0, -0, NaN, Infinity, -Infinity, 1e-300, -1e-300, 5e-324, 1e300];
    for (const [cells, lengths] of shapes) {
      const grid = new Grid([...cells], [...lengths]);
      const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 200), 9);
      let seed = 5;
      const rand = () => (seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 4294967296;
      for (let i = 0; i < grid.size; i++) {
        const r = rand();
        if (r < 0.05) [psi[2 * i], psi[2 * i + 1]] = [special[Math.floor(rand() * special.length)]!, special[Math.floor(rand() * special.length)]!];
        else if (r < 0.1) [psi[2 * i], psi[2 * i + 1]] = [rand() < 0.5 ? 0 : -0, psi[2 * i + 1]!];
        else if (r < 0.15) [psi[2 * i], psi[2 * i + 1]] = [psi[2 * i]!, rand() < 0.5 ? 0 : -0];
        else if (r < 0.35 && i > 0) {
          // the previous cell turned by π and a hair (within 1e-12 of opposite, or exactly opposite)
          const [re, im, t] = [psi[2 * i - 2]!, psi[2 * i - 1]!, Math.PI + (rand() - 0.5) * 4e-12 * Math.floor(rand() * 3)];
          [psi[2 * i], psi[2 * i + 1]] = [re * Math.cos(t) - im * Math.sin(t), re * Math.sin(t) + im * Math.cos(t)];
        } else if (r < 0.4) [psi[2 * i], psi[2 * i + 1]] = [psi[2 * i]! * 1e-305, psi[2 * i + 1]! * 1e-305];
      }
      expect(scannedCensus(grid, psi)).toEqual(definitionCensus(grid, psi));
    }
  });

  it("1D fields are refused", () => {
    expect(() => findVortices(new Grid([16], [1]), new Float64Array(32))).toThrow(RangeError);
  });
});
