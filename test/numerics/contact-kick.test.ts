// The contact term of the kick, ψ ← e^{−iK(φ + g|ψ|²)} ψ, on both step engines: a uniform field
// turns at its chemical potential g ρ exactly (closed form), each species at its own rate with no
// cross-species term; the WebAssembly kernel and fft.js agree to 1e-12 after a nonlinear run with
// gravity; and a tangent field with the linearised contact term is the derivative of the nonlinear
// step (finite differences whose error falls as ε¹: Taylor's theorem).
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver, type GravityKind } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import type { FieldKind } from "../../src/integrators/extra-fields.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { chooseTimestep } from "../../src/integrators/timestep.js";
import { evolve } from "../../src/simulation/evolve.js";
import { kineticEnergy, potentialEnergy } from "../../src/diagnostics/energies.js";
import { fillComplex, lumpy, maxAbs, maxAbsDiff, seededRandom } from "../helpers/fields.js";

type Backend = "wasm" | "js";

function stepper(grid: Grid, gravity: GravityKind, fft: Backend, contact: number, threads = 1, fields: FieldKind[] = []): SplitStepper {
  const g = makePoissonSolver(grid, gravity);
  const bg = new StaticBackground();
  return threads > 1 ? new ThreadedStepper(grid, bg, g, threads, fft, {}, fields, contact) : new SplitStepper(grid, bg, g, fft, 1, fields, contact);
}

/** RMS over cells of a complex field. */
function rms(a: Float64Array): number {
  let s = 0;
  for (const v of a) s += v * v;
  return Math.sqrt(s / (a.length / 2));
}

describe("the contact kick", () => {
  for (const [fft, threads] of [["wasm", 1], ["js", 1], ["wasm", 2]] as const) {
    it(`turns a uniform field at g ρ and each species at μ g_i ρ_i of its own density (${fft}, ${threads} thread${threads > 1 ? "s" : ""})`, () => {
      // i ∂ψ/∂t = g|ψ|²ψ with |ψ|² = ρ constant: ψ(t) = ψ(0) e^{−i g ρ t} (closed form); a species of mass
      // ratio μ is kicked by μ(φ + g_i|ψ_i|²), φ = 0 without gravity, and no other field's density enters
      const grid = new Grid([16, 8], [1, 1]);
      const [g, rho, gs, rhos, mu] = [-0.7, 3, 0.45, 5, 2];
      const s = stepper(grid, "none", fft, g, threads, [{ kind: "species", massRatio: mu, contact: gs }, { kind: "species", massRatio: 0.5 }]);
      try {
        s.setField(1, fillComplex(grid, () => [Math.sqrt(rhos), 0]));
        s.setField(2, fillComplex(grid, () => [1, 0]));
        s.setState(fillComplex(grid, () => [Math.sqrt(rho), 0]), 0);
        for (let i = 0; i < 7; i++) s.step(0.05);
        const t = s.time;
        const turned = (f: Float64Array) => Math.atan2(f[1]!, f[0]!);
        expect(Math.abs(turned(s.psi) - -g * rho * t)).toBeLessThan(1e-13);
        expect(Math.abs(turned(s.field(1)) - -mu * gs * rhos * t)).toBeLessThan(1e-13);
        expect(Math.abs(turned(s.field(2)))).toBeLessThan(1e-15);
        expect(maxAbsDiff(s.psi, fillComplex(grid, () => [Math.sqrt(rho) * Math.cos(g * rho * t), -Math.sqrt(rho) * Math.sin(g * rho * t)]))).toBeLessThan(1e-13);
      } finally {
        s.close();
      }
    });
  }

  const nonlinear = (fft: Backend, threads: number) => {
    const grid = new Grid([32, 32], [1, 1]);
    const s = stepper(grid, "periodic", fft, -0.004, threads);
    try {
      s.setState(lumpy(grid), 0);
      for (let i = 0; i < 12; i++) s.step(2e-3);
      return { psi: Float64Array.from(s.psi), phi: Float64Array.from(s.phi) };
    } finally {
      s.close();
    }
  };

  it("gives the same field on the WebAssembly kernel and on fft.js (an outside FFT) to 1e-12 after a nonlinear run, on 1 and 2 threads", () => {
    const js = nonlinear("js", 1);
    for (const threads of [1, 2]) {
      const wasm = nonlinear("wasm", threads);
      expect(maxAbsDiff(wasm.psi, js.psi) / maxAbs(js.psi)).toBeLessThan(1e-12);
      expect(maxAbsDiff(wasm.phi, js.phi) / maxAbs(js.phi)).toBeLessThan(1e-12);
    }
    // the contact term changed the field (g ρ K ≈ 0.03 rad over the run)
    const plain = (() => {
      const grid = new Grid([32, 32], [1, 1]);
      const s = stepper(grid, "periodic", "js", 0);
      s.setState(lumpy(grid), 0);
      for (let i = 0; i < 12; i++) s.step(2e-3);
      return Float64Array.from(s.psi);
    })();
    expect(maxAbsDiff(plain, js.psi) / maxAbs(js.psi)).toBeGreaterThan(1e-3);
  });
});

describe("the tangent field with a contact term", () => {
  const cases: [number[], GravityKind, Backend][] = [
    [[64], "periodic", "wasm"],
    [[32, 16], "isolated", "js"],
    [[64], "none", "js"],
  ];
  for (const [cells, gravity, fft] of cases) {
    it(`is the derivative of the nonlinear step: the finite-difference error falls as ε¹ (${cells.length}D ${gravity}, ${fft})`, () => {
      // dψ ← e^{−iK(φ+g|ψ|²)}(dψ − iK(dφ + 2g Re(ψ̄ dψ))ψ) is the exact derivative of the kick (Taylor's theorem:
      // (S(ψ + εu) − S(ψ))/ε − Tu = O(ε))
      const grid = new Grid(cells, cells.map(() => 1));
      const g = gravity === "none" ? 0.01 : 0.004;
      const psi = lumpy(grid);
      const r = seededRandom(5);
      const u = Float64Array.from({ length: psi.length }, () => 17 * (r() - 0.5));
      const advance = (s: SplitStepper) => {
        for (let i = 0; i < 4; i++) s.step(2e-3);
        s.saveUndo();
        s.step(3e-3);
        s.undo();
        for (let i = 0; i < 4; i++) s.step(2e-3);
      };
      const ref = stepper(grid, gravity, fft, g, 1, [{ kind: "tangent" }]);
      ref.setField(1, u);
      ref.setState(psi, 0);
      advance(ref);
      const s0 = Float64Array.from(ref.psi);
      const tu = Float64Array.from(ref.field(1));
      ref.close();
      const errors = [1e-2, 1e-3, 1e-4].map((e) => {
        const s = stepper(grid, gravity, fft, g);
        s.setState(psi.map((v, i) => v + e * u[i]!), 0);
        advance(s);
        const diff = s.psi.map((v, i) => (v - s0[i]!) / e - tu[i]!);
        s.close();
        return rms(diff) / rms(tu);
      });
      for (let i = 1; i < errors.length; i++) expect(Math.abs(Math.log10(errors[i - 1]! / errors[i]!) - 1)).toBeLessThan(0.03);
      expect(errors[0]!).toBeGreaterThan(1e-6);
    });
  }
});

describe("the contact term in the time step and the energy", () => {
  it("limits the step so that the contact phase in the densest cell is exactly πs (common practice), for ψ and for a species", () => {
    // a 1D box of 64 cells and side 2 holding ρ = ρ̄(1 + ε cos kx): max ρ = ρ̄(1 + ε) at x = 0 (analytic)
    const grid = new Grid([64], [2]);
    const [rhoBar, eps, safety] = [2, 0.3, 0.25];
    const psi = fillComplex(grid, (_x, _y, z) => [Math.sqrt(rhoBar * (1 + eps * Math.cos(Math.PI * z))), 0]);
    for (const [g, gs] of [[-4000, 0], [0, 9000]] as const) {
      const mu = 2;
      const s = stepper(grid, "periodic", "js", g, 1, [{ kind: "species", massRatio: mu, contact: gs }]);
      s.setField(1, psi);
      s.setState(psi, 0);
      const { dt, limiter } = chooseTimestep(s, { safety, maxDlnA: 0.01 });
      expect(limiter).toBe("contact");
      const rate = Math.max(Math.abs(g), mu * Math.abs(gs)) * rhoBar * (1 + eps);
      expect((rate * dt) / (Math.PI * safety)).toBeCloseTo(1, 12);
    }
  });

  it("conserves K + W + U in a static nonlinear run to the tolerance K + W has without the contact term", () => {
    // the energy of the Gross–Pitaevskii–Poisson system, K + W + (g/2)∫ρ² dV, is conserved by the flow (textbook);
    // the split-step keeps it to O(Δt²): the same 1e-4 of K₀ as the K + W test of split-step.test.ts
    // (measured: 1.1e-7 without g, 5.7e-7 and 7.0e-7 with g = ±0.02, while K + W alone moves by far more)
    const grid = new Grid([32, 32], [1, 1]);
    const worst = (g: number) => {
      const s = stepper(grid, "periodic", "js", g);
      s.setState(lumpy(grid), 0);
      const scratch = new Float64Array(2 * grid.size);
      const contact = () => 0.5 * g * s.moments().rho2 * grid.cellVolume;
      const kw = () => kineticEnergy(grid, s.psi, 1, s.fft, scratch) + potentialEnergy(grid, s.psi, s.phi, 1);
      const [kw0, u0] = [kw(), contact()];
      let [drift, kwDrift] = [0, 0];
      const onStep = () => {
        const k = kw();
        drift = Math.max(drift, Math.abs(k + contact() - kw0 - u0));
        kwDrift = Math.max(kwDrift, Math.abs(k - kw0));
      };
      const r = evolve(s, { safety: 0.0625, maxDlnA: 0.01 }, { endTime: 0.02, massTolerance: 1e-8, maxSteps: 1e5 }, { onStep });
      expect(r.status).toBe("completed");
      const k0 = kineticEnergy(grid, lumpy(grid), 1, s.fft, scratch);
      s.close();
      return { drift: drift / k0, kwDrift: kwDrift / k0, u0: Math.abs(u0) / k0 };
    };
    expect(worst(0).drift).toBeLessThan(1e-4);
    for (const g of [0.02, -0.02]) {
      const w = worst(g);
      expect(w.u0).toBeGreaterThan(1); // the contact energy is not a small part of the budget
      expect(w.drift).toBeLessThan(1e-4);
      expect(w.kwDrift).toBeGreaterThan(100 * w.drift); // and energy flows between U and K + W
    }
  });
});
