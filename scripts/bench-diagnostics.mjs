#!/usr/bin/env node
// Time psibox analyze's field diagnostics on an n³ snapshot (default 256³) of a random-phase field full of vortex lines.
// Usage: npm run build && node scripts/bench-diagnostics.mjs [cells-per-axis]
// Prints the time of each pure diagnostic, then of the whole analysis of the snapshot (tables and pictures, three Husimi points).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot, writeSnapshot } from "../dist/io/snapshot.js";
import { ComplexFft } from "../dist/fields/fft.js";
import { Grid } from "../dist/grid/grid.js";
import { loadField } from "../dist/simulation/from-snapshot.js";
import { densityPowerSpectrum } from "../dist/diagnostics/analysis.js";
import { energySplit } from "../dist/diagnostics/energy-split.js";
import { findVortices } from "../dist/diagnostics/vortices.js";
import { granuleStats } from "../dist/diagnostics/granules.js";
import { husimiAt } from "../dist/diagnostics/husimi.js";
import { analyzeSnapshot } from "../dist/report/analyze.js";

const n = Number(process.argv[2] ?? 256);
await loadHdf5();
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-diagnostics-"));
const box = 100; // kpc

// a random-phase field with a Gaussian spectrum of width n/32 modes (granules ≈ 5 cells), mean density 1e7 Msun/kpc³
let seed = 12345;
const rand = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) + 0.5) / 4294967296;
const psi = new Float64Array(2 * n ** 3);
const qc = n / 32;
for (let a = 0, p = 0; a < n; a++)
  for (let b = 0; b < n; b++)
    for (let c = 0; c < n; c++, p += 2) {
      const q2 = [a, b, c].reduce((s, i) => s + (i < n / 2 ? i : i - n) ** 2, 0);
      const amp = Math.exp(-q2 / (4 * qc * qc)) * Math.sqrt(-2 * Math.log(rand()));
      const phase = 2 * Math.PI * rand();
      psi[p] = amp * Math.cos(phase);
      psi[p + 1] = amp * Math.sin(phase);
    }
new ComplexFft([n, n, n]).inverse(psi);
let mean = 0;
for (let i = 0; i < psi.length; i++) mean += psi[i] ** 2;
const scale = Math.sqrt(1e7 / (mean / n ** 3));
for (let i = 0; i < psi.length; i++) psi[i] *= scale;
const file = path.join(dir, "snap_00000.h5");
writeSnapshot(file, {
  meta: { kind: "snapshot", software: "bench", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [n, n, n], boxSizeKpc: [box, box, box], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1e7 * box ** 3, config: "", configSha256: "" },
  psi,
});

const field = loadField(readSnapshot(file));
const grid = new Grid([n, n, n], field.grid.lengths);
const time = (label, f) => {
  const t0 = performance.now();
  const r = f();
  console.log(`${label.padEnd(34)} ${((performance.now() - t0) / 1000).toFixed(2)} s`);
  return r;
};
console.log(`${n}³ random-phase field, ${os.cpus().length} cores (the host may be shared: expect noisy times)`);
time("density power spectrum (existing)", () => densityPowerSpectrum(grid, field.psi));
time("energy split and spectra", () => energySplit(grid, field.psi, 1));
const v = time("vortex lines", () => findVortices(grid, field.psi));
console.log(`  ${v.points.length} piercings, line length ${(v.lineLength * box).toPrecision(4)} kpc, net charge ${v.netCharge}`);
time("granules (PDF, ξ(r), σ)", () => granuleStats(grid, field.psi, 1));
const eta = Math.min(4 / n, 1 / 16); // 4 cells, or the widest window the box allows
time("Husimi at 3 points (η = 4 cells)", () => [0.2, 0.5, 0.8].map((x) => husimiAt(grid, field.psi, [x, x, x], eta)));
const points = [[20, 20, 20], [50, 50, 50], [80, 80, 80]];
const t0 = performance.now();
await analyzeSnapshot(file, path.join(dir, "analysis"), true, { husimiPointsKpc: points, husimiWindowKpc: eta * box });
console.log(`${"whole analysis with pictures".padEnd(34)} ${((performance.now() - t0) / 1000).toFixed(2)} s`);
console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
if (!process.env["KEEP"]) fs.rmSync(dir, { recursive: true, force: true });
else console.log(dir);
