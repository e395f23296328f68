#!/usr/bin/env node
// Time per split-step of psibox's solver, from the built library (npm run bench builds it first).
// Prints ms per step (median), ns per cell-step, nominal GFLOP/s and peak resident memory.
// Usage: node scripts/bench.mjs [--large] [--steps N]
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";

const args = process.argv.slice(2);
const large = args.includes("--large");
const stepsArg = args.indexOf("--steps");
const steps = stepsArg >= 0 ? Number(args[stepsArg + 1]) : 5;

function field(grid) {
  const psi = new Float64Array(2 * grid.size);
  let s = 12345;
  for (let i = 0; i < grid.size; i++) {
    s = (s * 1103515245 + 12345) % 2147483648;
    const d = 1 + 0.1 * (s / 2147483648 - 0.5);
    psi[2 * i] = Math.sqrt(100 * d);
  }
  return psi;
}

function bench(cells, gravity = "periodic") {
  const grid = new Grid(cells, cells.map(() => 1));
  const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, gravity));
  stepper.setState(field(grid), 0);
  const dt = 1e-5;
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
  const ms = times[Math.floor(times.length / 2)];
  const n = grid.size;
  // nominal work: one complex FFT pair (2 × 5 N log2 N) plus one real FFT pair (about half that)
  const flops = 15 * n * Math.log2(n);
  return { label: `${cells.length}D ${cells.join("×")} ${gravity}`, ms, nsPerCell: (ms * 1e6) / n, gflops: flops / (ms * 1e6), heapGrowth };
}

const cases = [[[32, 32, 32]], [[64, 64, 64]], [[128, 128, 128]]];
if (large) cases.push([[256, 256, 256]]);
cases.push([[32, 32, 32], "isolated"], [[64, 64, 64], "isolated"], [[512, 512]], [[1024, 1024]], [[1 << 16]], [[1 << 20]]);
console.log(`psibox split-step benchmark, node ${process.version}, ${steps} timed steps per grid (median)`);
console.log("grid                         ms/step   ns/cell-step   GFLOP/s   heap growth during steps");
for (const [cells, gravity] of cases) {
  const r = bench(cells, gravity);
  console.log(
    `${r.label.padEnd(28)} ${r.ms.toFixed(1).padStart(8)} ${r.nsPerCell.toFixed(1).padStart(14)} ${r.gflops.toFixed(2).padStart(9)}   ${(r.heapGrowth / 1024).toFixed(0)} KiB`,
  );
}
console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
