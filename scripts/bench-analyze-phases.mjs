#!/usr/bin/env node
// The numbers of psibox analyze, phase by phase: the main thread's CPU time (Linux: /proc/thread-self/schedstat,
// in ns) of reading the snapshot, the energy split, the snapshot tables (P(k), PDF, field statistics, densest
// points, and the granules from δ's spectrum), the halos and the field diagnostics (vortices, Husimi points), each analysis in a process of
// its own on the benchmark's random-phase snapshot (scripts/bench-analyze.mjs), run as analyze.ts runs them.
// CPU time of the main thread is the analysis's critical path and barely depends on other work on the machine.
// The vortex census runs on the analysis's helper thread beside the phases (its CPU time is in "all threads").
// Usage: npm run build && node scripts/bench-analyze-phases.mjs [cells-per-axis] [--repeat R]
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { BOX_KPC, HUSIMI_POINTS_KPC, husimiWindow, writeBenchSnapshot } from "./bench-analyze.mjs";

const self = fileURLToPath(import.meta.url);
const mainCpuMs = () => Number(fs.readFileSync("/proc/thread-self/schedstat", "utf8").split(" ")[0]) / 1e6;

/** One analysis's phases (ms of main-thread CPU) and its CPU over all threads, as one JSON line. */
async function child(file, out, n) {
  const { loadHdf5 } = await import("../dist/io/h5.js");
  await loadHdf5();
  const { readSnapshot } = await import("../dist/io/snapshot.js");
  const { loadField } = await import("../dist/simulation/from-snapshot.js");
  const { AnalysisTransforms } = await import("../dist/report/analyze.js");
  const { energyAndKineticSplit } = await import("../dist/diagnostics/energy-split.js");
  const { snapshotTables } = await import("../dist/report/snapshot-tables.js");
  const { haloTables } = await import("../dist/report/halo-tables.js");
  const { fieldDiagnostics } = await import("../dist/report/field-diagnostics.js");
  const { granuleStats } = await import("../dist/diagnostics/granules.js");
  const t = {};
  const c0 = process.cpuUsage();
  const phase = (name, f) => {
    const m = mainCpuMs();
    const r = f();
    t[name] = mainCpuMs() - m;
    return r;
  };
  fs.mkdirSync(out, { recursive: true });
  const { readSnapshotMeta } = await import("../dist/io/snapshot.js");
  const { snapshotGrid } = await import("../dist/simulation/from-snapshot.js");
  const { physicalScales } = await import("../dist/report/field-diagnostics.js");
  // as analyze does: ψ read into the transforms' shared grid (its pages touched meanwhile on the helper thread)
  const at = new AnalysisTransforms();
  const snap = phase("read", () => readSnapshot(file, false, at.psiOf(snapshotGrid(readSnapshotMeta(file)))));
  const field = loadField(snap, true);
  const fft = at.of(field.grid);
  // the vortex census on the helper thread, beside the phases below (as analyze runs it)
  const vortexJob = at.vortices(field.grid, field.psi, physicalScales(field).kpc);
  const both = phase("energy split", () => energyAndKineticSplit(field.grid, field.psi, field.scaleFactor, fft));
  let granules;
  const contrast = (spectrum) => (granules = granuleStats(field.grid, field.psi, field.scaleFactor, fft, undefined, undefined, { contrastSpectrum: spectrum, moments: both.moments, meanDensity: both.meanDensity }));
  phase("tables", () => snapshotTables(file, snap, field, out, fft, both, contrast));
  phase("halos", () => haloTables(file, snap, field, out, { definition: "200m" }, undefined, fft.work(1)));
  const chosen = new Set(["energy-split", "vortices", "granules", "husimi"]);
  const vortices = await vortexJob;
  phase("field diagnostics", () => fieldDiagnostics(field, chosen, out, fft, husimiWindow(n) * BOX_KPC, HUSIMI_POINTS_KPC, both.split, granules, vortices));
  const cpu = process.cpuUsage(c0);
  at.close();
  t["all threads"] = (cpu.user + cpu.system) / 1000;
  console.log(JSON.stringify(t));
}

async function main(n, repeat) {
  const { Grid } = await import("../dist/grid/grid.js");
  const { SimpleTransforms } = await import("../dist/fields/field-transforms.js");
  const { loadHdf5 } = await import("../dist/io/h5.js");
  await loadHdf5();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-phases-"));
  try {
    const file = await writeBenchSnapshot(dir, n, new SimpleTransforms(new Grid([n, n, n], [1, 1, 1]).shape));
    const runs = Array.from({ length: repeat }, () => {
      const r = spawnSync(process.execPath, [self, "--child", file, path.join(dir, "out"), String(n)], { encoding: "utf8" });
      if (r.status !== 0) throw new Error(`the analysis failed: ${r.stderr}`);
      return JSON.parse(r.stdout.trim().split("\n").pop());
    });
    const load = os.loadavg().map((l) => l.toFixed(1)).join(", ");
    console.log(`psibox analyze's numbers, ${n}³, main-thread CPU ms per phase (${repeat} runs: min–max; load average ${load})`);
    for (const key of Object.keys(runs[0])) {
      const xs = runs.map((r) => r[key]);
      console.log(`${key.padEnd(20)} ${Math.min(...xs).toFixed(0).padStart(6)}–${Math.max(...xs).toFixed(0)}`);
    }
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === "--child") await child(process.argv[3], process.argv[4], Number(process.argv[5]));
else {
  const args = process.argv.slice(2);
  const r = args.indexOf("--repeat");
  await main(Number(args.find((a, i) => !a.startsWith("--") && i !== r + 1) ?? 128), r >= 0 ? Number(args[r + 1]) : 3);
}
