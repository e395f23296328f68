#!/usr/bin/env node
// Time psibox analyze's field diagnostics on an n³ snapshot (default 256³) of a random-phase field full of vortex lines.
// Usage: npm run build && node --expose-gc scripts/bench-diagnostics.mjs [cells-per-axis]
// Prints the time of one split-step of the same grid (the unit the other times are given in), of each pure
// diagnostic on the step engine's transforms and threads, then of the whole analysis of the snapshot
// (tables and pictures, three Husimi points) in a process of its own: wall and CPU time and its peak memory.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot, writeSnapshot } from "../dist/io/snapshot.js";
import { Grid } from "../dist/grid/grid.js";
import { loadField, fieldStats } from "../dist/simulation/from-snapshot.js";
import { densityPowerSpectrum, kineticSplit } from "../dist/diagnostics/analysis.js";
import { energySplit } from "../dist/diagnostics/energy-split.js";
import { findVortices } from "../dist/diagnostics/vortices.js";
import { granuleStats } from "../dist/diagnostics/granules.js";
import { husimiAt } from "../dist/diagnostics/husimi.js";
import { analyzeSnapshot } from "../dist/report/analyze.js";
import { PooledTransforms } from "../dist/integrators/pooled-transforms.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { defaultThreads } from "../dist/config/resolve-output.js";

const eta = (n) => Math.min(4 / n, 1 / 16); // 4 cells, or the widest window the box allows
const box = 100; // kpc
const points = [[20, 20, 20], [50, 50, 50], [80, 80, 80]];
await loadHdf5();

if (process.argv[2] === "--analyze") {
  // the child: the whole analysis of one snapshot, alone in its process
  const [file, out, n] = process.argv.slice(3);
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  await analyzeSnapshot(file, out, true, { husimiPointsKpc: points, husimiWindowKpc: eta(Number(n)) * box });
  const cpu = process.cpuUsage(c0);
  console.log(JSON.stringify({ wall: (performance.now() - t0) / 1000, cpu: (cpu.user + cpu.system) / 1e6, rssMB: process.resourceUsage().maxRSS / 1024 }));
  process.exit(0);
}

const n = Number(process.argv[2] ?? 256);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-diagnostics-"));
const threads = defaultThreads([n, n, n]);
const grid0 = new Grid([n, n, n], [1, 1, 1]);
const fft = new PooledTransforms(grid0, 3, { threads });

// a random-phase field with a Gaussian spectrum of width n/32 modes (granules ≈ 5 cells), mean density 1e7 Msun/kpc³
let seed = 12345;
const rand = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) + 0.5) / 4294967296;
const psi = fft.work(0);
const qc = n / 32;
for (let a = 0, p = 0; a < n; a++)
  for (let b = 0; b < n; b++)
    for (let c = 0; c < n; c++, p += 2) {
      const q2 = (a < n / 2 ? a : a - n) ** 2 + (b < n / 2 ? b : b - n) ** 2 + (c < n / 2 ? c : c - n) ** 2;
      const amp = Math.exp(-q2 / (4 * qc * qc)) * Math.sqrt(-2 * Math.log(rand()));
      const phase = 2 * Math.PI * rand();
      psi[p] = amp * Math.cos(phase);
      psi[p + 1] = amp * Math.sin(phase);
    }
fft.inverse(psi);
let mean = 0;
for (let i = 0; i < psi.length; i++) mean += psi[i] ** 2;
const scale = Math.sqrt(1e7 / (mean / n ** 3));
for (let i = 0; i < psi.length; i++) psi[i] *= scale;
const file = path.join(dir, "snap_00000.h5");
writeSnapshot(file, {
  meta: { kind: "snapshot", software: "bench", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [n, n, n], boxSizeKpc: [box, box, box], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1e7 * box ** 3, config: "", configSha256: "" },
  psi: Float64Array.from(psi),
});

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
time("kinetic split (bulk, quantum, σ)", () => kineticSplit(grid, field.psi, 1, fft));
time("field stats (mass, K, W)", () => fieldStats(field, fft));
time("energy split and spectra", () => energySplit(grid, field.psi, 1, fft));
const v = time("vortex lines", () => findVortices(grid, field.psi));
console.log(`  ${v.points.length} piercings, line length ${(v.lineLength * box).toPrecision(4)} kpc, net charge ${v.netCharge}`);
time("granules (PDF, ξ(r), σ)", () => granuleStats(grid, field.psi, 1, fft));
time("Husimi at 3 points (η = 4 cells)", () => [0.2, 0.5, 0.8].map((x) => husimiAt(grid, field.psi, [x, x, x], eta(n))));
fft.close();

const child = spawnSync(process.execPath, [fileURLToPath(import.meta.url), "--analyze", file, path.join(dir, "analysis"), String(n)], { encoding: "utf8" });
if (child.status !== 0) throw new Error(`the analysis failed: ${child.stderr}`);
const whole = JSON.parse(child.stdout.trim().split("\n").pop());
row("whole analysis with pictures (wall)", whole.wall, step);
console.log(`${"  CPU time (all threads)".padEnd(36)} ${whole.cpu.toFixed(2).padStart(7)} s`);
console.log(`${"  peak resident memory".padEnd(36)} ${whole.rssMB.toFixed(0).padStart(7)} MB (${(whole.rssMB / ((16 * n ** 3) / 2 ** 20)).toFixed(1)} complex grids of ${((16 * n ** 3) / 2 ** 20).toFixed(0)} MB)`);
console.log(`load average after: ${load()}`);
if (!process.env["KEEP"]) fs.rmSync(dir, { recursive: true, force: true });
else console.log(dir);
