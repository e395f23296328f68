// Checkpoint and resume: a run killed with SIGKILL and resumed ends bit for bit where an uninterrupted run ends,
// with the quantum sidecar on (its state travels in the checkpoint), and with the [breakdown] companion on (its
// tangent, probe and twin fields and the plug-ins' states travel in the checkpoint; same thread count).
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot } from "../../src/io/snapshot.js";
import { BIN, makeWork, removeWork } from "../helpers/cli.js";

let work: string;

const CONFIG = `
[grid]
cells = [128, 128]
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "250 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.3
mode = [1, 2]
[output]
time_unit = "Myr"
snapshot_interval = "50 Myr"
checkpoint_every = 100
`;

// a tiny 1D run of many short steps, so that the kill lands long before the end
const COMPANION = `
[grid]
cells = 128
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "1000 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.3
mode = [1]
[integrator]
safety = 0.1
[output]
time_unit = "Myr"
snapshot_interval = "1000 Myr"
timeseries_every = 50
checkpoint_every = 300
[breakdown]
tangent = true
interval = "100 Myr"
probes = 1
twin_offset = 1e-6
`;

beforeAll(async () => {
  await loadHdf5();
  work = makeWork("resume");
  fs.writeFileSync(path.join(work, "r.toml"), CONFIG);
  fs.writeFileSync(path.join(work, "c.toml"), COMPANION);
});
afterAll(() => removeWork(work));

function psibox(args: string[]) {
  return spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
}

async function killAfterCheckpoint(args: string[], checkpoint: string): Promise<void> {
  const child = spawn(process.execPath, [BIN, ...args], { cwd: work, stdio: "ignore" });
  const exited = new Promise<void>((resolve) => child.on("exit", () => resolve()));
  const start = Date.now();
  while (!fs.existsSync(checkpoint) && Date.now() - start < 60_000) await new Promise((r) => setTimeout(r, 20));
  child.kill("SIGKILL");
  await exited;
}

describe("resume", () => {
  it("a SIGKILLed run resumed from its checkpoint matches an uninterrupted run bitwise", async () => {
    expect(psibox(["run", "r.toml", "-q", "--set", "output.dir=full"]).status).toBe(0);
    await killAfterCheckpoint(["run", "r.toml", "-q", "--set", "output.dir=cut"], path.join(work, "cut/checkpoint.h5"));
    const summaryBefore = path.join(work, "cut/summary.json");
    expect(fs.existsSync(summaryBefore)).toBe(false); // it really was killed mid-run
    // a half-written temporary file from the kill is ignored and cleaned
    fs.writeFileSync(path.join(work, "cut/snapshots/.snap_00009.h5.tmp-1-2"), "partial");
    const r = psibox(["run", "--resume", "cut", "-q"]);
    // the killed run's lock is stale: removed with one line of explanation
    expect(r.stderr).toMatch(/^psibox: removed a stale lock of process \d+ on this host \(started .*; that process is gone\)\n$/);
    expect(r.status).toBe(0);
    expect(fs.existsSync(path.join(work, "cut/snapshots/.snap_00009.h5.tmp-1-2"))).toBe(false);
    const a = readSnapshot(path.join(work, "full/snapshots/snap_00005.h5"));
    const b = readSnapshot(path.join(work, "cut/snapshots/snap_00005.h5"));
    expect(b.meta.step).toBe(a.meta.step);
    expect(b.meta.time).toBeCloseTo(250, 10);
    expect(Buffer.from(b.psi.buffer).equals(Buffer.from(a.psi.buffer))).toBe(true);
    expect(fs.readFileSync(path.join(work, "cut/timeseries.csv"), "utf8")).toBe(fs.readFileSync(path.join(work, "full/timeseries.csv"), "utf8"));
    // the quantum sidecar (on by default) is a plug-in with state in the checkpoint: its clocks resume bit for bit too
    expect(fs.readFileSync(path.join(work, "cut/clocks.json"), "utf8")).toBe(fs.readFileSync(path.join(work, "full/clocks.json"), "utf8"));
    const summary = JSON.parse(fs.readFileSync(summaryBefore, "utf8"));
    expect(summary.status).toBe("completed");
    expect(summary.clocks).toEqual(JSON.parse(fs.readFileSync(path.join(work, "full/summary.json"), "utf8")).clocks);
    expect(summary.clocks).toHaveLength(5);
    expect(summary.resumed_from_step).toBeGreaterThan(0);
    // snapshots land exactly on the requested times
    const times = [0, 1, 2, 3, 4, 5].map((i) => readSnapshot(path.join(work, `cut/snapshots/snap_0000${i}.h5`)).meta.time);
    times.forEach((t, i) => expect(t).toBeCloseTo(50 * i, 10));
  });

  it("a completed run is not resumed again; a folder without a checkpoint or with a corrupt one is a clear error", () => {
    const again = psibox(["run", "--resume", "full"]);
    expect(again.status).toBe(0);
    expect(again.stdout).toMatch(/already completed/);
    fs.mkdirSync(path.join(work, "empty"));
    const none = psibox(["run", "--resume", "empty"]);
    expect(none.status).toBe(2);
    expect(none.stderr).toBe("psibox: empty: not a psibox run folder (no config.toml)\n");
    // corrupt the checkpoint of a copy of a stopped run: a clear error, existing outputs untouched
    fs.cpSync(path.join(work, "full"), path.join(work, "broken"), { recursive: true });
    fs.rmSync(path.join(work, "broken/summary.json"));
    const cp = path.join(work, "broken/checkpoint.h5");
    fs.writeFileSync(cp, fs.readFileSync(cp).subarray(0, 4000));
    const before = fs.readFileSync(path.join(work, "broken/timeseries.csv"));
    const bad = psibox(["run", "--resume", "broken", "-q"]);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/^psibox: .*checkpoint\.h5: not a readable HDF5 file \(.*\)\n$/);
    expect(fs.readFileSync(path.join(work, "broken/timeseries.csv")).equals(before)).toBe(true);
  });

  it("with the [breakdown] companion on (tangent, probe and twin fields), a SIGKILLed run resumes bit for bit", async () => {
    expect(psibox(["run", "c.toml", "-q", "--set", "output.dir=cfull"]).status).toBe(0);
    await killAfterCheckpoint(["run", "c.toml", "-q", "--set", "output.dir=ccut"], path.join(work, "ccut/checkpoint.h5"));
    expect(fs.existsSync(path.join(work, "ccut/summary.json"))).toBe(false); // killed mid-run
    expect(psibox(["run", "--resume", "ccut", "-q"]).status).toBe(0);
    const read = (dir: string) => JSON.parse(fs.readFileSync(path.join(work, dir, "summary.json"), "utf8"));
    const [full, cut] = [read("cfull"), read("ccut")];
    expect(cut.resumed_from_step).toBeGreaterThan(0);
    expect(cut.lyapunov).toEqual(full.lyapunov);
    expect(cut.depletion).toEqual(full.depletion);
    expect(fs.readFileSync(path.join(work, "ccut/timeseries.csv"), "utf8")).toBe(fs.readFileSync(path.join(work, "cfull/timeseries.csv"), "utf8"));
    const last = (dir: string) => readSnapshot(path.join(work, dir, "snapshots/snap_00001.h5")).psi;
    expect(Buffer.from(last("ccut").buffer).equals(Buffer.from(last("cfull").buffer))).toBe(true);
  });
});
