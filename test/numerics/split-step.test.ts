// The split-step solver against analytic solutions, a convergence order and conservation laws.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { evolve } from "../../src/simulation/evolve.js";
import { fieldMass, kineticEnergy, maxDensity, potentialEnergy } from "../../src/diagnostics/energies.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { fillComplex, maxAbs, seededRandom } from "../helpers/fields.js";

/** A lumpy self-gravitating 2D field: well into the nonlinear regime. */
function lumpyField(grid: Grid, seed: number): Float64Array {
  const rnd = seededRandom(seed);
  const modes = Array.from({ length: 6 }, () => ({ kx: Math.round(rnd() * 3), ky: Math.round(rnd() * 3), amp: 0.3 * rnd(), ph: Math.PI * rnd() }));
  return fillComplex(grid, (_x, y, z) => {
    let d = 1;
    let s = 0;
    for (const m of modes) {
      const arg = 2 * Math.PI * (m.kx * y + m.ky * z) + m.ph;
      d += m.amp * Math.cos(arg);
      s += 0.05 * m.amp * Math.sin(arg);
    }
    const amp = Math.sqrt(200 * Math.max(d, 0.05));
    return [amp * Math.cos(s), amp * Math.sin(s)];
  });
}

function run(grid: Grid, psi0: Float64Array, tEnd: number, dt: number, gravity: "periodic" | "none" | "isolated" = "periodic"): SplitStepper {
  const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, gravity));
  stepper.setState(psi0, 0);
  const result = evolve(stepper, { safety: 0.25, maxDlnA: 0.01, fixedStep: dt }, { endTime: tEnd, massTolerance: 1e-8, maxSteps: 1e6 });
  expect(result.status).toBe("completed");
  return stepper;
}

function relativeL2(a: Float64Array, b: Float64Array): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < a.length; i++) {
    num += (a[i]! - b[i]!) ** 2;
    den += b[i]! ** 2;
  }
  return Math.sqrt(num / den);
}

describe("split-step integrator", () => {
  it("conserves mass to 1e-12 over 1000 nonlinear steps (unitary scheme)", () => {
    const grid = new Grid([32, 32], [1, 1]);
    const psi0 = lumpyField(grid, 1);
    const m0 = fieldMass(grid, psi0);
    const s = run(grid, psi0, 1000 * 2e-4, 2e-4);
    expect(Math.abs(fieldMass(grid, s.psi) - m0) / m0).toBeLessThan(1e-12);
  });

  it("is second order in Δt on a nonlinear self-gravitating run (Strang splitting: error ratio ≈ 4)", () => {
    const grid = new Grid([32, 32], [1, 1]);
    const psi0 = lumpyField(grid, 2);
    const tEnd = 0.02;
    const reference = run(grid, psi0, tEnd, tEnd / 512).psi;
    const errors = [32, 64, 128].map((n) => relativeL2(run(grid, psi0, tEnd, tEnd / n).psi, reference));
    expect(errors[0]!).toBeGreaterThan(1e-6); // the test must see a real splitting error
    const r1 = errors[0]! / errors[1]!;
    const r2 = errors[1]! / errors[2]!;
    expect(r1).toBeGreaterThan(3.6);
    expect(r1).toBeLessThan(4.4);
    expect(r2).toBeGreaterThan(3.6);
    expect(r2).toBeLessThan(4.4);
  });

  // Free spreading of a Gaussian packet (any quantum-mechanics textbook), ħ/m = 1:
  //   ψ = A (σ²/s)^{d/2} exp(−|x − x₀ − k₀t|²/(4s) + i k₀·(x − x₀) − i |k₀|² t/2),  s = σ² + i t/2.
  for (const dims of [1, 3]) {
    it(`reproduces the analytic free Gaussian packet in ${dims}D`, () => {
      // sizes chosen so that periodic images and the spectrum beyond Nyquist stay below 1e-10
      const n = dims === 1 ? 256 : 64;
      const grid = new Grid(Array(dims).fill(n), Array(dims).fill(1));
      const sigma = dims === 1 ? 0.02 : 0.035;
      const k0 = dims === 1 ? [40] : [20, -15, 18];
      const x0 = 0.5;
      const packet = (t: number) =>
        fillComplex(grid, (x, y, z) => {
          const coords = [x, y, z].slice(3 - dims);
          const sr = sigma * sigma;
          const si = t / 2;
          // exponent = −r²/(4s) + i k·(x − x₀) − i k² t/2
          let r2 = 0;
          let kx = 0;
          let kk = 0;
          coords.forEach((c, i) => {
            r2 += (c - x0 - k0[i]! * t) ** 2;
            kx += k0[i]! * (c - x0);
            kk += k0[i]! ** 2;
          });
          const den = 4 * (sr * sr + si * si);
          const er = (-r2 * sr) / den;
          const ei = (r2 * si) / den + kx - 0.5 * kk * t;
          // prefactor (σ²/s)^{d/2}
          const mod = Math.pow(sr / Math.sqrt(sr * sr + si * si), dims / 2);
          const arg = (-dims / 2) * Math.atan2(si, sr);
          const m = mod * Math.exp(er);
          return [m * Math.cos(ei + arg), m * Math.sin(ei + arg)];
        });
      const tEnd = (dims === 1 ? 4 : 2) * sigma * sigma; // the width grows by √5 (1D) or √2 (3D)
      const s = run(grid, packet(0), tEnd, tEnd / 7, "none");
      const exact = packet(tEnd);
      let worst = 0;
      for (let i = 0; i < exact.length; i++) worst = Math.max(worst, Math.abs(s.psi[i]! - exact[i]!));
      expect(worst / maxAbs(exact)).toBeLessThan(1e-9);
    });
  }

  it("conserves total energy K + W in a static nonlinear run to 1e-4 with a phase budget of π/8", () => {
    const grid = new Grid([64, 64], [1, 1]);
    const psi0 = lumpyField(grid, 3);
    const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
    stepper.setState(psi0, 0);
    const scratch = new Float64Array(psi0.length);
    const energy = () => kineticEnergy(grid, stepper.psi, 1, stepper.fft, scratch) + potentialEnergy(grid, stepper.psi, stepper.phi, 1);
    const e0 = energy();
    let worst = 0;
    evolve(stepper, { safety: 0.0625, maxDlnA: 0.01 }, { endTime: 0.05, massTolerance: 1e-8, maxSteps: 1e6 }, {
      onStep: () => {
        worst = Math.max(worst, Math.abs(energy() - e0));
      },
    });
    const kinetic0 = kineticEnergy(grid, psi0, 1, stepper.fft, scratch);
    expect(worst / kinetic0).toBeLessThan(1e-4);
  });

  it("stops with the last good state and a message naming the step when the field blows up", () => {
    const grid = new Grid([32], [1]);
    const psi0 = fillComplex(grid, (_x, _y, z) => [Math.sqrt(1e6 * (1 + 0.5 * Math.cos(2 * Math.PI * z))), 0]);
    const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
    stepper.setState(psi0, 0);
    const original = stepper.step.bind(stepper);
    let calls = 0;
    stepper.step = (dt: number) => {
      original(dt);
      // the fourth step goes wrong inside the step, as a blow-up would
      if (++calls === 4) {
        stepper.psi[10] = Number.NaN;
        stepper.updatePotential();
      }
    };
    const result = evolve(stepper, { safety: 0.25, maxDlnA: 0.01, fixedStep: 1e-3 }, { endTime: 1, massTolerance: 1e-8, maxSteps: 1e6 });
    expect(result.status).toBe("stopped");
    expect(result.reason).toMatch(/^step 4 at t = .*non-finite.*likely cause/);
    expect(result.steps).toBe(3);
    expect(stepper.time).toBeCloseTo(3e-3, 15);
    expect(Number.isFinite(stepper.mass)).toBe(true);
    expect(Math.abs(stepper.mass - fieldMass(grid, psi0)) / stepper.mass).toBeLessThan(1e-13);
  });
});

describe("the closing kick folded into the next step", () => {
  it("gives the field of separate kicks: reading ψ after every step (which applies each closing kick) agrees to 1e-13", () => {
    const grid = new Grid([64, 64], [1, 1]);
    const psi0 = lumpyField(grid, 3);
    const merged = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
    const separate = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
    merged.setState(psi0, 0);
    separate.setState(psi0, 0);
    for (let i = 0; i < 20; i++) {
      merged.step(2e-4);
      separate.step(2e-4);
      expect(separate.psi.length).toBe(psi0.length); // the read applies the owed kick
      expect(separate.owedKickFactor).toBe(0);
    }
    expect(merged.owedKickFactor).toBeGreaterThan(0);
    const a = Float64Array.from(merged.psi);
    let worst = 0;
    for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i]! - separate.psi[i]!));
    expect(worst / maxAbs(a)).toBeLessThan(1e-13);
  });

  it("undoes a step exactly: saveUndo() before it, undo() after it give back ψ (with its owed kick), φ and t", () => {
    const grid = new Grid([32, 32], [1, 1]);
    const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
    stepper.setState(lumpyField(grid, 4), 0);
    stepper.step(2e-4);
    stepper.saveUndo();
    const t = stepper.time;
    const owed = stepper.owedKickFactor;
    const phi = Float64Array.from(stepper.phi);
    const expected = Float64Array.from(stepper.psi);
    stepper.step(2e-4);
    expect(stepper.undo()).toBe(true);
    expect(stepper.time).toBe(t);
    expect(stepper.owedKickFactor).toBe(owed);
    expect(Buffer.from(Float64Array.from(stepper.phi).buffer).equals(Buffer.from(phi.buffer))).toBe(true);
    expect(Buffer.from(Float64Array.from(stepper.psi).buffer).equals(Buffer.from(expected.buffer))).toBe(true);
  });

  it("measures K, W and the peak density as the diagnostics do with fft.js and direct sums", () => {
    for (const fft of ["wasm", "js"] as const) {
      const grid = new Grid([16, 32, 16], [1, 2, 1]);
      const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), fft);
      const psi0 = fillComplex(grid, (x, y, z) => [1 + 0.3 * Math.cos(2 * Math.PI * x) * Math.sin(Math.PI * y), 0.2 * Math.sin(2 * Math.PI * (z + x))]);
      stepper.setState(psi0, 0);
      stepper.step(1e-3);
      const psi = Float64Array.from(stepper.psi);
      const K = kineticEnergy(grid, psi, 1, new ComplexFft(grid.shape), new Float64Array(psi.length));
      const W = potentialEnergy(grid, psi, stepper.phi, 1);
      expect(Math.abs(stepper.kineticTilde() / K - 1), fft).toBeLessThan(1e-13);
      const m = stepper.moments();
      expect(Math.abs((0.5 * m.rhoPhi * grid.cellVolume) / W - 1), fft).toBeLessThan(1e-13);
      expect(m.maxRho).toBe(maxDensity(psi));
      expect(Math.abs((m.rho * grid.cellVolume) / fieldMass(grid, psi) - 1)).toBeLessThan(1e-13);
    }
  });
});
