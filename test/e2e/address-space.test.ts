// psibox under an address-space limit (ulimit -v, as on many cluster login nodes), in a real child
// shell: V8 reserves gigabytes of address space per WebAssembly memory unless its trap handler is off,
// which made every run fail under a limit of 8 GB; the CLI now runs itself with
// --disable-wasm-trap-handler when a limit is set. Here a 4 GB limit (two step threads: each worker isolate reserves its own code range), and HDF5 output.
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
});
