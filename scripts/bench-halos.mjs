#!/usr/bin/env node
// Time the halo catalogue and its tracking on a series of n³ snapshots (default 256³, 4 snapshots) against the
// whole psibox analyze of one snapshot of the same series.
// Usage: npm run build && node --expose-gc scripts/bench-halos.mjs [cells-per-axis] [snapshots]
// The series: a static 2 Mpc box of noisy uniform density with 60 halos (the core profile
// ρ_c/(1 + 0.091 (r/r_c)²)⁸, r_c from 8 to 30 kpc (1 to 4 cells at 256³), peaks 300 to 3000 times the mean) moving on straight lines,
// one snapshot every 20 Myr. For each snapshot it prints the time to read it and the time of the catalogue with
// its cores plus the tracking (halos.csv, halos.h5), then the tracks table's time, then the whole analysis of the
// first snapshot (tables and pictures) in a process of its own.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot, writeSnapshot } from "../dist/io/snapshot.js";
import { loadField } from "../dist/simulation/from-snapshot.js";
import { haloTables } from "../dist/report/halo-tables.js";
import { RunTracks } from "../dist/report/halo-track-table.js";

await loadHdf5();
const n = Number(process.argv[2] ?? 256);
const count = Number(process.argv[3] ?? 4);
const box = 2000; // kpc
const cell = box / n;
const mean = 1e6; // Msun/kpc³
const dtMyr = 20;
const kmsToKpcPerMyr = 1.0227e-3;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-halos-"));
const run = path.join(dir, "run");
fs.mkdirSync(path.join(run, "snapshots"), { recursive: true });

let seed = 2024;
const rand = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) + 0.5) / 4294967296;
const halos = Array.from({ length: 60 }, () => ({
  centre: [rand() * box, rand() * box, rand() * box],
  velocity: [0, 1, 2].map(() => (rand() - 0.5) * 200),
  rc: 8 + 22 * rand(), // kpc: 1 to 4 cells at 256³
  peak: mean * (300 + 2700 * rand()),
}));

/** The density of snapshot s: noisy uniform plus every halo, each evaluated within 5 r_c. */
function density(s) {
  const rho = new Float32Array(n ** 3);
  for (let p = 0; p < rho.length; p++) rho[p] = mean * (1 + 0.3 * (rand() - 0.5));
  for (const h of halos) {
    const c = h.centre.map((x, i) => x + h.velocity[i] * kmsToKpcPerMyr * dtMyr * s);
    const reach = Math.ceil((5 * h.rc) / cell);
    const base = c.map((x) => Math.round(x / cell));
    for (let i = -reach; i <= reach; i++)
      for (let j = -reach; j <= reach; j++)
        for (let k = -reach; k <= reach; k++) {
          const idx = [base[0] + i, base[1] + j, base[2] + k];
          const r2 = idx.reduce((sum, v, a) => sum + (v * cell - c[a]) ** 2, 0);
          const w = idx.map((v) => ((v % n) + n) % n);
          rho[(w[0] * n + w[1]) * n + w[2]] += h.peak / (1 + (0.091 * r2) / h.rc ** 2) ** 8;
        }
  }
  return rho;
}

const config = `[grid]\ncells = [${n}, ${n}, ${n}]\nbox = "${box} kpc"\n[particle]\nmass = "1e-22 eV"\n[background]\nkind = "static"\n[initial]\nkind = "benchmark"\n`;
const files = [];
for (let s = 0; s < count; s++) {
  const rho = density(s);
  const psi = new Float64Array(2 * rho.length);
  let mass = 0;
  for (let p = 0; p < rho.length; p++) {
    psi[2 * p] = Math.sqrt(rho[p]);
    mass += rho[p];
  }
  const file = path.join(run, "snapshots", `snap_${String(s).padStart(5, "0")}.h5`);
  writeSnapshot(file, { meta: { kind: "snapshot", software: "bench", step: s, time: s * dtMyr, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [n, n, n], boxSizeKpc: [box, box, box], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: mass * cell ** 3, config, configSha256: "" }, psi }, "float32");
  files.push(file);
}

const load = () => os.loadavg().map((l) => l.toFixed(2)).join(", ");
console.log(`${n}³ cells, ${count} snapshots, ${halos.length} halos; load average ${load()} (${os.cpus().length} cores)`);
const tracks = new RunTracks();
let total = 0;
for (const file of files) {
  globalThis.gc?.();
  let t0 = performance.now();
  const snap = readSnapshot(file);
  const field = loadField(snap, true);
  const read = (performance.now() - t0) / 1000;
  const out = path.join(dir, "analysis", path.basename(file, ".h5"));
  fs.mkdirSync(out, { recursive: true });
  t0 = performance.now();
  const summary = haloTables(file, snap, field, out, { definition: "200m" }, tracks);
  const found = (performance.now() - t0) / 1000;
  total += found;
  console.log(`${path.basename(file)}: read ${read.toFixed(2)} s; catalogue, cores and tracking ${found.toFixed(2)} s (${summary.count} halos, ${summary.cores_fitted} cores fitted)`);
}
let t0 = performance.now();
const tracksCount = tracks.write(path.join(dir, "analysis"), "bench");
console.log(`tracks table: ${tracksCount} tracks in ${((performance.now() - t0) / 1000).toFixed(2)} s; catalogue and tracking: ${(total / count).toFixed(2)} s per snapshot`);

// the whole analysis of one snapshot, with pictures, in a process of its own (as psibox analyze runs it)
const bin = path.join(path.dirname(fileURLToPath(import.meta.url)), "..", "dist", "cli", "bin.js");
t0 = performance.now();
const child = spawnSync(process.execPath, [bin, "analyze", files[0], "--out", path.join(dir, "whole")], { encoding: "utf8" });
const whole = (performance.now() - t0) / 1000;
if (child.status !== 0) console.log(child.stderr);
console.log(`whole psibox analyze of one snapshot (tables and pictures): ${whole.toFixed(1)} s; catalogue and tracking are ${((100 * total) / count / whole).toFixed(0)}% of it; load average ${load()}`);
fs.rmSync(dir, { recursive: true, force: true });
