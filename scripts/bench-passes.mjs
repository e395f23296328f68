#!/usr/bin/env node
// Where a 3D periodic step's time goes: the CPU time of each of its passes (all threads of the process, the
// median over the steps), beside the whole step's. The passes are the step plan's (integrators/step-plan.ts):
// "plane" (the rows with the folded kick and axis 1, plane by plane), "drift-outer" (axis 0 forward, the
// drift's phase, back), "plane" inverse (ending with the density), and the Poisson solve's "real-plane",
// "poisson-outer" and "real-plane" inverse.
// Usage (after npm run build): node scripts/bench-passes.mjs [--cells N] [--threads T] [--steps S]
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import os from "node:os";
import { benchDt, benchField } from "./bench-field.mjs";

const args = process.argv.slice(2);
const option = (name, fallback) => (args.includes(name) ? Number(args[args.indexOf(name) + 1]) : fallback);
const n = option("--cells", 128);
const threads = option("--threads", 1);
const steps = option("--steps", 7);

const grid = new Grid([n, n, n], [1, 1, 1]);
const poisson = makePoissonSolver(grid, "periodic");
const stepper = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), poisson, threads) : new SplitStepper(grid, new StaticBackground(), poisson);
stepper.setState(benchField(grid), 0);
const dt = benchDt([n, n, n]);
stepper.step(dt);

// every pass goes through runPassInto: time each one there
const cpuMs = (t0) => {
  const c = process.cpuUsage(t0);
  return (c.user + c.system) / 1000;
};
const perPass = new Map();
const run = stepper.runPassInto.bind(stepper);
stepper.runPassInto = (count, task, out) => {
  const name = `${task.op}${task.axis !== undefined ? ` axis ${task.axis}` : ""}${task.inverse ? " inverse" : ""}${task.kick ? " + kick" : ""}${task.density ? " + density" : ""}`;
  const t0 = process.cpuUsage();
  run(count, task, out);
  if (!perPass.has(name)) perPass.set(name, []);
  perPass.get(name).push(cpuMs(t0));
};
const whole = [];
for (let i = 0; i < steps; i++) {
  const t0 = process.cpuUsage();
  stepper.step(dt);
  whole.push(cpuMs(t0));
}
// reading ψ applies the owed closing kick as a pass of its own: the kick's share of "plane + kick"
void stepper.psi;
stepper.close();

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
console.log(`${n}³ periodic step on ${threads} thread(s), CPU ms of all threads, median of ${steps} steps; load average ${os.loadavg()[0].toFixed(1)}`);
let sum = 0;
for (const [name, times] of perPass) {
  if (name === "kick") {
    console.log(`${"(the kick alone, when ψ is read)".padEnd(34)} ${times[0].toFixed(2).padStart(8)}`);
    continue;
  }
  sum += median(times);
  console.log(`${name.padEnd(34)} ${median(times).toFixed(2).padStart(8)}`);
}
console.log(`${"sum of the step's passes".padEnd(34)} ${sum.toFixed(2).padStart(8)}`);
console.log(`${"whole step".padEnd(34)} ${median(whole).toFixed(2).padStart(8)}`);
