#!/usr/bin/env node
// Snapshot write and read speed for a 3D field (default 128³), from the built library, and the same file
// read by h5py (psi_re and psi_im, as a Python user would) when a python3 with h5py is there.
// Usage: node scripts/bench-io.mjs [cells-per-axis]   (also the last part of npm run bench)
import { spawnSync } from "node:child_process";
import { pathToFileURL } from "node:url";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot, writeSnapshot } from "../dist/io/snapshot.js";

/** Median ms of h5py reading psi_re and psi_im of `file` (3 reads, page cache warm as for psibox), or undefined without h5py. */
function h5pyReadMs(file) {
  const script = [
    "import sys, time, h5py",
    "ts = []",
    "for _ in range(3):",
    "    t0 = time.perf_counter()",
    "    with h5py.File(sys.argv[1], 'r') as f:",
    "        re = f['psi_re'][...]; im = f['psi_im'][...]",
    "    ts.append((time.perf_counter() - t0) * 1000)",
    "print(sorted(ts)[1])",
  ].join("\n");
  for (const python of ["python3", "/usr/bin/python3"]) {
    const r = spawnSync(python, ["-c", script, file], { encoding: "utf8" });
    if (r.status === 0) return Number(r.stdout.trim());
  }
  return undefined;
}
/** Write and read an n³ snapshot in float64 and float32, three times each, with h5py's read of the same file beside it when it is there. */
export async function printIoRows(n = 128) {
  await loadHdf5();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-io-"));
  const psi = Float64Array.from({ length: 2 * n ** 3 }, (_, i) => Math.sin(i));
  const meta = {
    kind: "snapshot", software: "bench", step: 0, time: 0, timeUnit: "Gyr", scaleFactor: 1, redshift: null,
    cells: [n, n, n], boxSizeKpc: [1, 1, 1], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" },
    massMsun: 1, config: "", configSha256: "",
  };
  const mb = psi.byteLength / 1e6;
  console.log(`\nsnapshot files of ${n}³ (medians of 3; h5py reads psi_re and psi_im of the same file, as a Python user would):`);
  try {
    for (const precision of ["float64", "float32"]) {
      const file = path.join(dir, `s-${precision}.h5`);
      const times = { write: [], read: [] };
      for (let r = 0; r < 3; r++) {
        let t0 = performance.now();
        writeSnapshot(file, { meta, psi }, precision);
        times.write.push(performance.now() - t0);
        t0 = performance.now();
        readSnapshot(file);
        times.read.push(performance.now() - t0);
      }
      const med = (a) => a.sort((x, y) => x - y)[1];
      const size = fs.statSync(file).size / 1e6;
      const h5py = h5pyReadMs(file);
      const ratio = h5py === undefined ? " (no python3 with h5py here: no comparison)" : `; h5py reads it at ${(mb / (h5py / 1000)).toFixed(0)} MB/s (psibox's read takes ${(med(times.read) / h5py).toFixed(2)}× h5py's time)`;
      console.log(`${n}³ ${precision}: ${size.toFixed(0)} MB file; write ${(mb / (med(times.write) / 1000)).toFixed(0)} MB/s of field (with fsync), read ${(mb / (med(times.read) / 1000)).toFixed(0)} MB/s${ratio}`);
    }
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  await printIoRows(Number(process.argv[2] ?? 128));
  console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
}
