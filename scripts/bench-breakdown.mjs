#!/usr/bin/env node
// The measured breakdown at scale: a 2D random-soliton merger on 512² cells with the Lyapunov tangent and
// 8 depletion probes (17 extra fields), run through the library (npm run bench:breakdown builds it first) for one
// dynamical time 1/√(4πGρ_eff) of its start, the Lyapunov plug-in's own default interval. Prints the wall time,
// the steps, the time per step and the measured depletion, and leaves the run in a temporary folder it removes.
// Usage: node scripts/bench-breakdown.mjs [--cells N] [--probes P] [--threads T]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadConfig } from "../dist/config/load.js";
import { resolveRun } from "../dist/config/resolve.js";
import { prepareOutputDir } from "../dist/simulation/run.js";
import { runSimulation } from "../dist/app/run.js";

const args = process.argv.slice(2);
const arg = (name, fallback) => (args.includes(name) ? Number(args[args.indexOf(name) + 1]) : fallback);
const cells = arg("--cells", 512);
const probes = arg("--probes", 8);
const threads = arg("--threads", os.availableParallelism());

const work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-breakdown-"));
try {
  const file = path.join(work, "merger.toml");
  fs.writeFileSync(
    file,
    `[grid]\ncells = [${cells}, ${cells}]\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "10 Gyr"\n` +
      `[initial]\nkind = "random-solitons"\ncount = 8\nmass = "1e10 Msun"\nseed = 3\nvelocity_dispersion = "10 km/s"\n` +
      `[integrator]\nthreads = ${threads}\n[output]\ntime_unit = "Myr"\ntimeseries_every = 100\n[sidecar]\nenabled = false\n` +
      `[breakdown]\ntangent = true\nprobes = ${probes}\n`,
  );
  const run = resolveRun(loadConfig(file), "merger", work);
  prepareOutputDir(run.outputDir, true);
  // one dynamical time of the start, as the Lyapunov plug-in takes it: stop after its first renormalisation
  let t0 = 0;
  let tau = Infinity;
  let now = 0;
  let steps = 0;
  const clock = {
    name: "bench-clock",
    measures: ["moments"],
    start(_context, facts) {
      t0 = facts.t;
      tau = 1 / Math.sqrt(facts.sums.moments.rho2 / facts.sums.moments.rho / facts.a ** 3);
    },
    afterStep(facts) {
      now = facts.t;
      steps++;
    },
  };
  const wall = performance.now();
  const summary = await runSimulation(run, { plugins: [clock], stopRequested: () => (now >= t0 + tau ? "one dynamical time done" : undefined) });
  const seconds = (performance.now() - wall) / 1000;
  const span = summary.end.t - summary.start.t; // in the run's time unit
  console.log(`${cells}² cells, Lyapunov tangent + ${probes} probes (${1 + 2 * probes} extra fields), ${threads} thread(s):`);
  console.log(`  one dynamical time (${span.toPrecision(3)} ${summary.time_unit}) in ${steps} steps, ${seconds.toFixed(1)} s wall (${((1000 * seconds) / steps).toFixed(0)} ms a step)`);
  console.log(`  N_dep = ${summary.depletion.depleted_N.toPrecision(3)} ± ${summary.depletion.depleted_N_error.toPrecision(2)}, λ over the interval ${summary.lyapunov.rate_per_s.toPrecision(3)} /s`);
} finally {
  fs.rmSync(work, { recursive: true, force: true });
}
