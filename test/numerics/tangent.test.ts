// The tangent-linear field: the exact derivative of the split-step map. Checked against finite
// differences of the nonlinear step (the error of (S(ψ + εu) − S(ψ))/ε − Tu must fall as ε¹: a
// measured order, Taylor's theorem), against the phase symmetry of the equations (T(iψ) = iS(ψ)
// exactly), between the two FFT backends and between thread counts.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import type { FieldKind } from "../../src/integrators/extra-fields.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { lumpy, seededRandom } from "../helpers/fields.js";

type Backend = "wasm" | "js";
type Gravity = "periodic" | "isolated";
const TANGENT: FieldKind[] = [{ kind: "tangent" }];

function stepper(grid: Grid, gravity: Gravity, fft: Backend, threads = 1, fields: FieldKind[] = []): SplitStepper {
  const g = makePoissonSolver(grid, gravity);
  return threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), g, threads, fft, {}, fields) : new SplitStepper(grid, new StaticBackground(), g, fft, 1, fields);
}

/** A random complex field of RMS amplitude `amp` (seeded). */
function noise(grid: Grid, amp: number, seed: number): Float64Array {
  const r = seededRandom(seed);
  return Float64Array.from({ length: 2 * grid.size }, () => amp * Math.sqrt(3) * r());
}

/** RMS over cells of a complex field. */
function rms(a: Float64Array): number {
  let s = 0;
  for (const v of a) s += v * v;
  return Math.sqrt(s / (a.length / 2));
}

/** Ten steps, with a read of the tangent (which applies its owed kick apart) and an undone step among them. */
function advance(s: SplitStepper, readTangent: boolean): void {
  for (let i = 0; i < 4; i++) s.step(2e-3);
  if (readTangent) s.field(1);
  s.saveUndo();
  s.step(3e-3);
  s.undo();
  for (let i = 0; i < 6; i++) s.step(2e-3);
}

const CASES: [number[], Gravity][] = [
  [[64], "periodic"],
  [[16, 16, 16], "periodic"],
  [[32, 16], "isolated"],
];

describe("tangent field against finite differences of the nonlinear step", () => {
  for (const fft of ["wasm", "js"] as const) {
    for (const [cells, gravity] of CASES) {
      it(`the error falls as ε¹ over three decades of ε (${cells.length}D ${gravity}, ${fft})`, () => {
        const grid = new Grid(cells, cells.map(() => 1));
        const psi = lumpy(grid);
        const u = noise(grid, rms(psi), 7);
        const ref = stepper(grid, gravity, fft, 1, TANGENT);
        ref.setField(1, u);
        ref.setState(psi, 0);
        advance(ref, true);
        const s0 = Float64Array.from(ref.psi);
        const tu = Float64Array.from(ref.field(1));
        ref.close();
        const eps = [1e-2, 1e-3, 1e-4, 1e-5];
        const errors = eps.map((e) => {
          const s = stepper(grid, gravity, fft);
          s.setState(psi.map((v, i) => v + e * u[i]!), 0);
          advance(s, false);
          const out = s.psi;
          const diff = out.map((v, i) => (v - s0[i]!) / e - tu[i]!);
          s.close();
          return rms(diff) / rms(tu);
        });
        // the measured order between successive decades (Taylor: 1), and the error is the second-order term, not round-off
        const orders = errors.slice(1).map((err, i) => Math.log10(errors[i]! / err));
        // (measured: 1D 3.9e-4 … 3.9e-7, 3D 1.5e-4 … 1.5e-7, 2D isolated 1.1e-2 … 1.1e-5, orders 1.000 ± 0.001)
        for (const p of orders) expect(Math.abs(p - 1)).toBeLessThan(0.03);
        expect(errors[0]!).toBeGreaterThan(1e-5);
      });
    }
  }
});

describe("tangent field: symmetry, projections, backends, threads", () => {
  it("the phase direction iψ is carried exactly into iS(ψ) (phase symmetry of the equations)", () => {
    const grid = new Grid([16, 16, 16], [1, 1, 1]);
    const psi = lumpy(grid);
    const s = stepper(grid, "periodic", "wasm", 1, TANGENT);
    s.setField(1, psi.map((_, i) => (i % 2 === 0 ? -psi[i + 1]! : psi[i - 1]!)));
    s.setState(psi, 0);
    advance(s, true);
    const out = s.psi;
    const t = s.field(1);
    const diff = t.map((v, i) => v - (i % 2 === 0 ? -out[i + 1]! : out[i - 1]!));
    expect(rms(diff) / rms(out)).toBeLessThan(1e-12);
    s.close();
  });

  it("combineField removes the overlap with ψ and scales: ⟨ψ|dψ⟩ → 0 to round-off, ‖dψ‖ as asked", () => {
    const grid = new Grid([32, 32], [1, 1]);
    const psi = lumpy(grid);
    const s = stepper(grid, "periodic", "js", 1, TANGENT);
    s.setField(1, noise(grid, 3, 11).map((v, i) => v + 0.5 * psi[i]!));
    s.setState(psi, 0);
    for (let i = 0; i < 3; i++) s.step(2e-3);
    const o = s.fieldOverlap(1);
    const mass = s.mass;
    const perp = o.norm2 - (o.re * o.re + o.im * o.im) / mass;
    s.combineField(1, 2 / Math.sqrt(perp), o.re / mass, o.im / mass);
    const after = s.fieldOverlap(1);
    expect(Math.hypot(after.re, after.im) / Math.sqrt(mass * after.norm2)).toBeLessThan(1e-13);
    expect(Math.abs(after.norm2 / 4 - 1)).toBeLessThan(1e-12);
    s.close();
  });

  const run = (fft: Backend, threads: number) => {
    const grid = new Grid([16, 16, 16], [1, 1, 1]);
    const s = stepper(grid, "periodic", fft, threads, [{ kind: "tangent" }, { kind: "tangent" }]);
    s.setField(1, noise(grid, 5, 3));
    s.setField(2, noise(grid, 5, 4));
    s.setState(lumpy(grid), 0);
    advance(s, true);
    const out = [Float64Array.from(s.field(1)), Float64Array.from(s.field(2))];
    s.close();
    return out;
  };

  it("the two FFT backends agree to 1e-12 relative after a nonlinear run (fft.js, an outside DFT)", () => {
    const wasm = run("wasm", 1);
    const js = run("js", 1);
    for (let f = 0; f < 2; f++) {
      const diff = wasm[f]!.map((v, i) => v - js[f]![i]!);
      expect(rms(diff) / rms(js[f]!)).toBeLessThan(1e-12);
    }
  });

  it("is bit for bit the same on a repeat and on 1 or 2 threads", () => {
    const one = run("wasm", 1);
    const again = run("wasm", 1);
    const two = run("wasm", 2);
    for (let f = 0; f < 2; f++) {
      expect(Buffer.from(again[f]!.buffer).equals(Buffer.from(one[f]!.buffer))).toBe(true);
      expect(Buffer.from(two[f]!.buffer).equals(Buffer.from(one[f]!.buffer))).toBe(true);
    }
  });

  it("is refused beside a species", () => {
    const grid = new Grid([16], [1]);
    expect(() => stepper(grid, "periodic", "js", 1, [{ kind: "tangent" }, { kind: "species", massRatio: 2 }])).toThrow(/species/);
  });
});
