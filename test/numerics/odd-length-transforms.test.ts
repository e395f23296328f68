// Transforms of 8, 32, 128, 512 and 2048 points (an odd power of two: the kernels run their first radix-2
// and radix-4 stages fused) along each axis, checked through the free Schrödinger equation
// i∂ψ/∂t = −½∇²ψ, whose plane waves e^{ik·x} turn by e^{−ik²t/2} exactly (analytic solution): after a few
// wasm steps without gravity the field is that sum of turned plane waves to 1e-12, on 1 and 2 threads
// bit for bit the same.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";

/** Mode numbers (per internal axis) of the plane waves: low, middle and just below the Nyquist mode, both signs. */
function modes(shape: readonly number[]): number[][] {
  const pick = (n: number, f: number) => (n === 1 ? 0 : Math.round(f * (n / 2 - 1)));
  return [
    shape.map((n) => pick(n, 0.02) + (n > 1 ? 1 : 0)),
    shape.map((n, a) => (a % 2 ? -1 : 1) * pick(n, 0.5)),
    shape.map((n, a) => (a === 1 ? -1 : 1) * pick(n, 1)),
  ];
}

/** Σ_j a_j e^{i(k_j·x − k_j² t/2)} on the grid's cells x = index · L / n, amplitudes a_j = 1, 0.5, 0.25. */
function planeWaves(grid: Grid, t: number): Float64Array {
  const [n0, n1, n2] = grid.shape;
  const psi = new Float64Array(2 * grid.size);
  modes(grid.shape).forEach((m, j) => {
    const k2 = m.reduce((t, mi) => t + (2 * Math.PI * mi) ** 2, 0);
    const a = 2 ** -j;
    // m·x / n reduced modulo 1 in integers, so the phase carries no rounding of large k·x
    const turn = (mi: number, x: number, n: number) => (((mi * x) % n) + n) % n / n;
    for (let x = 0; x < n0; x++) {
      for (let y = 0; y < n1; y++) {
        for (let z = 0; z < n2; z++) {
          const phase = 2 * Math.PI * (turn(m[0]!, x, n0) + turn(m[1]!, y, n1) + turn(m[2]!, z, n2)) - 0.5 * k2 * t;
          const i = 2 * ((x * n1 + y) * n2 + z);
          psi[i]! += a * Math.cos(phase);
          psi[i + 1]! += a * Math.sin(phase);
        }
      }
    }
  });
  return psi;
}

function evolveFree(cells: readonly number[], threads: number, dt: number, steps: number): { grid: Grid; psi: Float64Array } {
  const grid = new Grid([...cells], cells.map(() => 1));
  const solver = makePoissonSolver(grid, "none");
  const stepper = threads === 1 ? new SplitStepper(grid, new StaticBackground(), solver, "wasm") : new ThreadedStepper(grid, new StaticBackground(), solver, threads, "wasm");
  try {
    stepper.setState(planeWaves(grid, 0), 0);
    for (let s = 0; s < steps; s++) stepper.step(dt);
    return { grid, psi: Float64Array.from(stepper.psi) };
  } finally {
    stepper.close();
  }
}

describe("transforms of an odd power of two of points", () => {
  for (const cells of [[512, 8, 8], [8, 512, 8], [8, 8, 512], [8, 128, 32], [2048], [8]]) {
    it(`turn free plane waves on ${cells.join("×")} cells exactly as the analytic solution, to 1e-12, the same bits on 1 and 2 threads`, () => {
      const dt = 2e-7;
      const one = evolveFree(cells, 1, dt, 3);
      const exact = planeWaves(one.grid, 3 * dt);
      let worst = 0;
      for (let i = 0; i < exact.length; i++) worst = Math.max(worst, Math.abs(one.psi[i]! - exact[i]!));
      expect(worst).toBeLessThan(1e-12);
      const two = evolveFree(cells, 2, dt, 3);
      expect(Buffer.from(two.psi.buffer).equals(Buffer.from(one.psi.buffer))).toBe(true);
    });
  }
});
