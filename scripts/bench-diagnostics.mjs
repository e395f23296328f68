#!/usr/bin/env node
// Time psibox analyze's field diagnostics on an n³ snapshot (default 256³) of a random-phase field full of vortex lines.
// Usage: npm run build && node --expose-gc scripts/bench-diagnostics.mjs [cells-per-axis]
// Prints the time of one split-step of the same grid (the unit the other times are given in), of each pure
// diagnostic on the step engine's transforms and threads, then of the whole analysis of the snapshot
// (tables and pictures, three Husimi points) in a process of its own: wall and CPU time and its peak memory.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot } from "../dist/io/snapshot.js";
import { Grid } from "../dist/grid/grid.js";
import { loadField, fieldStats } from "../dist/simulation/from-snapshot.js";
import { densityPdf, densityPowerSpectrum, kineticSplit } from "../dist/diagnostics/analysis.js";
import { energySplit } from "../dist/diagnostics/energy-split.js";
import { findVortices } from "../dist/diagnostics/vortices.js";
import { runBlockTask } from "../dist/diagnostics/block-tasks.js";
import { granuleStats } from "../dist/diagnostics/granules.js";
import { husimiAt } from "../dist/diagnostics/husimi.js";
import { husimiWindow, runChild, writeBenchSnapshot } from "./bench-analyze.mjs";
import { PooledTransforms } from "../dist/integrators/pooled-transforms.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { defaultThreads } from "../dist/config/resolve-output.js";

const eta = husimiWindow;
await loadHdf5();

const n = Number(process.argv[2] ?? 256);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-diagnostics-"));
const threads = defaultThreads([n, n, n]);
const grid0 = new Grid([n, n, n], [1, 1, 1]);
const fft = new PooledTransforms(grid0, 3, { threads });

// a random-phase field with granules of about 5 cells, mean density 1e7 Msun/kpc³ (scripts/bench-analyze.mjs)
const file = await writeBenchSnapshot(dir, n, fft);
const box = 100;
const field = loadField(readSnapshot(file));
const grid = new Grid([n, n, n], field.grid.lengths);
const seconds = (t0) => (performance.now() - t0) / 1000;
const row = (label, s, unit) => console.log(`${label.padEnd(36)} ${s.toFixed(2).padStart(7)} s ${(s / unit).toFixed(1).padStart(7)} steps`);
const load = () => os.loadavg().map((l) => l.toFixed(2)).join(", ");
console.log(`${n}³ random-phase field, ${os.cpus().length} cores, ${threads} threads, transforms on ${fft.backend}; load average ${load()} (the host may be shared: expect noisy times)`);

// the unit: one split-step of the same grid (periodic gravity, same threads), median of 3 after 2
const stepper = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), threads) : new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
stepper.setState(field.psi, 0);
const stepTimes = [];
for (let i = 0; i < 5; i++) {
  const t0 = performance.now();
  stepper.step(1e-7);
  if (i >= 2) stepTimes.push(seconds(t0));
}
stepper.close();
const step = stepTimes.sort((a, b) => a - b)[1];
console.log(`${"one split-step (the unit)".padEnd(36)} ${step.toFixed(2).padStart(7)} s`);
globalThis.gc?.();

const time = (label, f) => {
  const t0 = performance.now();
  const r = f();
  row(label, seconds(t0), step);
  return r;
};
time("density power spectrum", () => densityPowerSpectrum(grid, field.psi, fft));
time("density PDF (40 bins, this thread)", () => densityPdf(field.psi, 40, (blocks, task) => runBlockTask(task, 0, blocks)));
time("kinetic split (bulk, quantum, σ)", () => kineticSplit(grid, field.psi, 1, fft));
time("field stats (mass, K, W)", () => fieldStats(field, fft));
time("energy split and spectra", () => energySplit(grid, field.psi, 1, fft));
const v = time("vortex lines", () => findVortices(grid, field.psi));
console.log(`  ${v.points.length} piercings, line length ${(v.lineLength * box).toPrecision(4)} kpc, net charge ${v.netCharge}`);
time("granules (PDF, ξ(r), σ)", () => granuleStats(grid, field.psi, 1, fft));
time("Husimi at 3 points (η = 4 cells)", () => [0.2, 0.5, 0.8].map((x) => husimiAt(grid, field.psi, [x, x, x], eta(n))));
fft.close();

const whole = runChild("pictures", file, path.join(dir, "analysis"), n);
row("whole analysis with pictures (wall)", whole.wall, step);
console.log(`${"  CPU time (all threads)".padEnd(36)} ${whole.cpu.toFixed(2).padStart(7)} s`);
console.log(`${"  peak resident memory".padEnd(36)} ${whole.rssMB.toFixed(0).padStart(7)} MB (${(whole.rssMB / ((16 * n ** 3) / 2 ** 20)).toFixed(1)} complex grids of ${((16 * n ** 3) / 2 ** 20).toFixed(0)} MB)`);
console.log(`load average after: ${load()}`);
if (!process.env["KEEP"]) fs.rmSync(dir, { recursive: true, force: true });
else console.log(dir);
