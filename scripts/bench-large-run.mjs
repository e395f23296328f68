#!/usr/bin/env node
// A large run end to end through the CLI: an n³ box (default 512³, the largest grid psibox accepts) that writes
// its first snapshot, a checkpoint and a last snapshot, then is extended (resumed from that checkpoint) by a few
// more steps. Prints the wall time of each part, psibox's memory estimate against the peak resident memory the
// run recorded, and the sizes of the files. Not part of the tests; it needs the memory (about 9 GiB at 512³)
// and about 12 GB of disk in the temporary folder.
// Usage: npm run build && node scripts/bench-large-run.mjs [cells-per-axis] [threads]
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";

const n = Number(process.argv[2] ?? 512);
const threads = Number(process.argv[3] ?? 2);
const bin = path.join(path.dirname(fileURLToPath(import.meta.url)), "..", "dist", "cli", "bin.js");
const work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-large-"));
const GiB = 2 ** 30;

// a gentle plane wave (cheap to set up); the span is a few adaptive steps at this resolution (the step shrinks as 1/n²)
const stepMyr = 0.11 * (512 / n) ** 2;
fs.writeFileSync(
  path.join(work, "large.toml"),
  `[grid]
cells = [${n}, ${n}, ${n}]
box = "100 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "${(2.5 * stepMyr).toPrecision(3)} Myr"
[initial]
kind = "plane-wave"
mean_density = "1e6 Msun/kpc^3"
contrast = 0.3
mode = [1, 0, 0]
[integrator]
threads = ${threads}
[output]
checkpoint_every = 1
time_unit = "Myr"
`,
);

function psibox(args) {
  const started = performance.now();
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: work, encoding: "utf8", stdio: ["ignore", "pipe", "inherit"] });
  const seconds = (performance.now() - started) / 1000;
  if (r.status !== 0) throw new Error(`psibox ${args.join(" ")} exited with ${r.status}: ${r.stdout}`);
  return seconds;
}

const summaryOf = () => JSON.parse(fs.readFileSync(path.join(work, "output", "large", "summary.json"), "utf8"));
const sizeGiB = (f) => (fs.statSync(path.join(work, "output", "large", f)).size / GiB).toFixed(2);
const line = (what, seconds, s) =>
  `${what.padEnd(26)} ${seconds.toFixed(0).padStart(5)} s  ${String(s.steps).padStart(3)} steps  estimate ${(s.memory.estimate_bytes / GiB).toFixed(2)} GiB  peak RSS ${(s.memory.peak_rss_bytes / GiB).toFixed(2)} GiB`;

try {
  console.log(`${n}³ on ${threads} threads in ${work} (${(os.totalmem() / GiB).toFixed(0)} GiB machine)`);
  const run = psibox(["run", "large.toml", "-q"]);
  const first = summaryOf();
  console.log(line("run (snapshots, checkpoint)", run, first));
  const files = ["snapshots/snap_00000.h5", "checkpoint.h5"].map((f) => `${f} ${sizeGiB(f)} GiB`).join(", ");
  console.log(`  files: ${files}`);
  const extend = psibox(["extend", "output/large", "--to", `${(4.5 * stepMyr).toPrecision(3)} Myr`, "-q"]);
  const second = summaryOf();
  console.log(line("extend (resume, more steps)", extend, second));
  console.log(`  resumed from step ${second.resumed_from_step}; ended at t = ${second.end.t.toPrecision(4)} Myr, relative mass drift ${second.mass_drift.toExponential(1)}`);
} finally {
  fs.rmSync(work, { recursive: true, force: true });
}
