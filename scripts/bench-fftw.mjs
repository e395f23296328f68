// psibox's 3D periodic step against FFTW (pyFFTW, FFTW_MEASURE, the same thread count): the step's time over
// the time FFTW needs for the step's four transforms alone (two complex 3D transforms of ψ, one real forward
// and one real inverse), and over FFTW's whole step (scripts/fftw_step.py, the step of numpy_step.py on FFTW's
// transforms). Both sides run in one process each for the whole comparison, and their timings alternate
// round by round, so that a change in the machine's load hits both alike. Wall time and the CPU time of all
// threads of each process are printed (medians); the fields must agree after the same number of steps.
// Usage (after npm run build): node scripts/bench.mjs --fftw-only [--large] [--threads N] [--steps N] [--rounds N]
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Grid } from "../dist/grid/grid.js";
import { makePoissonSolver } from "../dist/fields/poisson.js";
import { StaticBackground } from "../dist/physics/cosmology/background.js";
import { SplitStepper } from "../dist/integrators/split-step.js";
import { ThreadedStepper } from "../dist/integrators/threaded-step.js";
import { readNpyComplex } from "../dist/io/npy.js";
import { benchDt, benchField, writeNpy } from "./bench-field.mjs";

const here = path.dirname(fileURLToPath(import.meta.url));

/** A python3 that imports pyfftw: $PSIBOX_PYTHON, then each python3 on PATH in order; undefined if none. */
export function findFftwPython() {
  const dirs = (process.env.PATH ?? "").split(path.delimiter).filter(Boolean);
  const candidates = [process.env.PSIBOX_PYTHON, ...dirs.map((d) => path.join(d, "python3"))].filter(Boolean);
  for (const python of new Set(candidates)) {
    if (!fs.existsSync(python)) continue;
    if (spawnSync(python, ["-c", "import pyfftw, numpy"]).status === 0) return python;
  }
  return undefined;
}

/** fftw_step.py as a process answering one command per line. */
function startReference(python, file, dt, threads) {
  const child = spawn(python, [path.join(here, "fftw_step.py"), file, String(dt), "--threads", String(threads)], { stdio: ["pipe", "pipe", "inherit"] });
  let pending = "";
  const waiting = [];
  const lines = [];
  child.stdout.setEncoding("utf8");
  child.stdout.on("data", (chunk) => {
    pending += chunk;
    for (let i = pending.indexOf("\n"); i >= 0; i = pending.indexOf("\n")) {
      lines.push(pending.slice(0, i));
      pending = pending.slice(i + 1);
    }
    while (lines.length > 0 && waiting.length > 0) waiting.shift().resolve(lines.shift());
  });
  child.on("exit", (code) => {
    for (const w of waiting.splice(0)) w.reject(new Error(`fftw_step.py exited (${code})`));
  });
  const next = () => (lines.length > 0 ? Promise.resolve(lines.shift()) : new Promise((resolve, reject) => waiting.push({ resolve, reject })));
  const ask = (command) => {
    if (command) child.stdin.write(command + "\n");
    return next();
  };
  /** Wall and CPU ms of each repetition. */
  const timed = async (command) => (await ask(command)).split(" ").map((pair) => pair.split(",").map(Number));
  return { ready: () => ask(), timed, save: (to) => ask(`save ${to}`), quit: () => child.stdin.end() };
}

/** psibox's steps, each with its wall and CPU ms (CPU of every thread of this process). */
function psiboxSteps(stepper, dt, count) {
  const out = [];
  for (let i = 0; i < count; i++) {
    const c0 = process.cpuUsage();
    const w0 = performance.now();
    stepper.step(dt);
    const w = performance.now() - w0;
    const c = process.cpuUsage(c0);
    out.push([w, (c.user + c.system) / 1000]);
  }
  return out;
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** One grid: `rounds` rounds of `steps` psibox steps, the four FFTW transforms `steps` times and `steps` FFTW steps. */
async function compareGrid(python, n, threads, steps, rounds) {
  const shape = [n, n, n];
  const grid = new Grid(shape, [1, 1, 1]);
  const psi0 = benchField(grid);
  const dt = benchDt(shape);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-fftw-"));
  const poisson = makePoissonSolver(grid, "periodic");
  const stepper = threads > 1 ? new ThreadedStepper(grid, new StaticBackground(), poisson, threads) : new SplitStepper(grid, new StaticBackground(), poisson);
  try {
    writeNpy(path.join(dir, "in.npy"), shape, psi0);
    stepper.setState(psi0, 0);
    const ref = startReference(python, path.join(dir, "in.npy"), dt, threads);
    await ref.ready();
    // one untimed round on each side (first touches, FFTW's threads started)
    psiboxSteps(stepper, dt, 1);
    await ref.timed("step 1");
    await ref.timed("transforms 1");
    const t = { psibox: [], four: [], step: [] };
    for (let r = 0; r < rounds; r++) {
      t.psibox.push(...psiboxSteps(stepper, dt, steps));
      t.four.push(...(await ref.timed(`transforms ${steps}`)));
      t.step.push(...(await ref.timed(`step ${steps}`)));
    }
    await ref.save(path.join(dir, "out.npy"));
    ref.quit();
    const want = readNpyComplex(path.join(dir, "out.npy")).data;
    const got = stepper.psi;
    let diff = 0;
    let scale = 0;
    for (let i = 0; i < want.length; i++) {
      diff = Math.max(diff, Math.abs(want[i] - got[i]));
      scale = Math.max(scale, Math.abs(want[i]));
    }
    const m = (xs, k) => median(xs.map((x) => x[k]));
    return { wall: [m(t.psibox, 0), m(t.four, 0), m(t.step, 0)], cpu: [m(t.psibox, 1), m(t.four, 1), m(t.step, 1)], relDiff: diff / scale };
  } finally {
    stepper.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** The FFTW table for n³ grids `sizes` on `threads` threads (both sides). */
export async function printFftwRows(sizes, threads, steps = 5, rounds = 3) {
  const python = findFftwPython();
  if (!python) {
    console.log("(no python3 with pyFFTW here, e.g. Debian's python3-pyfftw: the comparison with FFTW is skipped)");
    return;
  }
  const load = () => os.loadavg().map((x) => x.toFixed(1)).join(" ");
  console.log(`\n3D periodic step against FFTW (pyFFTW, FFTW_MEASURE), ${threads} thread(s) on both sides, ${rounds} interleaved rounds of ${steps} steps, medians; load average ${load()}`);
  console.log("grid    clock   psibox step ms   FFTW 4 transforms ms   FFTW step ms   step / 4 transforms   step / FFTW step");
  for (const n of sizes) {
    const c = await compareGrid(python, n, threads, steps, rounds);
    for (const [clock, v] of [["wall", c.wall], ["cpu", c.cpu]]) {
      const cols = [v[0].toFixed(1).padStart(14), v[1].toFixed(1).padStart(22), v[2].toFixed(1).padStart(14), `${(v[0] / v[1]).toFixed(2)}×`.padStart(21), `${(v[0] / v[2]).toFixed(2)}×`.padStart(18)];
      console.log(`${`${n}³`.padEnd(7)} ${clock.padEnd(5)} ${cols.join(" ")}`);
    }
    const ok = c.relDiff < 1e-10 ? "agree" : "DIFFER";
    console.log(`        fields after the same steps: max |Δψ|/max|ψ| = ${c.relDiff.toExponential(1)} (${ok}); load average now ${load()}`);
  }
}
