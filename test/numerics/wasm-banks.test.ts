// The wasm step on banks (grids spread over several WebAssembly memories, for grids beyond one 4 GiB
// memory), forced on small grids: the same field bit for bit as the wasm step on one memory, and to
// 1e-12 as the step on fft.js (a general-purpose FFT library from the npm registry), on 1 and 2 threads.
import { afterEach, describe, expect, it } from "vitest";
import { Grid, type Triple } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { LcdmBackground, StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { ThreadedStepper } from "../../src/integrators/threaded-step.js";
import { resolveFftBackend } from "../../src/integrators/fft-backend.js";
import { StepPlan } from "../../src/integrators/step-plan.js";
import type { FieldKind } from "../../src/integrators/extra-fields.js";
import { ELEMENT_BYTES, isGridRegion, stepGeometry, stepRegions, WASM_MAX_BYTES, type GravityKind } from "../../src/fields/step-memory.js";
import { bankedLayout, setWasmBanks } from "../../src/fields/wasm-banks.js";
import { evolve } from "../../src/simulation/evolve.js";
import { ConfigError } from "../../src/core/errors.js";
import { lumpy, maxAbs, maxAbsDiff, seededRandom } from "../helpers/fields.js";

interface Setup {
  readonly cells: readonly number[];
  readonly gravity: "periodic" | "isolated";
  readonly fields?: readonly FieldKind[];
  readonly contact?: number;
}

/**
 * Banks as large as the largest grid (every grid alone, periodic) or twice that (ψ with φ, the undo copy
 * with the spectrum, as at 512³).
 */
function force(cells: readonly number[], gravity: GravityKind, perBank: number): void {
  const shape = new Grid([...cells], cells.map(() => 1)).shape;
  const largest = Math.max(...stepRegions(stepGeometry(shape, gravity), [], 1).filter((r) => isGridRegion(r.name)).map((r) => ELEMENT_BYTES[r.type] * r.length));
  // a window of 64 bytes is widened to one row's worth: chunks of one row
  setWasmBanks({ gridBytes: perBank * largest, windowBytes: 64 });
}

function run(s: Setup, fft: "wasm" | "js", threads: number, banks?: number) {
  if (banks !== undefined) force(s.cells, s.gravity, banks);
  const grid = new Grid([...s.cells], s.cells.map(() => 1));
  const bg = s.gravity === "periodic" ? new LcdmBackground({ hubble0: 30, omegaMatter: 0.3, omegaRadiation: 0 }) : new StaticBackground();
  const t0 = bg.kind === "lcdm" ? bg.time(0.3) : 0;
  const solver = makePoissonSolver(grid, s.gravity);
  const fields = s.fields ?? [];
  const stepper = threads === 1 ? new SplitStepper(grid, bg, solver, fft, 1, fields, s.contact ?? 0) : new ThreadedStepper(grid, bg, solver, threads, fft, {}, fields, s.contact ?? 0);
  setWasmBanks();
  try {
    const psi = lumpy(grid);
    const r = seededRandom(3);
    for (let i = 1; i <= fields.length; i++) stepper.setField(i, psi.map((v) => 0.1 * v + r()));
    stepper.setState(psi, t0);
    stepper.trackKinetic = true;
    const e = evolve(stepper, { safety: 0.25, maxDlnA: 0.01 }, { endTime: t0 + 0.004, massTolerance: 1e-8, maxSteps: 60 });
    stepper.saveUndo();
    const extra = fields.map((_, i) => Float64Array.from(stepper.field(i + 1)));
    return { psi: Float64Array.from(stepper.psi), phi: Float64Array.from(stepper.phi), steps: e.steps, kinetic: stepper.midKineticTilde, extra, kineticNow: stepper.kineticTilde() };
  } finally {
    stepper.close();
  }
}

const same = (a: Float64Array, b: Float64Array) => Buffer.from(a.buffer).equals(Buffer.from(b.buffer));

describe("the wasm step on several memories", () => {
  afterEach(() => setWasmBanks());

  const cases: readonly Setup[] = [
    { cells: [16, 16, 16], gravity: "periodic" },
    { cells: [16, 8, 16], gravity: "isolated" },
    { cells: [16384], gravity: "periodic" },
    { cells: [16, 16, 8], gravity: "periodic", fields: [{ kind: "tangent" }], contact: 0.002 },
  ];
  for (const s of cases) {
    const name = `${s.cells.join("×")} ${s.gravity}${s.fields ? " with a tangent field and a contact term" : ""}`;
    it(`${name}: bit for bit the one-memory wasm field on 1 and 2 threads, and fft.js's to 1e-12`, () => {
      const one = run(s, "wasm", 1);
      const js = run(s, "js", 1);
      expect(one.steps).toBeGreaterThan(5);
      for (const [threads, banks] of [[1, 1], [2, 1], [2, 2]] as const) {
        const banked = run(s, "wasm", threads, banks);
        expect(banked.steps).toBe(one.steps);
        expect(same(banked.psi, one.psi), `ψ, ${threads} threads, ${banks} grids a bank`).toBe(true);
        expect(same(banked.phi, one.phi), `φ, ${threads} threads, ${banks} grids a bank`).toBe(true);
        banked.extra.forEach((f, i) => expect(same(f, one.extra[i]!)).toBe(true));
        expect(Math.abs(banked.kinetic / one.kinetic - 1)).toBeLessThan(1e-12);
        expect(Math.abs(banked.kineticNow / one.kineticNow - 1)).toBeLessThan(1e-12);
        expect(maxAbsDiff(banked.psi, js.psi) / maxAbs(js.psi)).toBeLessThan(1e-12);
        expect(maxAbsDiff(banked.phi, js.phi) / maxAbs(js.phi)).toBeLessThan(1e-12);
      }
    });
  }

  it("repeats bit for bit, and a state restored mid-run continues bit for bit (as a checkpoint resumes)", () => {
    const cells = [16, 16, 16];
    const grid = new Grid(cells, [1, 1, 1]);
    const make = () => {
      force(cells, "periodic", 1);
      const s = new ThreadedStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), 2, "wasm");
      setWasmBanks();
      return s;
    };
    const a = make();
    const b = make();
    try {
      for (const s of [a, b]) s.setState(lumpy(grid), 0);
      for (let i = 0; i < 4; i++) for (const s of [a, b]) s.step(2e-4);
      expect(same(a.rawPsi, b.rawPsi)).toBe(true);
      // the checkpoint: ψ as stored, φ, time, mass and the owed kick
      const saved = { psi: Float64Array.from(a.rawPsi), phi: Float64Array.from(a.phi), time: a.time, mass: a.mass, owed: a.owedKickFactor };
      b.close();
      const c = make();
      c.restoreState(saved.psi, saved.phi, saved.time, saved.mass, saved.owed);
      for (let i = 0; i < 4; i++) for (const s of [a, c]) s.step(2e-4);
      expect(same(a.psi, c.psi)).toBe(true);
      expect(same(a.phi, c.phi)).toBe(true);
      c.close();
    } finally {
      a.close();
      b.close();
    }
  });

  it("auto takes the wasm kernels at 512³ (ψ and φ in one 4 GiB memory, the undo copy and the spectrum in another) and fft.js where one field exceeds 4 GiB", () => {
    const plan = (shape: Triple, gravity: GravityKind) => new StepPlan(stepGeometry(shape, gravity));
    const p = plan([512, 512, 512], "periodic");
    expect(resolveFftBackend("auto", p, 2)).toBe("wasm");
    expect(resolveFftBackend("wasm", p, 2)).toBe("wasm");
    const layout = bankedLayout(stepRegions(p.geometry, p.transforms(), 2), 2, 512)!;
    expect(layout.sizes.length).toBe(2);
    for (const size of layout.sizes) expect(size).toBeLessThanOrEqual(WASM_MAX_BYTES);
    const bankOf = (name: string) => layout.banks[layout.specs.findIndex((s) => s.name === name)];
    expect([bankOf("psi"), bankOf("phi"), bankOf("undo"), bankOf("spectrum")]).toEqual([0, 0, 1, 1]);
    // a 512×256² isolated grid pads to 1024×512×512: its padded arrays go to banks of their own
    expect(resolveFftBackend("auto", plan([512, 256, 256], "isolated"), 2)).toBe("wasm");
    // 1024³: ψ alone is 16 GiB
    expect(resolveFftBackend("auto", plan([1024, 1024, 1024], "periodic"), 2)).toBe("js");
    expect(() => resolveFftBackend("wasm", plan([1024, 1024, 1024], "periodic"), 2)).toThrow(ConfigError);
  });
});
