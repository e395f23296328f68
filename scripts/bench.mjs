#!/usr/bin/env node
// Time per split-step of psibox's solver, from the built library (npm run bench builds it first).
// Prints ms per step (median), ns per cell-step, nominal GFLOP/s and peak resident memory.
// When python3 with NumPy is available it also runs scripts/numpy_step.py, NumPy's version of the
// identical step, checks that both give the same field to 1e-10 and prints the time ratio.
// It ends with the real run against the bare step (scripts/bench-run.mjs): 128³, and 256³ with --large; then
// psibox analyze of a 128³ snapshot with and without pictures (scripts/bench-analyze.mjs) and the snapshot
// write and read speed against h5py's read (scripts/bench-io.mjs), and the thread crossover (scripts/bench-threads.mjs).
// When a python3 with pyFFTW is there, the 3D step against FFTW comes before the real run (scripts/bench-fftw.mjs; --fftw-only: just that).
// Usage: node scripts/bench.mjs [--large] [--steps N] [--no-numpy] [--threads N] [--fft auto|wasm|js] [--tangents-only] [--real-run-only] [--long-only]
//   [--analyze-only] [--io-only] [--crossover-only] [--fftw-only [--rounds N]] [--huge]
// (threads default to the number of cores; the fft backend to auto, and the 3D grids are also run on the other backend)
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { readNpyComplex } from "../dist/io/npy.js";
import { printRealRunRows } from "./bench-run.mjs";
import { printAnalyzeRows } from "./bench-analyze.mjs";
import { printIoRows } from "./bench-io.mjs";
import { printCrossoverRows } from "./bench-threads.mjs";
import { printHugeRows } from "./bench-huge.mjs";
import { defaultThreads } from "../dist/config/resolve-output.js";
import { benchField, writeNpy } from "./bench-field.mjs";
import { printFftwRows } from "./bench-fftw.mjs";

const args = process.argv.slice(2);
const large = args.includes("--large");
const stepsArg = args.indexOf("--steps");
const steps = stepsArg >= 0 ? Number(args[stepsArg + 1]) : 5;
const threadsArg = args.indexOf("--threads");
const threads = threadsArg >= 0 ? Number(args[threadsArg + 1]) : os.availableParallelism();
const fftArg = args.indexOf("--fft");
const fft = fftArg >= 0 ? args[fftArg + 1] : "auto";
const makeStepper = (grid, gravity, t, backend = fft, tangents = 0) => {
  const fields = Array.from({ length: tangents }, () => ({ kind: "tangent" }));
  return t > 1
    ? new ThreadedStepper(grid, new StaticBackground(), makePoissonSolver(grid, gravity), t, backend, {}, fields)
    : new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, gravity), backend, 1, fields);
};

const field = benchField;

function bench(cells, gravity = "periodic", t = 1, backend = fft, tangents = 0) {
  const grid = new Grid(cells, cells.map(() => 1));
  const stepper = makeStepper(grid, gravity, t, backend, tangents);
  const psi = field(grid);
  // tangent fields (breakdown.tangent, breakdown.probes): perturbations of the same size as ψ
  for (let i = 1; i <= tangents; i++) stepper.setField(i, psi.map((v, j) => (j % 2 === 0 ? 0.01 * i * v : 0)));
  stepper.setState(psi, 0);
  // a step the phase rule would allow (highest mode turns by at most 2 rad): huge phases would time the
  // sin/cos library's large-argument path instead of the step
  const kMax = Math.PI * Math.max(...cells);
  const dt = Math.min(1e-5, 4 / (kMax * kMax));
  stepper.step(dt);
  stepper.step(dt);
  globalThis.gc?.();
  const heapBefore = process.memoryUsage().heapUsed;
  const times = [];
  for (let i = 0; i < steps; i++) {
    const t0 = performance.now();
    stepper.step(dt);
    times.push(performance.now() - t0);
  }
  const heapGrowth = process.memoryUsage().heapUsed - heapBefore;
  times.sort((a, b) => a - b);
  stepper.close();
  const ms = times[Math.floor(times.length / 2)];
  const n = grid.size;
  // nominal work: one complex FFT pair (2 × 5 N log2 N) plus one real FFT pair (about half that)
  const flops = 15 * n * Math.log2(n);
  const extra = tangents > 0 ? ` +${tangents} tangent` : "";
  return { label: `${cells.length}D ${cells.join("×")} ${gravity}${t > 1 ? ` ${t}t` : ""} ${stepper.backend}${extra}`, ms, nsPerCell: (ms * 1e6) / n, gflops: flops / (ms * 1e6), heapGrowth };
}

const here = path.dirname(fileURLToPath(import.meta.url));
const useNumpy = !args.includes("--no-numpy") && spawnSync("python3", ["-c", "import numpy"]).status === 0;

/** psibox and NumPy on the same field: ms/step of each and the largest difference after `steps` steps. */
function compareWithNumpy(shape, t = threads) {
  const grid = new Grid(shape, shape.map(() => 1));
  const psi0 = field(grid);
  const kMax = Math.PI * Math.max(...shape); // a step the phase rule would allow, as in bench()
  const dt = Math.min(1e-5, 4 / (kMax * kMax));
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-"));
  try {
    writeNpy(path.join(dir, "in.npy"), shape, psi0);
    const r = spawnSync("python3", [path.join(here, "numpy_step.py"), path.join(dir, "in.npy"), path.join(dir, "out.npy"), String(steps), String(dt)], { encoding: "utf8" });
    if (r.status !== 0) return undefined;
    const numpyMs = Number(r.stdout.trim());
    const stepper = makeStepper(grid, "periodic", t);
    stepper.setState(psi0, 0);
    const times = [];
    for (let i = 0; i < steps; i++) {
      const t0 = performance.now();
      stepper.step(dt);
      times.push(performance.now() - t0);
    }
    times.sort((a, b) => a - b);
    stepper.close();
    const ref = readNpyComplex(path.join(dir, "out.npy")).data;
    let diff = 0;
    let scale = 0;
    for (let i = 0; i < ref.length; i++) {
      diff = Math.max(diff, Math.abs(ref[i] - stepper.psi[i]));
      scale = Math.max(scale, Math.abs(ref[i]));
    }
    return { numpyMs, psiboxMs: times[Math.floor(times.length / 2)], relDiff: diff / scale };
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

const cases = [[[32, 32, 32]], [[64, 64, 64]], [[128, 128, 128]]];
if (large) cases.push([[256, 256, 256]]);
if (threads > 1) {
  cases.push([[32, 32, 32], "periodic", threads], [[64, 64, 64], "periodic", threads], [[128, 128, 128], "periodic", threads]);
  if (large) cases.push([[256, 256, 256], "periodic", threads]);
}
const other = fft === "js" ? "wasm" : "js";
cases.push([[64, 64, 64], "periodic", 1, other], [[128, 128, 128], "periodic", 1, other]);
if (threads > 1) cases.push([[128, 128, 128], "periodic", threads, other]);
cases.push([[32, 32, 32], "isolated"], [[64, 64, 64], "isolated"], [[512, 512]], [[1024, 1024]]);
if (threads > 1) cases.push([[1024, 1024], "periodic", threads]);
cases.push([[1 << 16]], [[1 << 20]]);
if (threads > 1) cases.push([[1 << 20], "periodic", threads]);
// the step with tangent-linear fields ([breakdown]): the issue's targets are at most 2.2× the plain step with
// one tangent field, and at most 1.1 (1 + 2p)× with p depletion probes (2p fields), at 128³
function benchTangents() {
  const tangentThreads = Math.max(1, Math.min(threads, 2));
  console.log(`\nwith tangent-linear fields, 128³ periodic, ${tangentThreads} thread(s): time per step over the plain step's`);
  const plain = bench([128, 128, 128], "periodic", tangentThreads);
  for (const [fields, target] of [
    [1, 2.2],
    [2, 1.1 * 3], // one probe
  ]) {
    const r = bench([128, 128, 128], "periodic", tangentThreads, fft, fields);
    console.log(`${r.label.padEnd(40)} ${r.ms.toFixed(1).padStart(8)} ms   ${(r.ms / plain.ms).toFixed(2)}× (target ≤ ${target.toFixed(1)}×)`);
  }
}
// long 1D and big 2D grids against NumPy, psibox on 1 thread and on `threads`, interleaved in one run
function printLongRows() {
  if (!useNumpy) {
    console.log("(no python3 with NumPy here: the 1D/2D comparison with NumPy is skipped)");
    return;
  }
  console.log(`1D and 2D against NumPy (the identical step), median of ${steps} steps, load average ${os.loadavg().map((x) => x.toFixed(1)).join(" ")}`);
  console.log("grid       threads   psibox ms/step   NumPy ms/step   ratio   max |Δψ|/max|ψ|");
  for (const shape of [[1 << 16], [1 << 20], [2048, 2048]]) {
    const name = shape.length === 1 ? `2^${Math.log2(shape[0])}` : `${shape[0]}²`;
    for (const t of threads > 1 ? [1, threads] : [1]) {
      const c = compareWithNumpy(shape, t);
      if (!c) {
        console.log(`${name}: NumPy run failed`);
        continue;
      }
      const ok = c.relDiff < 1e-10 ? "agree" : "DIFFER";
      console.log(`${name.padEnd(10)} ${String(t).padStart(7)} ${c.psiboxMs.toFixed(1).padStart(16)} ${c.numpyMs.toFixed(1).padStart(15)} ${(c.psiboxMs / c.numpyMs).toFixed(2).padStart(7)}   ${c.relDiff.toExponential(1)} (${ok})`);
    }
  }
}
const realRunSizes = large ? [128, 256] : [128];
if (args.includes("--real-run-only")) {
  await printRealRunRows(realRunSizes, (n) => (threadsArg >= 0 ? threads : defaultThreads([n, n, n])));
  process.exit(0);
}
const roundsArg = args.indexOf("--rounds");
const fftwRows = () => printFftwRows(large ? [128, 256] : [128], threads, steps, roundsArg >= 0 ? Number(args[roundsArg + 1]) : 3);
if (args.includes("--fftw-only")) {
  await fftwRows();
  process.exit(0);
}
if (args.includes("--long-only")) {
  printLongRows();
  process.exit(0);
}
if (args.includes("--analyze-only")) {
  await printAnalyzeRows(128);
  process.exit(0);
}
if (args.includes("--io-only")) {
  await printIoRows(128);
  process.exit(0);
}
if (args.includes("--crossover-only")) {
  printCrossoverRows();
  process.exit(0);
}
if (args.includes("--huge")) {
  // 512³ on several WebAssembly memories beside 256³ (scripts/bench-huge.mjs; about 7 GiB of memory)
  printHugeRows([256, 512], threads, steps);
  process.exit(0);
}
if (args.includes("--tangents-only")) {
  benchTangents();
  process.exit(0);
}

console.log(`psibox split-step benchmark, node ${process.version}, ${steps} timed steps per grid (median)`);
console.log("grid                              ms/step   ns/cell-step   GFLOP/s   heap growth during steps");
for (const [cells, gravity, t, backend] of cases) {
  const r = bench(cells, gravity, t, backend);
  console.log(
    `${r.label.padEnd(33)} ${r.ms.toFixed(1).padStart(8)} ${r.nsPerCell.toFixed(1).padStart(14)} ${r.gflops.toFixed(2).padStart(9)}   ${(r.heapGrowth / 1024).toFixed(0)} KiB`,
  );
}
console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
benchTangents();

if (useNumpy) {
  console.log(`\nagainst NumPy (scripts/numpy_step.py, the identical step), same machine, same run; psibox on ${threads} thread(s):`);
  console.log("grid          psibox ms/step   NumPy ms/step   ratio   max |Δψ|/max|ψ| after " + steps + " steps");
  const shapes = [[64, 64, 64], [128, 128, 128], ...(large ? [[256, 256, 256]] : []), [2048, 2048], [1 << 20]];
  for (const shape of shapes) {
    const name = shape.length === 1 ? `2^${Math.log2(shape[0])}` : shape.length === 2 ? `${shape[0]}²` : `${shape[0]}³`;
    const c = compareWithNumpy(shape);
    if (!c) {
      console.log(`${name}: NumPy run failed`);
      continue;
    }
    const ok = c.relDiff < 1e-10 ? "agree" : "DIFFER";
    console.log(`${name.padEnd(9)} ${c.psiboxMs.toFixed(1).padStart(14)} ${c.numpyMs.toFixed(1).padStart(15)} ${(c.psiboxMs / c.numpyMs).toFixed(2).padStart(7)}   ${c.relDiff.toExponential(1)} (${ok})`);
  }
} else {
  console.log("(no python3 with NumPy here: the comparison with NumPy is skipped)");
}
await fftwRows();
await printRealRunRows(realRunSizes, (n) => (threadsArg >= 0 ? threads : defaultThreads([n, n, n])));
await printAnalyzeRows(128);
await printIoRows(128);
printCrossoverRows();
