#!/usr/bin/env node
// psibox analyze of one n³ snapshot (default 128³): a random-phase field full of vortex lines, analysed with
// its pictures and without, each in a process of its own (as a user runs it), the two interleaved.
// Prints the wall time of the analysis (from the call to its end, the process's start-up apart), the CPU time
// of all its threads (which barely depends on other work on the machine), the time spent collecting garbage,
// and the peak resident memory, also as complex grids (16 bytes a cell) beyond the baseline of a process that
// loads the same modules and HDF5 and analyses nothing.
// Usage: npm run build && node scripts/bench-analyze.mjs [cells-per-axis] [--repeat R]
// The snapshot generator is shared with scripts/bench-diagnostics.mjs.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { PerformanceObserver } from "node:perf_hooks";

export const BOX_KPC = 100;
/** Husimi points of the benchmark's analysis (kpc) and its window: 4 cells, or the widest the box allows. */
export const HUSIMI_POINTS_KPC = [[20, 20, 20], [50, 50, 50], [80, 80, 80]];
export const husimiWindow = (n) => Math.min(4 / n, 1 / 16);

/**
 * Write an n³ random-phase snapshot (Gaussian spectrum of width n/32 modes: granules of about 5 cells, mean
 * density 1e7 Msun/kpc³, box 100 kpc) into `dir`; `fft` is a FieldTransforms of the grid. Returns the file.
 */
export async function writeBenchSnapshot(dir, n, fft) {
  const { writeSnapshot } = await import("../dist/io/snapshot.js");
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
    meta: { kind: "snapshot", software: "bench", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [n, n, n], boxSizeKpc: [BOX_KPC, BOX_KPC, BOX_KPC], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1e7 * BOX_KPC ** 3, config: "", configSha256: "" },
    psi: Float64Array.from(psi),
  });
  return file;
}

const self = fileURLToPath(import.meta.url);

/** CPU seconds of this process's main thread (Linux: /proc; undefined elsewhere), the critical path of an analysis. */
function mainThreadCpu() {
  try {
    const fields = fs.readFileSync(`/proc/self/task/${process.pid}/stat`, "utf8").split(") ")[1].split(" ");
    // utime and stime (fields 14 and 15 of stat), in clock ticks of 1/100 s (USER_HZ on Linux)
    return (Number(fields[11]) + Number(fields[12])) / 100;
  } catch {
    return undefined;
  }
}

/** The child: load what analyze loads, then analyse `file` (unless mode is "baseline"); prints one JSON line. */
async function child(mode, file, out, n) {
  let gcMs = 0;
  new PerformanceObserver((list) => list.getEntries().forEach((e) => (gcMs += e.duration))).observe({ entryTypes: ["gc"] });
  const { loadHdf5 } = await import("../dist/io/h5.js");
  const { analyzeSnapshot } = await import("../dist/report/analyze.js");
  await loadHdf5();
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  const m0 = mainThreadCpu();
  if (mode !== "baseline") await analyzeSnapshot(file, out, mode === "pictures", { husimiPointsKpc: HUSIMI_POINTS_KPC, husimiWindowKpc: husimiWindow(n) * BOX_KPC });
  const wall = (performance.now() - t0) / 1000;
  const uptime = process.uptime();
  const cpu = process.cpuUsage(c0);
  const m1 = mainThreadCpu();
  // the observer reports collections after the fact (the wait is not part of the analysis's times)
  await new Promise((r) => setTimeout(r, 50));
  console.log(JSON.stringify({ wall, cpu: (cpu.user + cpu.system) / 1e6, main: m0 === undefined ? NaN : m1 - m0, gc: gcMs / 1000, rssMB: process.resourceUsage().maxRSS / 1024, process: uptime }));
  process.exit(0);
}

/** Analyse `file` in a process of its own ("pictures", "tables" or "baseline"): wall and CPU s, GC s, peak MB, process s. */
export function runChild(mode, file, out, n) {
  const r = spawnSync(process.execPath, [self, "--child", mode, file, out, String(n)], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`the analysis (${mode}) failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split("\n").pop());
}

/** Analyse an n³ snapshot with and without pictures, `repeat` times each, interleaved; print the rows. */
export async function printAnalyzeRows(n = 128, repeat = 3) {
  const { Grid } = await import("../dist/grid/grid.js");
  const { SimpleTransforms } = await import("../dist/fields/field-transforms.js");
  const { loadHdf5 } = await import("../dist/io/h5.js");
  await loadHdf5();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-analyze-"));
  try {
    const file = await writeBenchSnapshot(dir, n, new SimpleTransforms(new Grid([n, n, n], [1, 1, 1]).shape));
    const grid = (16 * n ** 3) / 2 ** 20;
    const runs = { pictures: [], tables: [], baseline: [] };
    for (let r = 0; r < repeat; r++) for (const mode of Object.keys(runs)) runs[mode].push(runChild(mode, file, path.join(dir, `out-${mode}`), n));
    const base = Math.min(...runs.baseline.map((x) => x.rssMB));
    const median = (xs) => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    const load = os.loadavg().map((l) => l.toFixed(1)).join(", ");
    console.log(`\npsibox analyze of a ${n}³ snapshot (${repeat} runs each, interleaved, medians; load average ${load}: on a shared machine trust the CPU times more than the wall times)`);
    console.log("analysis          wall s   whole process s   CPU s: all threads, main thread   GC s   peak MB   complex grids beyond the baseline");
    for (const [mode, label] of [["pictures", "with pictures"], ["tables", "tables only"]]) {
      const xs = runs[mode];
      const peak = median(xs.map((x) => x.rssMB));
      console.log(`${label.padEnd(16)} ${median(xs.map((x) => x.wall)).toFixed(2).padStart(7)} ${median(xs.map((x) => x.process)).toFixed(2).padStart(17)} ${median(xs.map((x) => x.cpu)).toFixed(2).padStart(19)} ${median(xs.map((x) => x.main)).toFixed(2).padStart(13)} ${median(xs.map((x) => x.gc)).toFixed(2).padStart(6)} ${peak.toFixed(0).padStart(9)}   ${((peak - base) / grid).toFixed(1)} of ${grid.toFixed(0)} MiB`);
    }
    // the pictures' own cost: the medians with them less those without
    const cost = (key, digits) => (median(runs.pictures.map((x) => x[key])) - median(runs.tables.map((x) => x[key]))).toFixed(digits);
    console.log(`the pictures' cost: ${cost("wall", 2)} s wall, ${cost("cpu", 2)} s CPU over all threads, ${cost("main", 2)} s main thread, ${(Number(cost("rssMB", 1)) / grid).toFixed(1)} complex grids of peak memory`);
    console.log(`(baseline: ${base.toFixed(0)} MB, node with psibox's modules and HDF5 loaded; the goal: under 1 s with pictures, within 5 complex grids)`);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  if (process.argv[2] === "--child") await child(process.argv[3], process.argv[4], process.argv[5], Number(process.argv[6]));
  else {
    const args = process.argv.slice(2);
    const r = args.indexOf("--repeat");
    await printAnalyzeRows(Number(args.find((a, i) => !a.startsWith("--") && i !== r + 1) ?? 128), r >= 0 ? Number(args[r + 1]) : 3);
  }
}
