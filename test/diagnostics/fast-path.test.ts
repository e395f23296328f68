// The diagnostics on the step engine's kernels and threads (PooledTransforms) against the same diagnostics on
// fft.js on this thread (SimpleTransforms; fft.js is a general-purpose library from the registry), on small grids,
// for both backends and one or two threads: every number agrees to 1e-12 of its scale.
import { afterAll, describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { ComplexFft, outerCount } from "../../src/fields/fft.js";
import { SimpleTransforms } from "../../src/fields/field-transforms.js";
import { PooledTransforms } from "../../src/integrators/pooled-transforms.js";
import { densestPoints, densityPdf, densityPowerSpectrum, kineticSplit, meanDensity, radialProfile } from "../../src/diagnostics/analysis.js";
import { runnerOf } from "../../src/diagnostics/block-tasks.js";
import { kineticFromGradient, periodicPotentialFromContrast } from "../../src/diagnostics/energies.js";
import { energyAndKineticSplit, energySplit } from "../../src/diagnostics/energy-split.js";
import { granuleStats } from "../../src/diagnostics/granules.js";
import { HusimiSampler, husimiWindowRange } from "../../src/diagnostics/husimi.js";
import { fieldStats, loadField } from "../../src/simulation/from-snapshot.js";
import { gaussianComplexField } from "../helpers/random-field.js";
import { blockTablesLength, blockTablesOf } from "../../src/diagnostics/block-tables.js";
import { modeShells } from "../../src/diagnostics/shells.js";

/** Largest |a − b| over every number in two results of the same shape, divided by `scale`. */
function worst(a: unknown, b: unknown, scale: number): number {
  if (typeof a === "number" && typeof b === "number") return a === b ? 0 : Math.abs(a - b) / scale;
  if (Array.isArray(a) || ArrayBuffer.isView(a)) {
    const x = a as ArrayLike<unknown>;
    const y = b as ArrayLike<unknown>;
    expect(x.length).toBe(y.length);
    return Array.from({ length: x.length }, (_, i) => worst(x[i], y[i], scale)).reduce((m, v) => Math.max(m, v), 0);
  }
  const keys = Object.keys(b as object);
  return keys.map((k) => worst((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], scale)).reduce((m, v) => Math.max(m, v), 0);
}

const cases = [
  { cells: [16, 16, 16], a: 0.7 },
  { cells: [32, 16], a: 1 },
  { cells: [64], a: 1 },
] as const;
const variants = [
  { backend: "wasm", threads: 2 },
  { backend: "wasm", threads: 1 },
  { backend: "js", threads: 2 },
] as const;
const opened: PooledTransforms[] = [];
afterAll(() => opened.forEach((t) => t.close()));

describe.each(cases)("$cells.length-D grid $cells", ({ cells, a }) => {
  const grid = new Grid([...cells], cells.map((_, i) => 1 + 0.25 * i));
  // a random field full of vortices on a mean: every part of every split is present
  const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 300), 3);
  for (let i = 0; i < grid.size; i++) psi[2 * i] = psi[2 * i]! + 0.5;
  const simple = () => new SimpleTransforms(grid.shape);

  it.each(variants)("$backend backend, $threads thread(s): a whole-grid transform equals fft.js to 1e-12", ({ backend, threads }) => {
    const fast = new PooledTransforms(grid, 3, { threads, backend });
    opened.push(fast);
    expect(fast.backend).toBe(backend);
    const ref = Float64Array.from(psi);
    new ComplexFft(grid.shape).forward(ref);
    const w = fast.work(1);
    w.set(psi);
    fast.forward(w);
    const scale = Math.max(...ref.map(Math.abs));
    expect(worst(w, ref, scale)).toBeLessThan(1e-12);
    fast.inverse(w);
    expect(worst(w, psi, Math.max(...psi.map(Math.abs)))).toBeLessThan(1e-12);
    // along one axis alone (the energy split's derivatives): fft.js's pass along that axis, and back
    for (const axis of [0, 1, 2].filter((ax) => grid.shape[ax]! > 1)) {
      const one = Float64Array.from(psi);
      new ComplexFft(grid.shape).pass(one, axis, false, 0, outerCount(grid.shape, axis));
      w.set(psi);
      fast.alongAxis(w, axis, false);
      expect(worst(w, one, Math.max(...one.map(Math.abs)))).toBeLessThan(1e-12);
      fast.alongAxis(w, axis, true);
      expect(worst(w, psi, Math.max(...psi.map(Math.abs)))).toBeLessThan(1e-12);
    }
    expect(() => fast.forward(Float64Array.from(psi))).toThrow(/work grids/);
    // with its threads stopped, a transform and a block pass run on this thread: the same bits (fft.js's to 1e-12)
    w.set(psi);
    fast.forward(w);
    const pooled = Float64Array.from(w);
    const pdf = densityPdf(psi, 40, runnerOf(fast, w));
    void fast.close();
    w.set(psi);
    fast.forward(w);
    expect(w).toStrictEqual(pooled);
    expect(densityPdf(psi, 40, runnerOf(fast, w))).toStrictEqual(pdf);
  });

  it.each(variants)("$backend backend, $threads thread(s): energy split, kinetic split, P(k), granules and field energies agree to 1e-12 (on the two work grids analyze has)", ({ backend, threads }) => {
    const fast = new PooledTransforms(grid, 2, { threads, backend });
    opened.push(fast);
    const split = energySplit(grid, psi, a, simple());
    const both = energyAndKineticSplit(grid, psi, a, fast);
    expect(worst(both.split, split, split.kinetic)).toBeLessThan(1e-12);
    // ψ in shared memory, as analyze reads it: the split's passes run on the pool's threads, with the same numbers bit for bit, every time
    const shared = new Float64Array(new SharedArrayBuffer(psi.byteLength));
    shared.set(psi);
    const threaded = energyAndKineticSplit(grid, shared, a, fast);
    expect(threaded).toStrictEqual(both);
    expect(energyAndKineticSplit(grid, shared, a, fast)).toStrictEqual(threaded);
    expect(densityPdf(shared, 40, runnerOf(fast, shared))).toStrictEqual(densityPdf(psi));
    const kinetic = kineticSplit(grid, psi, a, simple());
    expect(worst(both.kinetic, kinetic, kinetic.kinetic)).toBeLessThan(1e-12);
    expect(worst(kineticSplit(grid, psi, a, fast), kinetic, kinetic.kinetic)).toBeLessThan(1e-12);
    const power = densityPowerSpectrum(grid, psi, simple());
    expect(worst(densityPowerSpectrum(grid, psi, fast), power, Math.max(...power.map((b) => b.power)))).toBeLessThan(1e-12);
    const granules = granuleStats(grid, psi, a, simple());
    const g = granuleStats(grid, psi, a, fast);
    // with the inputs analyze has measured already (δ's spectrum from P(k) in work grid 1, the moments from the split): the same numbers bit for bit
    densityPowerSpectrum(grid, psi, fast, 1);
    expect(granuleStats(grid, psi, a, fast, undefined, undefined, { contrastSpectrum: fast.work(1), moments: both.moments })).toEqual(g);
    // ρ̄ from the split's Σ|ψ|²: meanDensity's number, and the granules and P(k) given it the same
    expect(both.meanDensity).toBe(meanDensity(psi));
    densityPowerSpectrum(grid, psi, fast, 1, both.meanDensity);
    expect(granuleStats(grid, psi, a, fast, undefined, undefined, { contrastSpectrum: fast.work(1), moments: both.moments, meanDensity: both.meanDensity })).toEqual(g);
    densityPowerSpectrum(grid, psi, fast, 1);
    expect(granuleStats(grid, psi, a, fast, undefined, undefined, { contrastSpectrum: fast.work(1) })).toEqual(g);
    expect(worst(g.correlation, granules.correlation, granules.correlation[0]!.xi)).toBeLessThan(1e-12);
    expect(worst(g.pdf, granules.pdf, 1)).toBeLessThan(1e-12);
    for (const key of ["variance", "gammaShape", "correlationLength", "predictedLength", "velocityDispersion", "quasiParticleMass", "predictedQuasiParticleMass"] as const) {
      expect(worst(g[key], granules[key], Math.abs(granules[key]))).toBeLessThan(1e-12);
    }
 
    // a work grid lent as scratch changes nothing
    expect(densestPoints(grid, psi, 3, 2, fast.work(0))).toEqual(densestPoints(grid, psi, 3, 2));
  });
});

describe("the Husimi sampler's sub-box", () => {
  it.each(["wasm", "js"] as const)("on the step's %s kernels on this thread (as analyze runs it) equals fft.js's samples to 1e-12", (backend) => {
    const grid = new Grid([32, 16, 16], [1, 0.5, 0.5]);
    const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 300), 5);
    const eta = husimiWindowRange(grid).max;
    const ref = new HusimiSampler(grid, eta);
    const pooled = new HusimiSampler(grid, eta, (c) => new PooledTransforms(new Grid(c, c.map(() => 1)), 1, { threads: 1, backend }));
    expect(pooled.cells).toEqual([16, 16, 16]);
    const [f0, f1] = [new Float64Array(ref.size), new Float64Array(ref.size)];
    for (const x of [[0.3, 0.1, 0.2], [0.9, 0.45, 0.02]]) {
      ref.sample(psi, x, f0);
      pooled.sample(psi, x, f1);
      expect(worst(f1, f0, Math.max(...f0))).toBeLessThan(1e-12);
    }
  });
});

describe("field energies of a snapshot", () => {
  it("K and the periodic W from the transforms' spectra equal a stepper's (periodic Poisson solve, real-space Σ ρφ) to 1e-12", () => {
    const cells = [16, 16, 16];
    const grid = new Grid(cells, [1, 1, 1]);
    const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 300), 9);
    for (let i = 0; i < grid.size; i++) psi[2 * i] = psi[2 * i]! + 1;
    const meta = { kind: "snapshot", software: "test", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 0.5, redshift: 1, cells, boxSizeKpc: [50, 50, 50], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1e9, config: "", configSha256: "" } as const;
    const field = loadField({ meta, psi } as unknown as Parameters<typeof loadField>[0]);
    const reference = fieldStats(field);
    const fast = new PooledTransforms(field.grid, 3, { threads: 2, backend: "wasm" });
    opened.push(fast);
    const stats = fieldStats(field, fast);
    expect(Math.abs(stats.kineticMsunKm2S2 / reference.kineticMsunKm2S2 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(stats.potentialMsunKm2S2 / reference.potentialMsunKm2S2 - 1)).toBeLessThan(1e-12);
    expect(reference.potentialMsunKm2S2).toBeLessThan(0);
    // as psibox analyze measures them: K from the energy split's moments of ψ's spectrum, W from the spectrum of δ that P(k) leaves
    const a = field.scaleFactor;
    const { moments } = energyAndKineticSplit(field.grid, field.psi, a, fast);
    densityPowerSpectrum(field.grid, field.psi, fast, 1);
    const known = { kinetic: kineticFromGradient(field.grid, moments.k2, a), periodicPotential: periodicPotentialFromContrast(field.grid, fast.work(1), meanDensity(field.psi), a) };
    const measured = fieldStats(field, fast, known);
    expect(Math.abs(measured.kineticMsunKm2S2 / reference.kineticMsunKm2S2 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(measured.potentialMsunKm2S2 / reference.potentialMsunKm2S2 - 1)).toBeLessThan(1e-12);
    expect({ ...measured, kineticMsunKm2S2: 0, potentialMsunKm2S2: 0, totalMsunKm2S2: 0, virialRatio: 0 }).toEqual({ ...reference, kineticMsunKm2S2: 0, potentialMsunKm2S2: 0, totalMsunKm2S2: 0, virialRatio: 0 });
  });
});

describe("the passes in WebAssembly (the tables analyze gives the transforms, ψ in their third work grid)", () => {
  it.each(cases)("$cells: energy split, P(k), the PDF, the periodic W, the granules, the densest points and their profiles are the same bits as the passes in JavaScript, on 1 and 2 threads, every time", ({ cells, a }) => {
    const grid = new Grid([...cells], cells.map((_, i) => 1 + 0.25 * i));
    const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 300), 7);
    for (let i = 0; i < grid.size; i++) psi[2 * i] = psi[2 * i]! + 0.5;
    const measure = (fft: PooledTransforms) => {
      const on = fft.work(2);
      on.set(psi);
      const both = energyAndKineticSplit(grid, on, a, fft);
      const power = densityPowerSpectrum(grid, on, fft, 0, both.meanDensity);
      const pdf = densityPdf(on, 40, runnerOf(fft, on), blockTablesOf(fft, grid, on));
      // the periodic W from δ's spectrum that P(k) leaves
      const potential = periodicPotentialFromContrast(grid, fft.work(0), both.meanDensity, a, blockTablesOf(fft, grid, on));
      // as analyze measures the granules: from δ's spectrum that P(k) leaves, with the split's moments and ρ̄
      const granules = granuleStats(grid, on, a, fft, undefined, undefined, { contrastSpectrum: fft.work(0), moments: both.moments, meanDensity: both.meanDensity });
      // and on their own (δ and ψ's spectrum transformed here)
      const alone = granuleStats(grid, on, a, fft);
      // the densest points (work grid 1 their scratch) and the profiles around them
      const tables = blockTablesOf(fft, grid, on);
      const peaks = densestPoints(grid, on, 5, 2, fft.work(1), tables);
      const profiles = peaks.map((p) => radialProfile(grid, on, p.coords, Math.min(...grid.lengths) / 4, tables));
      return { both, power, pdf, potential, granules, alone, peaks, profiles, wasm: tables !== undefined };
    };
    const plain = new PooledTransforms(grid, 3, { threads: 1, backend: "wasm" });
    opened.push(plain);
    const reference = measure(plain);
    expect(reference.wasm).toBe(false);
    // and the JavaScript passes agree with fft.js's analysis (the tests above) to 1e-12
    const split = energySplit(grid, psi, a, new SimpleTransforms(grid.shape));
    expect(worst(reference.both.split, split, split.kinetic)).toBeLessThan(1e-12);
    for (const threads of [1, 2]) {
      const fast = new PooledTransforms(grid, 3, { threads, backend: "wasm", tables: blockTablesLength(grid) });
      opened.push(fast);
      const first = measure(fast);
      expect(first.wasm).toBe(true);
      expect({ ...first, wasm: false }).toStrictEqual(reference);
      expect({ ...measure(fast), wasm: false }).toStrictEqual(reference);
    }
  });

  it("the shells of the half space equal modeShells' shell of every mode (c > n2/2 by its mirror n2 − c), Σ|k| and mode counts bit for bit", () => {
    const grid = new Grid([16, 8, 32], [1, 0.7, 1.3]);
    const fast = new PooledTransforms(grid, 3, { threads: 1, backend: "wasm", tables: blockTablesLength(grid) });
    opened.push(fast);
    const tables = blockTablesOf(fast, grid)!;
    const full = modeShells(grid);
    const [n0, n1, n2] = grid.shape;
    const half = n2 / 2;
    for (let r = 0; r < n0 * n1; r++) for (let c = 0; c < n2; c++) expect(tables.bins[r * (half + 1) + (c <= half ? c : n2 - c)]).toBe(full.bins[r * n2 + c]);
    expect(tables.ksum).toStrictEqual(full.ksum);
    expect(tables.modes).toStrictEqual(full.modes);
  });

  it("a plane wave ψ = √ρ̄ e^{ik·x} measured there has no quantum part and K = ½ M k²/a² (textbook)", () => {
    const grid = new Grid([16, 16, 16], [1, 1, 1]);
    const a = 0.8;
    const k = [2 * Math.PI * 2, 2 * Math.PI * -1, 2 * Math.PI * 3];
    const fast = new PooledTransforms(grid, 3, { threads: 2, backend: "wasm", tables: blockTablesLength(grid) });
    opened.push(fast);
    const on = fast.work(2);
    for (let i = 0; i < 16; i++)
      for (let j = 0; j < 16; j++)
        for (let l = 0; l < 16; l++) {
          const phase = (k[0]! * i + k[1]! * j + k[2]! * l) / 16;
          const p = 2 * ((i * 16 + j) * 16 + l);
          on[p] = Math.sqrt(3) * Math.cos(phase);
          on[p + 1] = Math.sqrt(3) * Math.sin(phase);
        }
    expect(blockTablesOf(fast, grid, on)).toBeDefined();
    const s = energyAndKineticSplit(grid, on, a, fast).split;
    const kinetic = (0.5 * 3 * (k[0]! ** 2 + k[1]! ** 2 + k[2]! ** 2)) / (a * a);
    expect(Math.abs(s.kinetic / kinetic - 1)).toBeLessThan(1e-12);
    expect(Math.abs(s.quantum) / kinetic).toBeLessThan(1e-12);
    expect(Math.abs(s.incompressible / kinetic - 1)).toBeLessThan(1e-12);
  });
});

describe("the local maxima in WebAssembly", () => {
  it("found a few rows at a time into a small room are every cell no neighbour exceeds (checked cell by cell here), in storage order", () => {
    const grid = new Grid([8, 16, 32], [1, 1, 1]);
    const fast = new PooledTransforms(grid, 3, { threads: 1, backend: "wasm", tables: blockTablesLength(grid) });
    opened.push(fast);
    const tables = blockTablesOf(fast, grid)!;
    const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 100), 11);
    const rho = fast.work(1).subarray(0, grid.size);
    for (let i = 0; i < grid.size; i++) rho[i] = Math.round(4 * (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2)) / 4;
    const [n0, n1, n2] = grid.shape;
    const expected: number[] = [];
    for (let a = 0; a < n0; a++)
      for (let b = 0; b < n1; b++)
        for (let c = 0; c < n2; c++) {
          const v = rho[(a * n1 + b) * n2 + c]!;
          const at = (x: number, y: number, z: number) => rho[(((x + n0) % n0) * n1 + ((y + n1) % n1)) * n2 + ((z + n2) % n2)]!;
          if ([at(a + 1, b, c), at(a - 1, b, c), at(a, b + 1, c), at(a, b - 1, c), at(a, b, c + 1), at(a, b, c - 1)].every((u) => u <= v)) expected.push((a * n1 + b) * n2 + c);
        }
    // rounded densities: ties between neighbours, which both count
    expect(expected.length).toBeGreaterThan(40);
    for (const room of [tables.sums.subarray(0, 17), tables.sums.subarray(0, 40), tables.sums]) expect(Array.from(tables.kernels.peakCandidates(rho, grid.shape, room))).toEqual(expected);
  });
});
