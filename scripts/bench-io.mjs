#!/usr/bin/env node
// Snapshot write and read speed for a 3D field (default 128³), from the built library, and the same file
// read by h5py (psi_re and psi_im into NumPy, as a Python user would) when a python3 with h5py is there:
// wall and CPU time of each read, and psibox's over h5py's.
// Usage: node scripts/bench-io.mjs [cells-per-axis]   (also the last part of npm run bench)
import { spawnSync } from "node:child_process";
import { pathToFileURL } from "node:url";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadHdf5 } from "../dist/io/h5.js";
import { readSnapshot, writeSnapshot } from "../dist/io/snapshot.js";
import { startReadHelper } from "../dist/io/shared-read.js";

/** A python3 that has h5py: each python3 on PATH in order, then the system's own (a PATH may hold several installs). */
function pythonWithH5py() {
  const candidates = [...(process.env.PATH ?? "").split(path.delimiter).filter(Boolean).map((d) => path.join(d, "python3")), "/usr/bin/python3"];
  for (const exe of new Set(candidates)) {
    if (fs.existsSync(exe) && spawnSync(exe, ["-c", "import h5py"], { encoding: "utf8" }).status === 0) return exe;
  }
  return undefined;
}

/** Reads into new memory timed per precision (each after a write of the file), and reads into reused memory (a few ms each: more of them). */
const FRESH = 3;
const REUSED = 30;

/**
 * h5py reading psi_re and psi_im of `file` into NumPy arrays (the components as stored: float64 or float32) in one
 * process with the page cache warm as for psibox, `fresh` times into new arrays (f[name][...]) and `reused` times into
 * the same two arrays again (read_direct, after one read that makes them): the wall and CPU ms of each read (the
 * file's opening included).
 */
function h5pyRead(python, file, fresh, reused) {
  const script = [
    "import sys, time, json, h5py, numpy as np",
    "def timed(read, times):",
    "    ts = []",
    "    for _ in range(times):",
    "        t0, c0 = time.perf_counter(), time.process_time()",
    "        with h5py.File(sys.argv[1], 'r') as f: read(f)",
    "        ts.append(((time.perf_counter() - t0) * 1000, (time.process_time() - c0) * 1000))",
    "    return {'wall': [t[0] for t in ts], 'cpu': [t[1] for t in ts]}",
    `fresh = timed(lambda f: (f['psi_re'][...], f['psi_im'][...]), ${fresh})`,
    "with h5py.File(sys.argv[1], 'r') as f: re, im = f['psi_re'][...], f['psi_im'][...]",
    `reused = timed(lambda f: (f['psi_re'].read_direct(re), f['psi_im'].read_direct(im)), ${reused})`,
    // the array psibox's read gives: one complex128 ψ (read_direct takes C-contiguous arrays only, so the parts
    // go through arrays as stored)
    "def whole(f):",
    "    psi = np.empty(f['psi_re'].shape, np.complex128)",
    "    psi.real, psi.imag = f['psi_re'][...], f['psi_im'][...]",
    "psi = np.empty(re.shape, np.complex128)",
    "def again(f):",
    "    f['psi_re'].read_direct(re); f['psi_im'].read_direct(im)",
    "    psi.real, psi.imag = re, im",
    `freshSame = timed(whole, ${fresh})`,
    `reusedSame = timed(again, ${reused})`,
    "print(json.dumps({'fresh': fresh, 'reused': reused, 'freshSame': freshSame, 'reusedSame': reusedSame}))",
  ].join("\n");
  const r = spawnSync(python, ["-c", script, file], { encoding: "utf8" });
  return r.status === 0 ? JSON.parse(r.stdout.trim()) : undefined;
}

/** Wall and CPU ms (all of this process's threads) of `f`. */
function timed(f) {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  f();
  const c = process.cpuUsage(c0);
  return { wall: performance.now() - t0, cpu: (c.user + c.system) / 1000 };
}

/** Write and read an n³ snapshot in float64 and float32 (FRESH rounds of a write, a read into new memory and REUSED/FRESH reads into its array), with h5py's reads of the same file beside them when it is there. */
export async function printIoRows(n = 128) {
  await loadHdf5();
  // the reading thread that the first large read of a process starts, started here so that every timed read has it
  startReadHelper();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-bench-io-"));
  const psi = Float64Array.from({ length: 2 * n ** 3 }, (_, i) => Math.sin(i));
  const meta = {
    kind: "snapshot", software: "bench", step: 0, time: 0, timeUnit: "Gyr", scaleFactor: 1, redshift: null,
    cells: [n, n, n], boxSizeKpc: [1, 1, 1], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" },
    massMsun: 1, config: "", configSha256: "",
  };
  const mb = psi.byteLength / 1e6;
  const python = pythonWithH5py();
  const load = os.loadavg().map((l) => l.toFixed(1)).join(", ");
  console.log(`\nsnapshot files of ${n}³ (medians of ${FRESH} reads into new memory and ${REUSED} into reused memory; load average ${load}). psibox's read ends with ψ as psibox uses it (one interleaved float64 array, float32 widened),`);
  console.log(`h5py's (${python ?? "no python3 with h5py here: no comparison"}) with psi_re and psi_im as two NumPy arrays as stored; into new memory, and into the arrays of an earlier read`);
  console.log("(psibox: readSnapshot's `into`; h5py: read_direct). CPU: all threads of the process. psibox reads on two threads (its reading");
  console.log("thread, which the first large read of a process starts, is started before the timed reads). h5py's reads into reused memory");
  console.log(`are taken in turn with psibox's (${FRESH} processes of ${REUSED / FRESH}, each after psibox's ${REUSED / FRESH}), its reads into new memory in one process after them.`);
  const med = (a) => a.slice().sort((x, y) => x - y)[a.length >> 1];
  // a read into reused memory takes a few ms: two decimals
  const ms = (t) => t.toFixed(t < 10 ? 2 : 0);
  const row = (what, ours, theirs) => {
    const them = theirs === undefined ? "" : `; h5py ${ms(med(theirs.wall))} ms, CPU ${ms(med(theirs.cpu))} ms: psibox takes ${(med(ours.wall) / med(theirs.wall)).toFixed(2)}× h5py's time (CPU ${(med(ours.cpu) / med(theirs.cpu)).toFixed(2)}×)`;
    return `  read ${what}: ${ms(med(ours.wall))} ms (${(mb / (med(ours.wall) / 1000)).toFixed(0)} MB/s of field), CPU ${ms(med(ours.cpu))} ms${them}`;
  };
  const same = (ours, theirs) =>
    `    h5py to psibox's result, one complex128 ψ (psi.real, psi.imag = re, im after the read): ${ms(med(theirs.wall))} ms, CPU ${ms(med(theirs.cpu))} ms: psibox takes ${(med(ours.wall) / med(theirs.wall)).toFixed(2)}×`;
  try {
    for (const precision of ["float64", "float32"]) {
      const file = path.join(dir, `s-${precision}.h5`);
      const write = [];
      const fresh = { wall: [], cpu: [] };
      const reused = { wall: [], cpu: [] };
      // h5py's reads into reused memory in turn with psibox's (the load of a shared machine changes within a run)
      const theirs = python === undefined ? undefined : { wall: [], cpu: [] };
      // and h5py's reads to the array psibox's read gives (one complex128 ψ), in the same turns
      const theirsSame = python === undefined ? undefined : { wall: [], cpu: [] };
      let into;
      for (let r = 0; r < FRESH; r++) {
        write.push(timed(() => writeSnapshot(file, { meta, psi }, precision)).wall);
        const read = timed(() => (into = readSnapshot(file).psi));
        fresh.wall.push(read.wall);
        fresh.cpu.push(read.cpu);
        for (let k = 0; k < REUSED / FRESH; k++) {
          const again = timed(() => readSnapshot(file, false, into));
          reused.wall.push(again.wall);
          reused.cpu.push(again.cpu);
        }
        const their = theirs && h5pyRead(python, file, 0, REUSED / FRESH);
        theirs?.wall.push(...(their?.reused.wall ?? []));
        theirs?.cpu.push(...(their?.reused.cpu ?? []));
        theirsSame?.wall.push(...(their?.reusedSame.wall ?? []));
        theirsSame?.cpu.push(...(their?.reusedSame.cpu ?? []));
      }
      const size = fs.statSync(file).size / 1e6;
      const h5py = python === undefined ? undefined : h5pyRead(python, file, FRESH, 0);
      console.log(`${n}³ ${precision}: ${size.toFixed(0)} MB file; write ${(mb / (med(write) / 1000)).toFixed(0)} MB/s of field (with fsync)`);
      console.log(row("into new memory", fresh, h5py?.fresh));
      if (h5py) console.log(same(fresh, h5py.freshSame));
      console.log(row("into reused memory", reused, theirs?.wall.length ? theirs : undefined));
      if (theirsSame?.wall.length) console.log(same(reused, theirsSame));
    }
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  await printIoRows(Number(process.argv[2] ?? 128));
  console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
}
