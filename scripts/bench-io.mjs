#!/usr/bin/env node
// Snapshot write and read speed for a 3D field (default 128³), from the built library.
// Usage: node scripts/bench-io.mjs [cells-per-axis]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot, writeSnapshot } from "../dist/io/snapshot.js";

const n = Number(process.argv[2] ?? 128);
await loadHdf5();
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-io-"));
const psi = Float64Array.from({ length: 2 * n ** 3 }, (_, i) => Math.sin(i));
const meta = {
  kind: "snapshot", software: "bench", step: 0, time: 0, timeUnit: "Gyr", scaleFactor: 1, redshift: null,
  cells: [n, n, n], boxSizeKpc: [1, 1, 1], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" },
  massMsun: 1, config: "", configSha256: "",
};
const mb = psi.byteLength / 1e6;
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
  console.log(`${n}³ ${precision}: ${size.toFixed(0)} MB file; write ${(mb / (med(times.write) / 1000)).toFixed(0)} MB/s of field (with fsync), read ${(mb / (med(times.read) / 1000)).toFixed(0)} MB/s`);
}
console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
fs.rmSync(dir, { recursive: true, force: true });
