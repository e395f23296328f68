#!/usr/bin/env node
// A truncated-Wigner ensemble at benchmark size: a 1D box of 1024 cells (or a 2D box with --dims 2) with a 5% Jeans-
// unstable density wave, advanced over one dynamical time 1/√(4πGρ̄) = 50 Myr of its mean density, with 1000 members
// (--members), on all cores (--workers), through the library (npm run bench:ensemble builds it first). Prints the wall
// time, the time per member and the condensate fraction at the end; the ensemble folder is temporary.
// Usage: node scripts/bench-ensemble.mjs [--dims 1|2] [--cells N] [--members M] [--workers W]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadConfig } from "../dist/config/load.js";
import { resolveRun } from "../dist/config/resolve.js";
import { runEnsemble } from "../dist/ensemble/ensemble.js";

const args = process.argv.slice(2);
const arg = (name, fallback) => (args.includes(name) ? Number(args[args.indexOf(name) + 1]) : fallback);
const dims = arg("--dims", 1);
const cells = arg("--cells", dims === 1 ? 1024 : 256);
const members = arg("--members", dims === 1 ? 1000 : 200);
const workers = arg("--workers", os.availableParallelism());

const work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-ensemble-"));
try {
  const grid = dims === 1 ? `cells = ${cells}` : `cells = [${cells}, ${cells}]`;
  const mode = dims === 1 ? "[1]" : "[1, 1]";
  const file = path.join(work, "box.toml");
  fs.writeFileSync(
    file,
    `[grid]\n${grid}\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "50 Myr"\n` +
      `[initial]\nkind = "plane-wave"\nmean_density = "7e6 Msun/kpc^3"\ncontrast = 0.05\nmode = ${mode}\n[output]\ntime_unit = "Myr"\n` +
      `[ensemble]\nmembers = ${members}\nparticles = ${20 * cells ** dims}\nsamples = 10\n`,
  );
  const run = resolveRun(loadConfig(file), "box", work);
  const start = performance.now();
  let last = 0;
  const reporter = {
    phase() {},
    endPhase() {},
    warn(text) {
      process.stderr.write(`warning: ${text}\n`);
    },
    progress(fraction, status) {
      if (performance.now() - last < 10_000) return;
      last = performance.now();
      process.stderr.write(`  ${(100 * fraction).toFixed(0)}% ${status}\n`);
    },
  };
  const result = await runEnsemble(run, { workers, reporter });
  const wall = (performance.now() - start) / 1000;
  const end = result.reduction.samples.at(-1);
  console.log(`${dims}D ${cells}${dims === 2 ? `²` : ""} cells, ${members} members over 50 Myr on ${workers} workers: ${wall.toFixed(1)} s (${((wall * workers) / members).toFixed(3)} worker-seconds per member); condensate fraction at the end ${end.fraction.value.toPrecision(4)} ± ${end.fraction.error.toPrecision(2)}; load average at the end ${os.loadavg()[0].toFixed(1)}`);
} finally {
  fs.rmSync(work, { recursive: true, force: true });
}
