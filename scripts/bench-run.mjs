#!/usr/bin/env node
// The cost of a real run against the bare step: the run of the cosmological template at n³ with its
// default outputs and the sidecar on (what psibox run does, in this process), against the solver's bare
// step on the same grid and threads, measured in one process run. Wall time is what a user waits for; the
// CPU time over all threads is printed beside it because it barely depends on other work on the machine.
// Usage: npm run build && node --expose-gc scripts/bench-run.mjs [cells-per-axis ...] [--threads N] [--every K]
//   (default 128; --every sets output.timeseries_every, default: the config's own, i.e. psibox's default)
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import { defaultThreads } from "../dist/config/resolve-output.js";
import { loadConfig } from "../dist/config/load.js";
import { resolveRun } from "../dist/config/resolve.js";
import { runSimulation } from "../dist/app/run.js";
import { prepareOutputDir } from "../dist/simulation/run.js";

const here = path.dirname(fileURLToPath(import.meta.url));
const config = path.join(here, "..", "configs", "cosmological-box-3d.toml");

/** Median wall ms and mean CPU ms (all threads) of a bare step of an n³ periodic box (a near-uniform field). */
export function bareStepMs(n, threads, steps = 5) {
  const grid = new Grid([n, n, n], [1, 1, 1]);
  const poisson = makePoissonSolver(grid, "periodic");
  const stepper = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), poisson, threads) : new SplitStepper(grid, new StaticBackground(), poisson);
  const psi = new Float64Array(2 * grid.size);
  for (let i = 0; i < grid.size; i++) psi[2 * i] = 10 * (1 + 0.05 * Math.sin(i));
  stepper.setState(psi, 0);
  const dt = 4 / (Math.PI * n) ** 2;
  stepper.step(dt);
  const times = [];
  const c0 = cpuMs();
  for (let i = 0; i < steps; i++) {
    const t0 = performance.now();
    stepper.step(dt);
    times.push(performance.now() - t0);
  }
  const cpu = (cpuMs() - c0) / steps;
  stepper.close();
  times.sort((a, b) => a - b);
  return { wall: times[Math.floor(times.length / 2)], cpu };
}

/** CPU ms of this process so far, all its threads. */
function cpuMs() {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

/**
 * Median ms per step of `psibox run` of the template at n³ with its default outputs, timed between
 * consecutive steps by a plug-in that measures nothing (so it adds no work): everything the run loop
 * does between two steps is in it (plug-ins, time-series rows, snapshots, checkpoints, progress).
 */
async function realStepMs(n, threads, every, steps) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-run-"));
  try {
    const set = [`grid.cells=[${n},${n},${n}]`, `integrator.max_steps=${steps}`, `integrator.threads=${threads}`];
    if (every !== undefined) set.push(`output.timeseries_every=${every}`);
    const run = resolveRun(loadConfig(config, set), "bench-run", dir);
    const stamps = [];
    const cpu = [];
    const timer = {
      name: "bench-timer",
      columns: [],
      start() {},
      afterStep() {
        stamps.push(performance.now());
        cpu.push(cpuMs());
      },
      output() {},
      stop: () => ({}),
    };
    const outputDir = path.join(dir, "out");
    prepareOutputDir(outputDir, false);
    const summary = await runSimulation({ ...run, outputDir }, { plugins: [timer] });
    if (summary.steps !== steps) throw new Error(`psibox run made ${summary.steps} steps, not ${steps}`);
    const gaps = stamps.slice(1).map((t, i) => t - stamps[i]);
    // whole cadences: the mean over the gaps of the last `every`-multiple of steps (rows included at their rate)
    const k = every ?? run.output.timeseriesEvery;
    // the first cadence warms up (first touches of the undo and scratch grids, compilation); then whole cadences
    const skip = k < gaps.length ? k + ((gaps.length - k) % k) : 0;
    const whole = gaps.slice(skip);
    const cpuPerStep = (cpu[cpu.length - 1] - cpu[skip]) / whole.length;
    return { ms: whole.reduce((a, b) => a + b, 0) / whole.length, cpu: cpuPerStep, every: k };
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** Per-step ms of the real run and of the bare step, and their ratio. */
export async function realRunRow(n, threads, every, steps = 41) {
  // the bare step before and after the run (the mean of both medians), to even out a machine's load drifting
  const before = bareStepMs(n, threads);
  const real = await realStepMs(n, threads, every, steps);
  const after = bareStepMs(n, threads);
  const bare = (before.wall + after.wall) / 2;
  const bareCpu = (before.cpu + after.cpu) / 2;
  return { n, threads, bare, real: real.ms, every: real.every, ratio: real.ms / bare, cpuRatio: real.cpu / bareCpu };
}

export async function printRealRunRows(sizes, threadsOf, every) {
  console.log(`\nthe real run (psibox run of configs/cosmological-box-3d.toml, default outputs, sidecar on${every !== undefined ? `, timeseries_every = ${every}` : ""}) against the bare step:`);
  console.log("grid   threads   rows every   run ms/step   bare ms/step   wall ratio (goal ≤ 1.15)   CPU-time ratio");
  for (const n of sizes) {
    const r = await realRunRow(n, threadsOf(n), every);
    const cols = [String(r.threads).padStart(9), String(r.every).padStart(12), r.real.toFixed(1).padStart(13), r.bare.toFixed(1).padStart(14), r.ratio.toFixed(2).padStart(12), r.cpuRatio.toFixed(2).padStart(28)];
    console.log(`${String(n).padStart(3)}³ ${cols.join(" ")}`);
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const args = process.argv.slice(2);
  const opt = (name) => {
    const i = args.indexOf(name);
    return i >= 0 ? Number(args[i + 1]) : undefined;
  };
  const threads = opt("--threads");
  const every = opt("--every");
  const sizes = args.filter((a, i) => /^\d+$/.test(a) && !["--threads", "--every"].includes(args[i - 1])).map(Number);
  await printRealRunRows(sizes.length ? sizes : [128], (n) => threads ?? defaultThreads([n, n, n]), every);
}
