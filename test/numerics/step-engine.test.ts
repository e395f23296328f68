// The step engine's own passes against closed forms: the potential the stepper computes
// (through its planned Poisson passes, on both FFT backends) for a single density mode,
// the kinetic sum of a plane wave, and undo after that measurement used the undo copy.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { fillComplex, fillReal, maxAbs, maxAbsDiff } from "../helpers/fields.js";

const CASES = [
  { cells: [64], lengths: [3], mode: [0, 0, 5] },
  { cells: [16, 32], lengths: [2, 1.5], mode: [0, 3, 4] },
  { cells: [8, 16, 32], lengths: [1, 2, 3], mode: [2, 3, 5] },
] as const;

describe("the stepper's periodic potential", () => {
  for (const c of CASES) {
    for (const [fft, threads] of [["wasm", 1], ["js", 1], ["wasm", 2]] as const) {
      // ∇²φ = ρ − ρ̄ with ρ = ρ₀(1 + ε cos k·x): φ = −ρ₀ε cos(k·x)/|k|² (computed independently: the Fourier
      // transform of a single mode; the spectral kernel is exact for a mode the grid resolves)
      it(`is −ρ₀ε cos(k·x)/|k|² for a single mode in ${c.cells.length}D (${fft}, ${threads} thread${threads > 1 ? "s" : ""})`, () => {
        const grid = new Grid([...c.cells], [...c.lengths]);
        const k = c.mode.map((m, a) => (2 * Math.PI * m) / grid.extent[a]!);
        const k2 = k.reduce((s, v) => s + v * v, 0);
        const rho0 = 40;
        const eps = 0.3;
        const phase = (x: number, y: number, z: number) => k[0]! * x + k[1]! * y + k[2]! * z;
        const psi = fillComplex(grid, (x, y, z) => [Math.sqrt(rho0 * (1 + eps * Math.cos(phase(x, y, z)))), 0]);
        const expected = fillReal(grid, (x, y, z) => (-rho0 * eps * Math.cos(phase(x, y, z))) / k2);
        const gravity = makePoissonSolver(grid, "periodic");
        const s = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), gravity, threads, fft) : new SplitStepper(grid, new StaticBackground(), gravity, fft);
        try {
          s.setState(psi, 0);
          expect(s.backend).toBe(fft);
          expect(maxAbsDiff(s.phi, expected)).toBeLessThan(1e-13 * maxAbs(expected));
        } finally {
          s.close();
        }
      });
    }
  }
});

describe("the kinetic measurement and undo", () => {
  for (const fft of ["wasm", "js"] as const) {
    it(`measures ½∫|∇ψ|² of a plane wave as ½k²ρV, and undo() after it refuses instead of restoring scratch (${fft})`, () => {
      const grid = new Grid([8, 16, 32], [1, 1, 1]);
      const k = [2 * Math.PI * 1, 2 * Math.PI * 2, 2 * Math.PI * 3];
      const rho = 5;
      const psi = fillComplex(grid, (x, y, z) => {
        const p = k[0]! * x + k[1]! * y + k[2]! * z;
        return [Math.sqrt(rho) * Math.cos(p), Math.sqrt(rho) * Math.sin(p)];
      });
      const s = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), fft);
      s.setState(psi, 0);
      s.saveUndo();
      s.step(1e-4);
      const after = Float64Array.from(s.psi);
      // a plane wave |ψ|² = ρ: ½∫|∇ψ|² dV = ½|k|²ρV (computed independently)
      const k2 = k[0]! ** 2 + k[1]! ** 2 + k[2]! ** 2;
      expect(Math.abs(s.kineticTilde() / (0.5 * k2 * rho * grid.volume) - 1)).toBeLessThan(1e-12);
      // the measurement used the undo copy as scratch: undo must say so and leave ψ alone
      expect(s.undo()).toBe(false);
      expect(Buffer.from(Float64Array.from(s.psi).buffer).equals(Buffer.from(after.buffer))).toBe(true);
      // a fresh saveUndo after the measurement undoes exactly again
      s.saveUndo();
      const kept = Float64Array.from(s.psi);
      const keptTime = s.time;
      s.step(1e-4);
      expect(s.undo()).toBe(true);
      expect(s.time).toBe(keptTime);
      expect(Buffer.from(Float64Array.from(s.psi).buffer).equals(Buffer.from(kept.buffer))).toBe(true);
      s.close();
    });
  }
});

describe("the moments pass", () => {
  // Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ, max|ψ|² and φ's range, against the same sums computed independently here from
  // the stepper's own ψ and φ; isolated gravity keeps 0 outside φ's range (negative everywhere in 3D, positive
  // everywhere in 1D, where the Green's function grows as |x|), so an extremum that started at 0 (or a thread
  // given no cells) would show
  // (a 1D grid is one row: with 3 threads two of them get no cells)
  for (const [fft, threads, cells] of [["wasm", 1, [4, 8, 8]], ["js", 1, [4, 8, 8]], ["wasm", 2, [8, 8, 8]], ["wasm", 3, [64]]] as const) {
    it(`gives the sums and φ's range of the current field (${fft}, ${threads} thread${threads > 1 ? "s" : ""}, ${cells.join("×")}, isolated)`, () => {
      const grid = new Grid([...cells], [1, 1.5, 2].slice(0, cells.length));
      const psi = fillComplex(grid, (x, y, z) => [Math.exp(-8 * ((x - 0.4) ** 2 + (y - 0.7) ** 2 + (z - 1.1) ** 2)) + 0.1, 0.2 * Math.sin(3 * x + y)]);
      const gravity = makePoissonSolver(grid, "isolated");
      const s = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), gravity, threads, fft) : new SplitStepper(grid, new StaticBackground(), gravity, fft);
      try {
        s.setState(psi, 0);
        s.step(1e-3);
        const f = s.psi;
        const phi = s.phi;
        let [m, r2, rp, rmax, pmin, pmax] = [0, 0, 0, 0, Infinity, -Infinity];
        for (let i = 0; i < grid.size; i++) {
          const rho = f[2 * i]! ** 2 + f[2 * i + 1]! ** 2;
          m += rho;
          r2 += rho * rho;
          rp += rho * phi[i]!;
          rmax = Math.max(rmax, rho);
          pmin = Math.min(pmin, phi[i]!);
          pmax = Math.max(pmax, phi[i]!);
        }
        expect(pmin > 0 || pmax < 0).toBe(true);
        const got = s.moments();
        expect(Math.abs(got.rho / m - 1)).toBeLessThan(1e-13);
        expect(Math.abs(got.rho2 / r2 - 1)).toBeLessThan(1e-13);
        expect(Math.abs(got.rhoPhi / rp - 1)).toBeLessThan(1e-13);
        expect([got.maxRho, got.phiMin, got.phiMax]).toEqual([rmax, pmin, pmax]);
        expect(s.potentialRange()).toBe(pmax - pmin);
      } finally {
        s.close();
      }
    });
  }
});
