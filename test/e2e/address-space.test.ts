// psibox under an address-space limit (ulimit -v, as on many cluster login nodes), in a real child
// shell: V8 reserves gigabytes of address space per WebAssembly memory unless its trap handler is off,
// which made every run fail under a limit of 8 GB; the CLI now runs itself with
// --disable-wasm-trap-handler when a limit is set, with HDF5's heap capped. Here a 4 GB limit (two step threads: each worker
// isolate reserves its own code range), a 2.5 GB limit with a checkpoint and its resume, and a grid refused by its estimate.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-ulimit-"));
  fs.writeFileSync(
    path.join(work, "u.toml"),
    `[grid]\ncells = [64, 64]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "20 Myr"\n[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.2\nmode = [1, 1]\n`,
  );
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

describe("address-space limit", () => {
  it("runs on two step threads, writes its snapshots and reads them back under ulimit -v 4 GB", () => {
    const r = spawnSync("bash", ["-c", `ulimit -v 4000000 && exec "${process.execPath}" "${BIN}" run u.toml -q --threads 2`], { cwd: work, encoding: "utf8" });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toBe("");
    expect(JSON.parse(fs.readFileSync(path.join(work, "output/u/summary.json"), "utf8")).status).toBe("completed");
    const inspect = spawnSync("bash", ["-c", `ulimit -v 4000000 && exec "${process.execPath}" "${BIN}" inspect output/u/snapshots/snap_00001.h5 --json`], { cwd: work, encoding: "utf8" });
    expect(inspect.status, inspect.stderr).toBe(0);
    expect(JSON.parse(inspect.stdout).cells).toEqual([64, 64]);
  });

  // HDF5's heap (a WebAssembly memory that may grow to 2 GiB) used to reserve all of it: a tiny run then
  // needed about 3 GB of address space; with the heap capped at 512 MiB (psibox reads and writes in slabs) about 1.6 GB
  it("runs under ulimit -v 2.5 GB, writing and resuming a checkpoint, within its own address-space estimate", () => {
    const limit = 2_500_000; // KiB
    const shell = (args: string) => spawnSync("bash", ["-c", `ulimit -v ${limit} && exec "${process.execPath}" "${BIN}" ${args}`], { cwd: work, encoding: "utf8" });
    const r = shell("run u.toml -q --threads 1 --set output.dir=small --set output.checkpoint_every=3");
    expect(r.status, r.stderr).toBe(0);
    const extended = shell('extend small --to "30 Myr" -q');
    expect(extended.status, extended.stderr).toBe(0);
    const summary = JSON.parse(fs.readFileSync(path.join(work, "small/summary.json"), "utf8"));
    expect(summary.status).toBe("completed");
    expect(summary.memory.address_space_estimate_bytes).toBeLessThan(limit * 1024);
  });

  it("refuses, before allocating, a grid whose address space exceeds the limit: one line with the need, the limit and a grid that fits", () => {
    const r = spawnSync("bash", ["-c", `ulimit -v 2500000 && exec "${process.execPath}" "${BIN}" run u.toml -q --threads 2 --set output.dir=big --set "grid.cells=[256, 256, 256]" --set "initial.mode=[1, 1, 0]"`], {
      cwd: work,
      encoding: "utf8",
    });
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr.trim()).toMatch(/^psibox: grid\.cells: a 256³ run needs about 1\.\d GiB \(fields 769 MiB, .*\); it reserves about 3\.\d GiB of address space, more than the limit of 2\.4 GiB \(ulimit -v\): 128³ cells fit \(about \d+ MiB\)$/);
    expect(fs.existsSync(path.join(work, "big", "checkpoint.h5"))).toBe(false);
  });
});
