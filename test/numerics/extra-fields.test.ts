// Fields advanced in lockstep with the reference field: two fields with gravity of their own
// evolve exactly as each does alone, and two species of different particle mass sharing one
// potential keep their masses and grow as exact linear theory says.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import type { FieldKind } from "../../src/integrators/extra-fields.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { fillComplex, lumpy } from "../helpers/fields.js";

type Backend = "wasm" | "js";
const CONFIGS: [Backend, number][] = [
  ["wasm", 1],
  ["wasm", 2],
  ["js", 1],
  ["js", 2],
];

function stepper(grid: Grid, gravity: "periodic" | "isolated", fft: Backend, threads: number, fields: FieldKind[] = []): SplitStepper {
  const g = makePoissonSolver(grid, gravity);
  return threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), g, threads, fft, {}, fields) : new SplitStepper(grid, new StaticBackground(), g, fft, 1, fields);
}

/** The same bytes. */
function same(a: Float64Array, b: Float64Array): boolean {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));
}

/** A few steps with an undone one among them, as the run loop's guard rails do. */
function advance(s: SplitStepper): void {
  for (let i = 0; i < 3; i++) s.step(2e-4);
  s.saveUndo();
  s.step(3e-4);
  s.undo();
  for (let i = 0; i < 2; i++) s.step(2e-4);
}

describe("two fields with gravity of their own", () => {
  for (const [fft, threads] of CONFIGS) {
    for (const [cells, gravity] of [
      [[16, 16, 16], "periodic"],
      [[16, 32], "isolated"],
    ] as const) {
      it(`evolve bit for bit as each does alone (${cells.length}D ${gravity}, ${fft}, ${threads} thread${threads > 1 ? "s" : ""})`, () => {
        const grid = new Grid([...cells], cells.map(() => 1));
        const a = lumpy(grid);
        const b = fillComplex(grid, (x, y, z) => [Math.sqrt(150 * (1 + 0.5 * Math.sin(2 * Math.PI * (x + y + 2 * z)))), 0.1 * Math.cos(2 * Math.PI * z)]);
        const both = stepper(grid, gravity, fft, threads, [{ kind: "own-gravity" }]);
        const aloneA = stepper(grid, gravity, fft, threads);
        const aloneB = stepper(grid, gravity, fft, threads);
        try {
          both.setField(1, b);
          both.setState(a, 0);
          aloneA.setState(a, 0);
          aloneB.setState(b, 0);
          for (const s of [both, aloneA, aloneB]) advance(s);
          expect(both.time).toBe(aloneA.time);
          expect(same(both.psi, aloneA.psi)).toBe(true);
          expect(same(both.field(1), aloneB.psi)).toBe(true);
          expect(same(both.phi, aloneA.phi)).toBe(true);
        } finally {
          for (const s of [both, aloneA, aloneB]) s.close();
        }
      });
    }
  }
});

/**
 * Linear theory of species i of particle mass μ_i m (code units ħ/m = 1, 4πG = 1) in a static box
 * sharing one potential: δ_i'' = −(k²/2μ_i)² δ_i + Σ_j ρ_j δ_j. Growth rates are the square roots
 * of the positive eigenvalues of that 2×2 matrix (computed independently; for one species, or two of
 * equal mass, the Jeans rate γ² = 4πGρ − (ħk²/2m)² of Khlopov, Malomed & Zeldovich 1985, MNRAS 215, 575).
 */
function growingMode(k2: number, rho: [number, number], mu: [number, number]): { gamma: number; v: [number, number] } {
  const q = mu.map((m) => (k2 / (2 * m)) ** 2);
  const [a, b, c, d] = [rho[0] - q[0]!, rho[1], rho[0], rho[1] - q[1]!];
  const tr = a + d;
  const det = a * d - b * c;
  const lambda = tr / 2 + Math.sqrt((tr * tr) / 4 - det);
  // (M − λ) v = 0: v = (b, λ − a), scaled to a largest component of 1
  const v: [number, number] = [b, lambda - a];
  const m = Math.max(Math.abs(v[0]), Math.abs(v[1]));
  return { gamma: Math.sqrt(lambda), v: [v[0] / m, v[1] / m] };
}

describe("two species of different particle mass sharing one potential", () => {
  const cases = [
    { rho: [300, 300], mu: [1, 2], label: "μ₂ = 2μ₁" },
    { rho: [200, 250], mu: [1, 1], label: "equal masses (one species)" },
  ] as const;
  for (const [fft, threads] of CONFIGS) {
    for (const c of cases) {
      it(`grow at the eigen-rate of the coupled linear system to 1% and keep each mass to round-off (${c.label}, ${fft}, ${threads} thread${threads > 1 ? "s" : ""})`, () => {
        const grid = new Grid([32, 16], [1, 1]);
        const k = 2 * Math.PI; // mode 1 along the first (strided) axis
        const { gamma, v } = growingMode(k * k, [...c.rho], [...c.mu]);
        expect(gamma).toBeGreaterThan(5);
        const eps = 1e-4;
        // the growing mode alone: δ_i = ε v_i cos kx and S_i = μ_i δ_i'/k² (continuity, v = ∇S/μ)
        const species = (i: 0 | 1) =>
          fillComplex(grid, (_x, y) => {
            const delta = eps * v[i] * Math.cos(k * y);
            const phase = (c.mu[i] * gamma * delta) / (k * k);
            const amp = Math.sqrt(c.rho[i] * (1 + delta));
            return [amp * Math.cos(phase), amp * Math.sin(phase)];
          });
        const s = stepper(grid, "periodic", fft, threads, [{ kind: "species", massRatio: c.mu[1] / c.mu[0] }]);
        try {
          s.setField(1, species(1));
          s.setState(species(0), 0);
          const contrast = (psi: Float64Array) => {
            let sum = 0;
            let mode = 0;
            for (let i = 0; i < grid.size; i++) {
              const rho = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
              sum += rho;
              mode += rho * Math.cos(k * grid.coordinate(1, Math.floor(i / grid.shape[2])));
            }
            return (2 * mode) / sum;
          };
          const start = [contrast(s.rawPsi), contrast(s.rawField(1))];
          const mass0 = [s.mass, s.fieldMass(1)];
          const total = 3 / gamma;
          const steps = 200;
          for (let n = 0; n < steps; n++) s.step(total / steps);
          const rates = [contrast(s.rawPsi) / start[0]!, contrast(s.rawField(1)) / start[1]!].map((r) => Math.log(r) / total);
          for (const rate of rates) expect(Math.abs(rate / gamma - 1)).toBeLessThan(0.01);
          expect(Math.abs(s.mass / mass0[0]! - 1)).toBeLessThan(1e-12);
          expect(Math.abs(s.fieldMass(1) / mass0[1]! - 1)).toBeLessThan(1e-12);
        } finally {
          s.close();
        }
      });
    }
  }
});

describe("species fields on the two FFT backends", () => {
  // the same arithmetic up to the transforms' round-off: fft.js is an outside implementation of the DFT
  it("agree to 1e-12 after a nonlinear run (three species of masses m, 3m and m/2 sharing one potential)", () => {
    const grid = new Grid([16, 16, 16], [1, 1, 1]);
    const fields: FieldKind[] = [
      { kind: "species", massRatio: 3 },
      { kind: "species", massRatio: 0.5 },
    ];
    const second = fillComplex(grid, (x, y, z) => [Math.sqrt(100 * (1 + 0.5 * Math.sin(2 * Math.PI * (x + z)))), 0.05 * Math.cos(2 * Math.PI * y)]);
    const third = fillComplex(grid, (_x, y) => [Math.sqrt(50 * (1 + 0.3 * Math.cos(4 * Math.PI * y))), 0]);
    const run = (fft: Backend) => {
      const s = stepper(grid, "periodic", fft, 1, fields);
      s.setField(1, second);
      s.setField(2, third);
      s.setState(lumpy(grid), 0);
      for (let i = 0; i < 6; i++) s.step(3e-4);
      const out = [Float64Array.from(s.psi), Float64Array.from(s.field(1)), Float64Array.from(s.field(2))];
      s.close();
      return out;
    };
    const wasm = run("wasm");
    const js = run("js");
    for (let f = 0; f < 3; f++) {
      let worst = 0;
      let scale = 0;
      for (let i = 0; i < wasm[f]!.length; i++) {
        worst = Math.max(worst, Math.abs(wasm[f]![i]! - js[f]![i]!));
        scale = Math.max(scale, Math.abs(js[f]![i]!));
      }
      expect(worst / scale, `field ${f}`).toBeLessThan(1e-12);
    }
  });
});

