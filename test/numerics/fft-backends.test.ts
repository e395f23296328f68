// The step on the WebAssembly SIMD kernels against the step on fft.js (a
// general-purpose FFT library from the npm registry): the same field to
// round-off after a nonlinear run, for every geometry and thread count.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { LcdmBackground, StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { resolveFftBackend } from "../../src/integrators/fft-backend.js";
import { StepPlan } from "../../src/integrators/step-plan.js";
import { stepGeometry, type GravityKind } from "../../src/fields/step-memory.js";
import type { Triple } from "../../src/grid/grid.js";

const plan = (shape: Triple, gravity: GravityKind) => new StepPlan(stepGeometry(shape, gravity));
import { evolve } from "../../src/simulation/evolve.js";
import { ConfigError } from "../../src/core/errors.js";
import { lumpy, maxAbs, maxAbsDiff } from "../helpers/fields.js";

type Gravity = "periodic" | "isolated";

function runWith(cells: readonly number[], gravity: Gravity, fft: "wasm" | "js", threads: number) {
  const grid = new Grid([...cells], cells.map(() => 1));
  const bg = gravity === "periodic" && cells.length === 3 ? new LcdmBackground({ hubble0: 30, omegaMatter: 0.3, omegaRadiation: 0 }) : new StaticBackground();
  const t0 = bg.kind === "lcdm" ? bg.time(0.3) : 0;
  const solver = makePoissonSolver(grid, gravity);
  const s = threads === 1 ? new SplitStepper(grid, bg, solver, fft) : new ThreadedStepper(grid, bg, solver, threads, fft);
  try {
    expect(s.backend).toBe(fft);
    s.setState(lumpy(grid), t0);
    s.trackKinetic = true;
    const r = evolve(s, { safety: 0.25, maxDlnA: 0.01 }, { endTime: t0 + 0.004, massTolerance: 1e-8, maxSteps: 200 });
    return { psi: Float64Array.from(s.psi), phi: Float64Array.from(s.phi), steps: r.steps, kinetic: s.midKineticTilde };
  } finally {
    s.close();
  }
}

describe("FFT backends", () => {
  for (const [cells, gravity] of [
    [[32, 32, 32], "periodic"],
    [[64, 32], "periodic"],
    [[256], "periodic"],
    [[16, 16, 16], "isolated"],
    // rows of 512 points (4 at a time in a rows pass) and real rows of 256 (8 at a time)
    [[4, 8, 512], "periodic"],
  ] as const) {
    it(`wasm and fft.js give the same ${cells.length}D ${gravity} field to 1e-12 after a nonlinear run, on 1 and 2 threads`, () => {
      const js = runWith(cells, gravity, "js", 1);
      expect(js.steps).toBeGreaterThan(5);
      for (const threads of [1, 2]) {
        const wasm = runWith(cells, gravity, "wasm", threads);
        expect(wasm.steps).toBe(js.steps);
        expect(maxAbsDiff(wasm.psi, js.psi) / maxAbs(js.psi)).toBeLessThan(1e-12);
        expect(maxAbsDiff(wasm.phi, js.phi) / maxAbs(js.phi)).toBeLessThan(1e-12);
        expect(Math.abs(wasm.kinetic / js.kinetic - 1)).toBeLessThan(1e-12);
      }
    });
  }

  for (const fft of ["wasm", "js"] as const) {
    it(`${fft}: the same backend and thread count run twice give bitwise the same field`, () => {
      const a = runWith([32, 32, 32], "periodic", fft, 2);
      const b = runWith([32, 32, 32], "periodic", fft, 2);
      expect(Buffer.from(a.psi.buffer).equals(Buffer.from(b.psi.buffer))).toBe(true);
    });
  }

  for (const cells of [[64], [32, 16], [16, 8, 16]] as const) {
    it(`the threaded stepper's isolated potential equals IsolatedPoisson's (tested against analytic potentials) on a ${cells.join("×")} grid`, () => {
      const grid = new Grid([...cells], cells.map(() => 1));
      const psi = lumpy(grid);
      const rho = new Float64Array(grid.size);
      for (let i = 0; i < grid.size; i++) rho[i] = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
      const reference = makePoissonSolver(grid, "isolated");
      reference.solveInPlace(rho);
      for (const fft of ["wasm", "js"] as const) {
        const s = new ThreadedStepper(grid, new StaticBackground(), makePoissonSolver(grid, "isolated"), 2, fft);
        try {
          s.setState(psi, 0);
          expect(maxAbsDiff(s.phi, rho) / maxAbs(rho), fft).toBeLessThan(1e-13);
        } finally {
          s.close();
        }
      }
    });
  }

  it("auto picks wasm (on several memories beyond 4 GiB, test/numerics/wasm-banks.test.ts) and fft.js where a single field exceeds 4 GiB", () => {
    expect(resolveFftBackend("auto", plan([64, 64, 64], "periodic"), 2)).toBe("wasm");
    expect(resolveFftBackend("js", plan([64, 64, 64], "periodic"), 2)).toBe("js");
    // isolated gravity pads to twice the cells per axis: 512³ pads to 1024³, whose real work array alone is 8 GiB
    expect(resolveFftBackend("auto", plan([256, 256, 256], "isolated"), 2)).toBe("wasm");
    expect(resolveFftBackend("auto", plan([512, 512, 512], "isolated"), 2)).toBe("js");
    expect(() => resolveFftBackend("wasm", plan([512, 512, 512], "isolated"), 2)).toThrow(ConfigError);
  });
});
