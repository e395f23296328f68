// The threaded step against the single-threaded one: the same field, bit for bit.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { LcdmBackground, StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { evolve } from "../../src/simulation/evolve.js";
import { lumpy } from "../helpers/fields.js";

describe("threaded split-step", () => {
  for (const [dims, cells, gravity, fft] of [
    [3, [32, 32, 32], "periodic", "wasm"],
    [3, [32, 32, 32], "periodic", "js"],
    [2, [64, 64], "periodic", "wasm"],
    [3, [16, 16, 16], "isolated", "wasm"],
    // rows of 512 points, transformed 4 at a time
    [3, [4, 8, 512], "periodic", "wasm"],
  ] as const) {
    it(`gives bitwise the same ${dims}D ${gravity} field with 1, 2 and 3 threads after a nonlinear run (${fft} FFT)`, () => {
      const grid = new Grid([...cells], cells.map(() => 1));
      const psi0 = lumpy(grid);
      const runWith = (threads: number) => {
        const bg = gravity === "periodic" && dims === 3 ? new LcdmBackground({ hubble0: 30, omegaMatter: 0.3, omegaRadiation: 0 }) : new StaticBackground();
        const t0 = bg.kind === "lcdm" ? bg.time(0.3) : 0;
        const s = threads === 1 ? new SplitStepper(grid, bg, makePoissonSolver(grid, gravity), fft) : new ThreadedStepper(grid, bg, makePoissonSolver(grid, gravity), threads, fft);
        try {
          s.setState(psi0, t0);
          s.trackKinetic = true;
          const r = evolve(s, { safety: 0.25, maxDlnA: 0.01 }, { endTime: t0 + 0.004, massTolerance: 1e-8, maxSteps: 200 });
          return { psi: Float64Array.from(s.psi), steps: r.steps, kinetic: s.midKineticTilde };
        } finally {
          s.close();
        }
      };
      const one = runWith(1);
      expect(one.steps).toBeGreaterThan(5);
      for (const threads of [2, 3]) {
        const many = runWith(threads);
        expect(many.steps).toBe(one.steps);
        expect(Buffer.from(many.psi.buffer).equals(Buffer.from(one.psi.buffer)), `${threads} threads`).toBe(true);
        expect(Math.abs(many.kinetic / one.kinetic - 1)).toBeLessThan(1e-12);
      }
    });
  }
});

describe("a closed threaded stepper", () => {
  it("still gives its field, with the owed closing kick applied on the main thread", () => {
    const grid = new Grid([32, 32, 32], [1, 1, 1]);
    const psi0 = lumpy(grid);
    const one = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
    const two = new ThreadedStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), 2);
    one.setState(psi0, 0);
    two.setState(psi0, 0);
    for (let i = 0; i < 3; i++) {
      one.step(1e-4);
      two.step(1e-4);
    }
    two.close();
    expect(two.owedKickFactor).toBeGreaterThan(0);
    expect(Buffer.from(Float64Array.from(two.psi).buffer).equals(Buffer.from(Float64Array.from(one.psi).buffer))).toBe(true);
  });
});
