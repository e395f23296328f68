#!/usr/bin/env node
// Where 512³ loses per cell against 256³: each pass of the 3D periodic step (the step plan's, see
// scripts/bench-passes.mjs) run by itself on one thread over the same number of cells at both sizes (the whole
// 256³ grid, an eighth of the 512³ one, both far beyond the caches; 512³ on its two WebAssembly memories,
// other memories' rows through the window as in a step), the two sizes interleaved pass by pass, every pass
// run once untimed first so that all its memory is touched. Prints the CPU time per cell of each pass at each
// size (median of the rounds), the ratio, and the sums; 512³'s inherent extra work is log2(512)/log2(256) =
// 1.125 on the transforms.
// Usage (after npm run build): node scripts/bench-huge-passes.mjs [--rounds R] [--fraction F]
//   (F: the share of 512³'s units timed, default 8 for an eighth)
import os from "node:os";
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { createEngine, outerCount } from "../dist/fields/step-engine.js";
import { regionView } from "../dist/fields/step-memory.js";

const args = process.argv.slice(2);
const option = (name, fallback) => (args.includes(name) ? Number(args[args.indexOf(name) + 1]) : fallback);
const rounds = option("--rounds", 5);
const fraction = option("--fraction", 8);

/** A size's engine on thread slot 0 and its units per pass; the timed units cover `cells` cells of ψ. */
function setUp(n, share) {
  const grid = new Grid([n, n, n], [1, 1, 1]);
  const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"), "auto");
  const setup = stepper.memory.setup;
  const engine = createEngine(setup, 0);
  const dt = Math.min(1e-5, 4 / (Math.PI * n) ** 2);
  engine.fillPhases(0, dt);
  const shape = [n, n, n];
  const half = [n, n, n / 2 + 1];
  const planes = n / share;
  const psi = regionView(setup, "psi");
  for (let i = 0; i < (2 * psi.length) / share; i += 2) psi[i] = 10 + ((i * 7919) % 13) / 13;
  const passes = [
    ["plane + kick", (p) => engine.plane("psi", false, 0.1 * dt, "phi", false, 0, "psi", 0, p)],
    ["drift-outer axis 0", (p) => engine.driftOuter("psi", 0, 0, 0, (outerCount(shape, 0) * p) / n, true)],
    ["plane inverse + density", (p) => engine.plane("psi", true, 0, "phi", true, 0, "psi", 0, p)],
    ["real-plane", (p) => engine.realPlane("phi", false, 0, p)],
    ["poisson-outer axis 0", (p) => engine.poissonOuter(0, 0, (outerCount(half, 0) * p) / n)],
    ["real-plane inverse", (p) => engine.realPlane("phi", true, 0, p)],
  ];
  return { n, stepper, planes, banks: setup.banks?.length ?? 1, passes: passes.map(([name, f]) => ({ name, run: () => f(planes) })) };
}

const cpuNs = (t0) => {
  const c = process.cpuUsage(t0);
  return (c.user + c.system) * 1000;
};
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const sizes = [setUp(256, 1), setUp(512, fraction)];
const cells = sizes.map((s) => s.planes * s.n * s.n);
for (const s of sizes) for (const p of s.passes) p.run();
const times = sizes.map((s) => s.passes.map(() => []));
for (let r = 0; r < rounds; r++) {
  sizes[0].passes.forEach((_, i) => {
    sizes.forEach((s, k) => {
      const t0 = process.cpuUsage();
      s.passes[i].run();
      times[k][i].push(cpuNs(t0) / cells[k]);
    });
  });
}
console.log(`Per-pass CPU ns per cell, 1 thread, median of ${rounds} rounds (256³ whole, 512³ 1/${fraction} on ${sizes[1].banks} memories); load average ${os.loadavg().map((l) => l.toFixed(1)).join(" ")}`);
console.log(`${"pass".padEnd(26)} ${"256³".padStart(7)} ${"512³".padStart(7)}  ratio`);
const sums = [0, 0];
sizes[0].passes.forEach((p, i) => {
  const [a, b] = [median(times[0][i]), median(times[1][i])];
  sums[0] += a;
  sums[1] += b;
  console.log(`${p.name.padEnd(26)} ${a.toFixed(2).padStart(7)} ${b.toFixed(2).padStart(7)}  ${(b / a).toFixed(2)}`);
});
console.log(`${"sum".padEnd(26)} ${sums[0].toFixed(2).padStart(7)} ${sums[1].toFixed(2).padStart(7)}  ${(sums[1] / sums[0]).toFixed(2)}`);
for (const s of sizes) s.stepper.close();
