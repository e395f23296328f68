// Long 1D grids transform in four steps (columns, twiddles, rows; the spectrum
// left in transposed order): the transform against fft.js (a general-purpose
// FFT library from the npm registry) applied to the whole grid, and the step
// against a kick–drift–kick step written here with fft.js on the whole grid,
// computed independently of the stepper's passes.
import FFT from "fft.js";
import { describe, expect, it } from "vitest";
import { Grid, type Triple } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { StepPlan } from "../../src/integrators/step-plan.js";
import { runTask, type StepTask } from "../../src/integrators/step-task.js";
import { allocateStepMemory } from "../../src/fields/step-allocate.js";
import { createEngine } from "../../src/fields/step-engine.js";
import { LONG_MIN_CELLS, stepGeometry } from "../../src/fields/step-memory.js";
import { maxAbs, maxAbsDiff, seededRandom } from "../helpers/fields.js";

/** Wavenumber of index j on a unit box of n cells. */
const wavenumber = (j: number, n: number) => 2 * Math.PI * (j <= n / 2 ? j : j - n);

/** A random complex field of n cells. */
function randomField(n: number, seed: number): Float64Array {
  const random = seededRandom(seed);
  return Float64Array.from({ length: 2 * n }, () => random() - 0.5);
}

describe("the four-step transform of a long 1D grid", () => {
  for (const n of [LONG_MIN_CELLS, 2 * LONG_MIN_CELLS, 4 * LONG_MIN_CELLS]) {
    it(`gives fft.js's spectrum of ${n} cells in transposed order to 1e-12, and transforms back (wasm and fft.js engines)`, () => {
      const shape: Triple = [1, 1, n];
      const geometry = stepGeometry(shape, "none");
      const long = geometry.long!;
      expect(long.n1 * long.n2).toBe(n);
      const plan = new StepPlan(geometry);
      const input = randomField(n, n);
      const fft = new FFT(n);
      const reference = fft.createComplexArray() as number[];
      fft.transform(reference, Array.from(input));
      const kSquared = [0, 1, 2].map((axis) => Float64Array.from({ length: shape[axis]! + (shape[axis]! & 1) }, (_, j) => wavenumber(j, shape[axis]!) ** 2));
      for (const backend of ["wasm", "js"] as const) {
        const memory = allocateStepMemory(backend, geometry, plan.transforms(), { kSquared }, 1);
        const engine = createEngine(memory.setup, 0);
        memory.psi.set(input);
        const run = (task: StepTask, units: number) => runTask(engine, task, 0, units, new Float64Array(6));
        const blocks = Math.ceil(long.n2 / 16);
        run({ op: "long-columns", grid: "psi", inverse: false }, blocks);
        run({ op: "long-rows", grid: "psi", mode: "forward", phases: 0, gradient: false }, long.n1);
        // row a, column c holds wavenumber index a + n1·c
        const spectrum = new Float64Array(2 * n);
        for (let a = 0; a < long.n1; a++) {
          for (let c = 0; c < long.n2; c++) {
            spectrum[2 * (a + long.n1 * c)] = memory.psi[2 * (a * long.n2 + c)]!;
            spectrum[2 * (a + long.n1 * c) + 1] = memory.psi[2 * (a * long.n2 + c) + 1]!;
          }
        }
        expect(maxAbsDiff(spectrum, reference) / maxAbs(reference), backend).toBeLessThan(1e-12);
        run({ op: "long-rows", grid: "psi", mode: "inverse", phases: 0, gradient: false }, long.n1);
        run({ op: "long-columns", grid: "psi", inverse: true }, blocks);
        expect(maxAbsDiff(memory.psi, input) / maxAbs(input), backend).toBeLessThan(1e-14);
      }
    });
  }
});

/** The reference: kick–drift–kick steps of size dt with fft.js on the whole grid (static box, periodic gravity, code units). */
function referenceSteps(psi0: Float64Array, dt: number, steps: number): { psi: Float64Array; phi0: Float64Array } {
  const n = psi0.length / 2;
  const fft = new FFT(n);
  const transform = (x: Float64Array, inverse: boolean) => {
    const out = fft.createComplexArray() as number[];
    if (inverse) fft.inverseTransform(out, Array.from(x));
    else fft.transform(out, Array.from(x));
    return Float64Array.from(out);
  };
  const multiply = (x: Float64Array, i: number, angle: number) => {
    const [c, s, re, im] = [Math.cos(angle), Math.sin(angle), x[2 * i]!, x[2 * i + 1]!];
    x[2 * i] = re * c - im * s;
    x[2 * i + 1] = re * s + im * c;
  };
  const potential = (p: Float64Array) => {
    const rho = Float64Array.from({ length: 2 * n }, (_, i) => (i & 1 ? 0 : p[i]! ** 2 + p[i + 1]! ** 2));
    const spec = transform(rho, false);
    for (let j = 0; j < n; j++) {
      const g = j === 0 ? 0 : -1 / wavenumber(j, n) ** 2;
      spec[2 * j] = spec[2 * j]! * g;
      spec[2 * j + 1] = spec[2 * j + 1]! * g;
    }
    const back = transform(spec, true);
    return Float64Array.from({ length: n }, (_, i) => back[2 * i]!);
  };
  let psi = Float64Array.from(psi0);
  let phi = potential(psi);
  const phi0 = phi;
  for (let step = 0; step < steps; step++) {
    for (let i = 0; i < n; i++) multiply(psi, i, -0.5 * dt * phi[i]!);
    const spec = transform(psi, false);
    for (let j = 0; j < n; j++) multiply(spec, j, -0.5 * dt * wavenumber(j, n) ** 2);
    psi = transform(spec, true);
    phi = potential(psi);
    for (let i = 0; i < n; i++) multiply(psi, i, -0.5 * dt * phi[i]!);
  }
  return { psi, phi0 };
}

describe("the step on a long 1D grid", () => {
  const n = LONG_MIN_CELLS;
  const grid = new Grid([n], [1]);
  const psi0 = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    const x = i / n;
    psi0[2 * i] = 10 * (1 + 0.3 * Math.cos(6 * Math.PI * x) + 0.1 * Math.sin(34 * Math.PI * x));
    psi0[2 * i + 1] = 2 * Math.sin(10 * Math.PI * x);
  }
  const [dt, steps] = [1e-6, 3];
  const reference = (() => {
    // computed once for both cases below
    let r: ReturnType<typeof referenceSteps> | undefined;
    return () => (r ??= referenceSteps(psi0, dt, steps));
  })();

  function run(fft: "wasm" | "js", threads: number) {
    const gravity = makePoissonSolver(grid, "periodic");
    const s = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), gravity, threads, fft) : new SplitStepper(grid, new StaticBackground(), gravity, fft);
    try {
      s.setState(psi0, 0);
      const phi0 = Float64Array.from(s.phi);
      for (let i = 0; i < steps; i++) s.step(dt);
      return { psi: Float64Array.from(s.psi), phi0 };
    } finally {
      s.close();
    }
  }

  it("gives the potential and the field of fft.js steps on the whole grid to 1e-12, on both engines", () => {
    const ref = reference();
    for (const fft of ["wasm", "js"] as const) {
      const r = run(fft, 1);
      expect(maxAbsDiff(r.phi0, ref.phi0) / maxAbs(ref.phi0), fft).toBeLessThan(1e-12);
      expect(maxAbsDiff(r.psi, ref.psi) / maxAbs(ref.psi), fft).toBeLessThan(1e-12);
    }
  });

  it("gives bitwise the same field on 1 and 3 threads (wasm)", () => {
    const one = run("wasm", 1);
    const three = run("wasm", 3);
    expect(Buffer.from(three.psi.buffer).equals(Buffer.from(one.psi.buffer))).toBe(true);
  });

  for (const fft of ["wasm", "js"] as const) {
    it(`measures ½∫|∇ψ|² of two plane waves as ½(|a|²k₁² + |b|²k₂²)V, after a step and at its middle (${fft}, no gravity)`, () => {
      // modes 3 and −1234 of different amplitudes: a wrong wavenumber for a stored index changes the sum
      const [m1, m2, a, b] = [3, -1234, 2, 0.5];
      const psi = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) {
        const [p1, p2] = [(2 * Math.PI * m1 * i) / n, (2 * Math.PI * m2 * i) / n];
        psi[2 * i] = a * Math.cos(p1) + b * Math.cos(p2);
        psi[2 * i + 1] = a * Math.sin(p1) + b * Math.sin(p2);
      }
      const s = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "none"), fft);
      try {
        s.setState(psi, 0);
        s.trackKinetic = true;
        s.step(1e-7);
        // computed independently: a free drift keeps |ψ_k|, and ∫|∇ψ|² = Σ|amplitude|²k² V for plane waves
        const expected = 0.5 * (a * a * (2 * Math.PI * m1) ** 2 + b * b * (2 * Math.PI * m2) ** 2) * grid.volume;
        expect(Math.abs(s.midKineticTilde / expected - 1)).toBeLessThan(1e-12);
        expect(Math.abs(s.kineticTilde() / expected - 1)).toBeLessThan(1e-12);
      } finally {
        s.close();
      }
    });
  }
});

describe("2D grids with long rows or long columns", () => {
  // rows of 2048 cells (and real rows of 1024 pairs) go through the row-copying transform, pencils of
  // 2048 cells through the fused drift and Poisson passes in parts of a block: both must give fft.js's field
  for (const cells of [[16, 2048], [2048, 16]] as const) {
    it(`${cells.join("×")}: wasm gives fft.js's field to 1e-12 after 3 nonlinear steps, and bitwise the same field on 1 and 3 threads`, () => {
      const grid = new Grid([...cells], [1, 1]);
      const random = seededRandom(7);
      const psi0 = Float64Array.from({ length: 2 * grid.size }, (_, i) => (i & 1 ? 0.5 : 10) * (1 + 0.2 * (random() - 0.5)));
      const run = (fft: "wasm" | "js", threads: number) => {
        const gravity = makePoissonSolver(grid, "periodic");
        const s = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), gravity, threads, fft) : new SplitStepper(grid, new StaticBackground(), gravity, fft);
        try {
          s.setState(psi0, 0);
          s.trackKinetic = true;
          for (let i = 0; i < 3; i++) s.step(1e-7);
          return { psi: Float64Array.from(s.psi), kinetic: s.midKineticTilde };
        } finally {
          s.close();
        }
      };
      const js = run("js", 1);
      const wasm = run("wasm", 1);
      expect(maxAbsDiff(wasm.psi, js.psi) / maxAbs(js.psi)).toBeLessThan(1e-12);
      expect(Math.abs(wasm.kinetic / js.kinetic - 1)).toBeLessThan(1e-12);
      const three = run("wasm", 3);
      expect(Buffer.from(three.psi.buffer).equals(Buffer.from(wasm.psi.buffer))).toBe(true);
    });
  }
});
