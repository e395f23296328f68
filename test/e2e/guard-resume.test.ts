// Guard rails a conserved mass cannot fool, and resume checks, through the CLI:
// an overflowing potential stops the run with exit 3 and a kept state whether the sidecar is on or
// off; a fixed step far beyond the phase rules is refused (or run with a warning when insisted on);
// a checkpoint that does not belong to its folder, or holds NaN, a negative step count, a time
// outside the span or a garbage sidecar state, is a one-line error naming the file and field,
// with nothing written.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot, writeSnapshot, type CheckpointState } from "../../src/io/snapshot.js";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;
const CONFIG = `[grid]
cells = 64
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "100 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.2
[integrator]
max_steps = 30
`;
beforeAll(async () => {
  await loadHdf5();
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-guard-"));
  fs.writeFileSync(path.join(work, "g.toml"), CONFIG);
  // a run stopped by its step cap: a checkpoint to resume from
  expect(psibox(["run", "g.toml", "-q", "--set", "output.dir=base"]).code).toBe(3);
  expect(psibox(["run", "g.toml", "-q", "--set", "output.dir=other", "--set", "grid.cells=128"]).code).toBe(3);
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
const json = (p: string) => JSON.parse(fs.readFileSync(path.join(work, p), "utf8"));

describe("guard rails", () => {
  it.each([true, false])("stops an overflowing potential with exit 3 and a kept state (sidecar %s)", (sidecar) => {
    const dir = `overflow-${sidecar}`;
    const r = psibox(["run", "g.toml", "-q", "--set", `output.dir=${dir}`, "--set", 'initial.mean_density="1e200 Msun/kpc^3"', "--set", `sidecar.enabled=${sidecar}`]);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^psibox: run stopped: at the start \(step 0, t = 0\.00000 Myr\): the potential energy is not a finite number \(W = NaN Msun \(km\/s\)\^2\); likely cause: densities beyond double precision \(largest density 1\.20e\+200 Msun\/kpc\^3\).*\n$/);
    const summary = json(`${dir}/summary.json`);
    expect(summary.status).toBe("stopped");
    expect(summary.reason).toMatch(/potential energy is not a finite number/);
    expect(fs.readFileSync(path.join(work, dir, "run.log"), "utf8")).toMatch(/stopped: at the start/);
    const kept = readSnapshot(path.join(work, dir, "checkpoint.h5"), true);
    expect(kept.state!.psiCode.every(Number.isFinite)).toBe(true);
  });

  it("refuses a fixed step far beyond the phase rules with the numbers, and runs it with a warning when insisted on", () => {
    const r = psibox(["run", "g.toml", "-q", "--set", "output.dir=coarse", "--set", 'integrator.fixed_step="50 Myr"']);
    expect(r.code).toBe(2);
    // the kinetic phase per step at the corner mode, ħk²Δt/2m with k = π/Δx = 10.053/kpc (Δx = 20 kpc/64) and
    // ħ/m = 19.1715 kpc km/s (CODATA, m = 1e-22 eV): computed independently, 49.5 rad for Δt = 50 Myr
    // (1 Myr = 3.15576e13 s, 1 kpc = 3.08568e16 km), against the limit 2π·0.25 = 1.57 rad
    expect(r.stderr).toMatch(/^psibox: integrator\.fixed_step: 50\.0000 Myr is 31\.\d times the step the phase rules allow at the start \(.* Myr, \w+ limit with integrator\.safety = 0\.25\): 49\.5 rad per step at the grid's corner mode \(limit 1\.57\).*; lower it, or set integrator\.allow_large_fixed_step = true to run it anyway\n$/);
    const ok = psibox(["run", "g.toml", "-q", "--set", "output.dir=coarse", "--force", "--set", 'integrator.fixed_step="50 Myr"', "--set", "integrator.allow_large_fixed_step=true"]);
    expect(ok.code, ok.stderr).toBe(0);
    expect(json("coarse/summary.json").warnings[0]).toMatch(/^integrator\.fixed_step = 50\.0000 Myr is 31\.\d times/);
  });
});

describe("resume checks what it loads", () => {
  function tampered(name: string, change: (state: CheckpointState) => Partial<CheckpointState>, from = "base"): string {
    fs.cpSync(path.join(work, "base"), path.join(work, name), { recursive: true });
    fs.rmSync(path.join(work, name, "summary.json"));
    const src = readSnapshot(path.join(work, from, "checkpoint.h5"), true);
    writeSnapshot(path.join(work, name, "checkpoint.h5"), { meta: src.meta, psi: src.psi, state: { ...src.state!, ...change(src.state!) } });
    return name;
  }
  const cases: [string, (s: CheckpointState) => Partial<CheckpointState>, RegExp, string?][] = [
    ["NaN in the state", (s) => ({ psiCode: Object.assign(Float64Array.from(s.psiCode), { 7: NaN }) }), /checkpoint\.h5: state\/psi_code holds a non-finite value \(NaN at index 7\); the checkpoint cannot be resumed$/],
    ["a negative step count", () => ({ steps: -3 }), /checkpoint\.h5: state steps must be a whole number ≥ 0, got -3$/],
    ["a time past the end", (s) => ({ timeCode: s.timeCode * 1e6 }), /checkpoint\.h5: state time_code is t = .* Myr, outside the run's span 0\.00000 Myr to 100\.000 Myr$/],
    ["a truncated state", (s) => ({ phiCode: s.phiCode.subarray(0, 32) }), /checkpoint\.h5: state\/phi_code holds 32 values, the 64 grid needs 64$/],
    ["a garbage sidecar state", () => ({ plugins: { sidecar: JSON.stringify({ version: 1, state: { rates: 1 } }) } }), /checkpoint\.h5: state\/plugins\/sidecar is not a sidecar state psibox wrote \(rates and clocks with finite values\); the checkpoint cannot be resumed$/],
    ["an unreadable sidecar state", () => ({ plugins: { sidecar: "{not json" } }), /checkpoint\.h5: state\/plugins\/sidecar is not readable JSON; the checkpoint cannot be resumed$/],
    ["another run's checkpoint", () => ({}), /checkpoint\.h5: config_sha256 does not match the folder's config\.toml \(beyond its \[span\]\): the checkpoint belongs to another run/, "other"],
  ];
  for (const [what, change, message, from] of cases) {
    it(`refuses ${what} with one line naming the file and field, writing nothing`, () => {
      const dir = tampered(what.replace(/\W+/g, "-"), change, from);
      const log = fs.readFileSync(path.join(work, dir, "run.log"), "utf8");
      const r = psibox(["run", "--resume", dir, "-q"]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/^psibox: [^\n]*\n$/);
      expect(r.stderr.trim()).toMatch(message);
      expect(fs.readFileSync(path.join(work, dir, "run.log"), "utf8")).toBe(log);
      expect(fs.existsSync(path.join(work, dir, "summary.json"))).toBe(false);
    });
  }
});
