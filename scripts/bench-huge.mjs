#!/usr/bin/env node
// The 512³ periodic step (grids spread over several WebAssembly memories) beside the 256³ step, same threads,
// in one run: each grid in a process of its own (256³, 512³, 256³ again), warmed up by two steps, then the
// median of `--steps` steps: ms per step, ns per cell-step by wall time and by CPU time of all threads, the
// ratio of 512³'s per-cell cost to 256³'s, and the peak resident memory, also in complex grids of its own
// size (2 GiB at 512³) beyond a process that loads the same modules and steps nothing.
// The field is a random 64³ field tiled over the box, so each run also checks its field after the steps
// against the 64³ step on a box 64/N as long (computed independently on the one-memory wasm step; the tiled
// field's evolution is the tile's, tiled).
// Usage (after npm run build): node scripts/bench-huge.mjs [--threads N] [--steps N] [--sizes 256,512]
//   or npm run bench -- --huge [--threads N]. A 512³ step needs about 7 GiB of memory.
import { spawnSync } from "node:child_process";
import os from "node:os";
import { fileURLToPath } from "node:url";

const TILE = 64;
const GiB = 2 ** 30;

function option(args, name, fallback) {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : fallback;
}

/** A random 64³ field (density contrast 10%, no flow), as scripts/bench.mjs's. */
function tileField(size) {
  const psi = new Float64Array(2 * size);
  let s = 12345;
  for (let i = 0; i < size; i++) {
    s = (s * 1103515245 + 12345) % 2147483648;
    psi[2 * i] = Math.sqrt(100 * (1 + 0.1 * (s / 2147483648 - 0.5)));
  }
  return psi;
}

/** Write the tile over an n³ field: each row is n/TILE copies of a tile row. */
function tile(out, small, n) {
  const rowTile = 2 * TILE;
  for (let a = 0; a < n; a++) {
    for (let b = 0; b < n; b++) {
      const from = rowTile * ((a % TILE) * TILE + (b % TILE));
      const row = small.subarray(from, from + rowTile);
      for (let c = 0; c < n; c += TILE) out.set(row, 2 * ((a * n + b) * n + c));
    }
  }
}

/** Largest |big − tiled small| over the largest |small|. */
function tiledDifference(big, small, n) {
  let diff = 0;
  let top = 0;
  for (let i = 0; i < small.length; i++) top = Math.max(top, Math.abs(small[i]));
  for (let a = 0; a < n; a++) {
    for (let b = 0; b < n; b++) {
      const from = 2 * TILE * ((a % TILE) * TILE + (b % TILE));
      const at = 2 * (a * n + b) * n;
      for (let c = 0; c < 2 * n; c++) diff = Math.max(diff, Math.abs(big[at + c] - small[from + (c % (2 * TILE))]));
    }
  }
  return diff / top;
}

/** One grid in this process: the timed steps, then the check against the tile. */
async function child(n, threads, steps) {
  const { Grid } = await import("../dist/grid/grid.js");
  const { makePoissonSolver } = await import("../dist/fields/poisson.js");
  const { StaticBackground } = await import("../dist/physics/cosmology/background.js");
  const { SplitStepper } = await import("../dist/integrators/split-step.js");
  const { ThreadedStepper } = await import("../dist/integrators/threaded-step.js");
  if (n === 0) return { rss: process.resourceUsage().maxRSS * 1024 };
  const make = (cells, side, t) => {
    const grid = new Grid([cells, cells, cells], [side, side, side]);
    const solver = makePoissonSolver(grid, "periodic");
    return t > 1 ? new ThreadedStepper(grid, new StaticBackground(), solver, t, "auto") : new SplitStepper(grid, new StaticBackground(), solver, "auto");
  };
  const stepper = make(n, 1, threads);
  const small = tileField(TILE ** 3);
  tile(stepper.rawPsi, small, n);
  stepper.setState(stepper.rawPsi, 0);
  // a step the phase rule would allow, as scripts/bench.mjs's
  const dt = Math.min(1e-5, 4 / (Math.PI * n) ** 2);
  for (let i = 0; i < 2; i++) stepper.step(dt);
  // a run keeps an undo copy of ψ before every step: touched once, so that the peak memory counts it
  stepper.saveUndo();
  const wall = [];
  const cpu = [];
  for (let i = 0; i < steps; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    stepper.step(dt);
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  const banks = stepper.memory.setup.banks?.length ?? 1;
  const reference = make(TILE, TILE / n, 1);
  reference.setState(small, 0);
  for (let i = 0; i < steps + 2; i++) reference.step(dt);
  const difference = tiledDifference(stepper.psi, reference.psi, n);
  const result = { n, backend: stepper.backend, banks, wall: median(wall), cpu: median(cpu), rss: process.resourceUsage().maxRSS * 1024, difference };
  stepper.close();
  reference.close();
  return result;
}

function median(values) {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** Run one grid in a process of its own. */
function spawnChild(n, threads, steps) {
  const script = fileURLToPath(import.meta.url);
  const r = spawnSync(process.execPath, [script, "--child", String(n), "--threads", String(threads), "--steps", String(steps)], { encoding: "utf8", maxBuffer: 1 << 20 });
  if (r.status !== 0) throw new Error(`the ${n}³ run failed: ${r.stderr.trim().split("\n").slice(-3).join(" ")}`);
  return JSON.parse(r.stdout.trim().split("\n").pop());
}

/** Print the rows: each size's step, the ratios to the first size, the memory. */
export function printHugeRows(sizes = [256, 512], threads = os.availableParallelism(), steps = 5) {
  const order = sizes.length === 2 ? [sizes[0], sizes[1], sizes[0]] : sizes;
  console.log(`\n${sizes.map((n) => `${n}³`).join(" and ")} periodic steps, ${threads} thread(s), median of ${steps} steps after 2, each in a process of its own; load average ${os.loadavg().map((l) => l.toFixed(1)).join(" ")}`);
  const base = spawnChild(0, threads, steps).rss;
  console.log("grid    backend  memories  ms/step  ns/cell-step (wall)  ns/cell-step (CPU, all threads)  peak RSS   beyond baseline   field vs 64³ tile");
  const rows = order.map((n) => {
    const r = spawnChild(n, threads, steps);
    const cells = n ** 3;
    const beyond = r.rss - base;
    const grids = beyond / (16 * cells);
    console.log(
      `${`${n}³`.padEnd(7)} ${r.backend.padEnd(8)} ${String(r.banks).padStart(8)} ${r.wall.toFixed(0).padStart(8)} ${((r.wall * 1e6) / cells).toFixed(1).padStart(20)} ${((r.cpu * 1e6) / cells).toFixed(1).padStart(32)} ${(r.rss / GiB).toFixed(2).padStart(6)} GiB ${(beyond / GiB).toFixed(2).padStart(6)} GiB  = ${grids.toFixed(2)} complex grids of ${n}³  ${r.difference.toExponential(1)}`,
    );
    return { n, wallPerCell: r.wall / cells, cpuPerCell: r.cpu / cells };
  });
  console.log(`baseline (a process that loads the modules): ${(base / 2 ** 20).toFixed(0)} MB`);
  if (rows.length === 3) {
    const small = { wall: (rows[0].wallPerCell + rows[2].wallPerCell) / 2, cpu: (rows[0].cpuPerCell + rows[2].cpuPerCell) / 2 };
    const ratio = (x, y) => (x / y).toFixed(2);
    console.log(`per-cell cost ${sizes[1]}³ / ${sizes[0]}³ (mean of the two ${sizes[0]}³ runs): wall ${ratio(rows[1].wallPerCell, small.wall)}, CPU ${ratio(rows[1].cpuPerCell, small.cpu)}`);
  }
}

const args = process.argv.slice(2);
const threads = Number(option(args, "--threads", os.availableParallelism()));
const steps = Number(option(args, "--steps", 5));
if (args.includes("--child")) {
  console.log(JSON.stringify(await child(Number(option(args, "--child", 0)), threads, steps)));
} else if (process.argv[1] === fileURLToPath(import.meta.url)) {
  printHugeRows(option(args, "--sizes", "256,512").split(",").map(Number), threads, steps);
}
