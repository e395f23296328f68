#!/usr/bin/env node
// The thread crossover: for grids from small to large, the step on 1 thread against the step on all cores,
// interleaved step by step (so a machine's changing load hits both alike), and the thread count psibox
// chooses by default for each grid. The default must never be slower than one thread.
// Usage: npm run build && node scripts/bench-threads.mjs [--steps N]  (also the last part of npm run bench, and
// npm run bench -- --crossover-only)
import os from "node:os";
import { pathToFileURL } from "node:url";
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import { defaultThreads } from "../dist/config/resolve-output.js";

const cores = os.availableParallelism();

function stepper(grid, threads) {
  const poisson = makePoissonSolver(grid, "periodic");
  const s = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), poisson, threads) : new SplitStepper(grid, new StaticBackground(), poisson);
  const psi = new Float64Array(2 * grid.size);
  for (let i = 0; i < grid.size; i++) psi[2 * i] = 10 * (1 + 0.05 * Math.sin(i));
  s.setState(psi, 0);
  return s;
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** Median ms per step on 1 thread and on `cores` threads, the steps interleaved. */
function crossover(shape, steps) {
  const grid = new Grid(shape, shape.map(() => 1));
  const one = stepper(grid, 1);
  const all = stepper(grid, cores);
  const dt = 4 / (Math.PI * Math.max(...shape)) ** 2;
  // enough repetitions per sample that small grids are timed above the clock's resolution
  const reps = Math.max(1, Math.round(2 ** 18 / grid.size));
  const time = (s) => {
    const t0 = performance.now();
    for (let r = 0; r < reps; r++) s.step(dt);
    return (performance.now() - t0) / reps;
  };
  time(one);
  time(all);
  const a = [];
  const b = [];
  for (let i = 0; i < steps; i++) {
    a.push(time(one));
    b.push(time(all));
  }
  one.close();
  all.close();
  return { one: median(a), all: median(b) };
}

const shapes = [
  ...[12, 14, 16, 17, 18, 19, 20].map((p) => [2 ** p]),
  ...[64, 128, 256, 512, 1024, 2048].map((n) => [n, n]),
  ...[16, 32, 64, 128].map((n) => [n, n, n]),
];
/** The crossover table: each grid on 1 thread and on all cores, `steps` interleaved samples, and the default's verdict. */
export function printCrossoverRows(steps = 9) {
  const load = os.loadavg().map((l) => l.toFixed(1)).join(", ");
  console.log(`\nthread crossover, ${cores} cores, ${steps} interleaved samples per grid (median ms per step; load average ${load}: it needs an idle machine)`);
  console.log("grid               cells      1 thread   " + `${cores} threads`.padStart(10) + "   ratio   default   default is");
  for (const shape of shapes) {
    const cells = shape.reduce((p, n) => p * n, 1);
    const r = crossover(shape, steps);
    const chosen = defaultThreads(shape);
    const chosenMs = chosen > 1 ? r.all : r.one;
    const verdict = chosenMs <= Math.min(r.one, r.all) * 1.05 ? "fastest" : `${(chosenMs / Math.min(r.one, r.all)).toFixed(2)}× the fastest`;
    console.log(`${shape.join("×").padEnd(14)} ${String(cells).padStart(9)} ${r.one.toFixed(2).padStart(11)} ${r.all.toFixed(2).padStart(10)} ${(r.all / r.one).toFixed(2).padStart(7)} ${String(chosen).padStart(9)}   ${verdict}`);
  }
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  const args = process.argv.slice(2);
  const stepsAt = args.indexOf("--steps");
  printCrossoverRows(stepsAt >= 0 ? Number(args[stepsAt + 1]) : 9);
}
