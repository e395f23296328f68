// The kinetic energy split (Nore, Abid & Brachet 1997) against exact fields and the solver's own K.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { kineticEnergy } from "../../src/diagnostics/energies.js";
import { energySplit } from "../../src/diagnostics/energy-split.js";
import { fillComplex } from "../helpers/fields.js";
import { gaussianComplexField } from "../helpers/random-field.js";

/**
 * The split computed independently, mode by mode over the whole grid: each component u_j and w_j of every
 * axis transformed on its own by fft.js (no packing, no half space), |k̂·W|² from the three W_j at each mode.
 * Returns the quantum, incompressible and compressible totals and the compressible energy per |k| shell (k_F wide).
 */
function directSplit(grid: Grid, psi: Float64Array, a: number): { quantum: number; incompressible: number; compressible: number; shells: Map<number, number> } {
  const fft = new ComplexFft(grid.shape);
  const n = grid.size;
  const perMode = ((0.5 / (a * a)) * grid.cellVolume) / n;
  const spec = Float64Array.from(psi);
  fft.forward(spec);
  const W: Float64Array[] = [];
  let quantum = 0;
  let flow = 0;
  for (const ax of [0, 1, 2] as const) {
    if (grid.shape[ax] === 1) continue;
    const d = new Float64Array(2 * n);
    grid.forEachMode((p, ...k) => {
      // the derivative's wavenumber (k[ax]; its index k[3 + ax]), zero on the Nyquist plane
      const kk = k[3 + ax] === grid.shape[ax] / 2 ? 0 : k[ax]!;
      d[p] = -kk * spec[p + 1]!;
      d[p + 1] = kk * spec[p]!;
    });
    fft.inverse(d);
    const u = new Float64Array(2 * n);
    const w = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      const [re, im, gr, gi] = [psi[2 * i]!, psi[2 * i + 1]!, d[2 * i]!, d[2 * i + 1]!];
      const s = Math.sqrt(re * re + im * im);
      u[2 * i] = (re * gr + im * gi) / s;
      w[2 * i] = (re * gi - im * gr) / s;
    }
    fft.forward(u);
    fft.forward(w);
    for (let i = 0; i < 2 * n; i++) {
      quantum += u[i]! ** 2 * perMode;
      flow += w[i]! ** 2 * perMode;
    }
    W.push(w);
  }
  let compressible = 0;
  const shells = new Map<number, number>();
  const axes = [0, 1, 2].filter((ax) => grid.shape[ax]! > 1);
  const kF = (2 * Math.PI) / Math.max(...axes.map((ax) => grid.extent[ax]!));
  grid.forEachMode((p, ...k) => {
    const k2 = k[0]! ** 2 + k[1]! ** 2 + k[2]! ** 2;
    if (k2 === 0) return;
    let dr = 0;
    let di = 0;
    axes.forEach((ax, j) => {
      dr += k[ax]! * W[j]![p]!;
      di += k[ax]! * W[j]![p + 1]!;
    });
    const e = ((dr * dr + di * di) / k2) * perMode;
    compressible += e;
    const b = Math.round(Math.sqrt(k2) / kF);
    shells.set(b, (shells.get(b) ?? 0) + e);
  });
  return { quantum, incompressible: flow - compressible, compressible, shells };
}

function solverK(grid: Grid, psi: Float64Array, a: number): number {
  return kineticEnergy(grid, psi, a, new ComplexFft(grid.shape), new Float64Array(psi.length));
}

describe("kinetic energy split", () => {
  it("quantum + incompressible + compressible (+ the Nyquist planes) = K of the solver to 1e-10, for random fields full of vortices in 2D and 3D (an identity: |∇ψ|² = |Re ψ*∇ψ|²/ρ + |Im ψ*∇ψ|²/ρ, Helmholtz parts orthogonal)", () => {
    for (const [cells, a, width] of [[[64, 64], 1, 400], [[16, 16, 16], 0.3, 50], [[32, 32], 1, 1e5]] as const) {
      const grid = new Grid([...cells], cells.map(() => 1));
      const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / width), 5);
      const s = energySplit(grid, psi, a);
      const K = solverK(grid, psi, a);
      expect(Math.abs((s.quantum + s.incompressible + s.compressible + s.unresolved) / K - 1)).toBeLessThan(1e-10);
      // a resolved field has (almost) nothing in the Nyquist planes; white noise (the last) has a lot
      if (width < 1e4) expect(s.unresolved / K).toBeLessThan(1e-10);
      else expect(s.unresolved / K).toBeGreaterThan(0.1);
      // all three parts are present in such a field
      for (const part of [s.quantum, s.incompressible, s.compressible]) expect(part / K).toBeGreaterThan(0.05);
      // the shells hold everything but the uniform flow (k = 0)
      const shellSum = s.spectra.reduce((t, b) => t + b.quantum + b.incompressible + b.compressible, 0);
      expect(Math.abs((shellSum + s.zeroMode + s.unresolved) / K - 1)).toBeLessThan(1e-10);
    }
  });

  it("the parts and the compressible spectrum equal a direct mode-by-mode Helmholtz projection (computed independently, every component transformed on its own) to 1e-12, with much energy on the Nyquist planes", () => {
    for (const cells of [[8, 16, 4], [16, 8], [8, 4, 16]]) {
      const grid = new Grid(cells, cells.map((_, i) => 1 + 0.5 * i));
      // white noise on a mean: every mode, the Nyquist planes' included, carries flow
      const psi = gaussianComplexField(grid, () => 1, 11);
      for (let i = 0; i < grid.size; i++) psi[2 * i] = psi[2 * i]! + 1;
      const s = energySplit(grid, psi, 0.8);
      const ref = directSplit(grid, psi, 0.8);
      for (const part of ["quantum", "incompressible", "compressible"] as const) expect(Math.abs(s[part] - ref[part]) / s.kinetic).toBeLessThan(1e-12);
      const kF = (2 * Math.PI) / Math.max(...grid.lengths);
      for (const b of s.spectra) expect(Math.abs(b.compressible - (ref.shells.get(Math.round(b.k / kF)) ?? 0)) / s.kinetic).toBeLessThan(1e-12);
    }
  });

  it("a Gaussian packet at rest is pure quantum energy, K = M d/(8σ²) (textbook)", () => {
    const grid = new Grid([32, 32, 32], [1, 1, 1]);
    const sigma = 0.08;
    const psi = fillComplex(grid, (x, y, z) => [Math.exp(-((x - 0.5) ** 2 + (y - 0.5) ** 2 + (z - 0.5) ** 2) / (4 * sigma * sigma)), 0]);
    let mass = 0;
    for (let i = 0; i < grid.size; i++) mass += psi[2 * i]! ** 2 * grid.cellVolume;
    const s = energySplit(grid, psi, 1);
    expect((s.incompressible + s.compressible) / s.kinetic).toBeLessThan(1e-20);
    expect(Math.abs(s.quantum / ((mass * 3) / (8 * sigma * sigma)) - 1)).toBeLessThan(1e-6);
  });

  it("a plane wave (uniform flow) has no quantum part; K = ½ M k²/a² (textbook)", () => {
    const grid = new Grid([32, 32], [1, 1]);
    const [kx, ky] = [2 * Math.PI * 3, 2 * Math.PI * -2];
    const a = 2;
    const psi = fillComplex(grid, (_x, y, z) => [Math.cos(kx * y + ky * z) * 5, Math.sin(kx * y + ky * z) * 5]);
    const s = energySplit(grid, psi, a);
    const expected = (0.5 * 25 * (kx * kx + ky * ky)) / (a * a);
    expect(s.quantum / expected).toBeLessThan(1e-24);
    expect(Math.abs(s.incompressible / expected - 1)).toBeLessThan(1e-12);
    expect(s.uniformFlow / s.incompressible).toBeCloseTo(1, 12);
  });

  it("a 2D vortex ψ = (x + iy) e^{−r²/2s²} is incompressible, with K_i = K_q = πs²/2 (computed independently); the compressible leak converges at second order or better", () => {
    const leak: number[] = [];
    for (const n of [64, 128, 256]) {
      const L = 16;
      const grid = new Grid([n, n], [L, L]);
      const c = L / 2 + 0.5 * (L / n); // between cells: ρ = 0 falls on no cell
      const psi = fillComplex(grid, (_x, y, z) => {
        const g = Math.exp(-((y - c) ** 2 + (z - c) ** 2) / 2);
        return [(z - c) * g, (y - c) * g];
      });
      const s = energySplit(grid, psi, 1);
      expect(Math.abs(s.incompressible / (Math.PI / 2) - 1)).toBeLessThan(0.02);
      expect(Math.abs(s.quantum / (Math.PI / 2) - 1)).toBeLessThan(1e-9);
      leak.push(s.compressible / s.kinetic);
    }
    expect(leak[2]!).toBeLessThan(1e-3);
    expect(Math.log2(leak[0]! / leak[1]!)).toBeGreaterThan(1.8);
    expect(Math.log2(leak[1]! / leak[2]!)).toBeGreaterThan(1.8);
  });

  it("the velocity power spectrum of a pure phase wave ψ = √ρ̄ e^{iε cos kx} sums to ⟨v²⟩ = ε²k²/(2a²) (Parseval), all compressible", () => {
    const grid = new Grid([64, 64], [1, 1]);
    const k = 2 * Math.PI * 3;
    const eps = 0.1;
    const a = 0.5;
    const psi = fillComplex(grid, (_x, _y, z) => [2 * Math.cos(eps * Math.cos(k * z)), 2 * Math.sin(eps * Math.cos(k * z))]);
    const s = energySplit(grid, psi, a);
    const total = s.spectra.reduce((t, b) => t + (b.velocityPower * b.modes) / grid.volume, 0);
    expect(Math.abs(total / ((eps * eps * k * k) / (2 * a * a)) - 1)).toBeLessThan(1e-10);
    expect(s.incompressible / s.compressible).toBeLessThan(1e-20);
    expect(s.quantum / s.kinetic).toBeLessThan(1e-20);
  });
});
