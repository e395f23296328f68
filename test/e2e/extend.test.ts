// Extending a completed run to a later end, and re-running a run folder's config.toml from elsewhere.
// The reference for the extension is the run that had the later end from the start (bit for bit).
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot } from "../../src/io/snapshot.js";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;

// a nonlinear self-gravitating collapse: round-off differences would grow and show
const STATIC = `
[grid]
cells = 64
box = "100 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "120 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e6 Msun/kpc^3"
contrast = 0.3
mode = [1]
[output]
time_unit = "Myr"
snapshot_interval = "30 Myr"
checkpoint_every = 7
`;

const EXPANDING = `
[grid]
cells = 32
box = "1 Mpc/h"
[particle]
mass = "1e-23 eV"
[background]
kind = "lcdm"
[span]
start_redshift = 50
end_redshift = 20
[initial]
kind = "plane-wave"
contrast = 0.05
[output]
snapshot_redshifts = [30, 25]
checkpoint_every = 10
`;

beforeAll(async () => {
  await loadHdf5();
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-extend-"));
  fs.writeFileSync(path.join(work, "s.toml"), STATIC);
  fs.writeFileSync(path.join(work, "e.toml"), EXPANDING);
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

function psibox(args: string[], cwd = work) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Every snapshot's ψ, the time series and the summary's steps and end of a run folder. */
function runRecord(dir: string) {
  const snaps = fs.readdirSync(path.join(dir, "snapshots")).sort();
  const summary = JSON.parse(fs.readFileSync(path.join(dir, "summary.json"), "utf8"));
  return {
    snapshots: snaps,
    psi: snaps.map((s) => Buffer.from(readSnapshot(path.join(dir, "snapshots", s)).psi.buffer).toString("base64")),
    timeseries: fs.readFileSync(path.join(dir, "timeseries.csv"), "utf8"),
    steps: summary.steps,
    end: summary.end,
    status: summary.status,
  };
}

describe("psibox extend", () => {
  it("a static run extended from 120 to 200 Myr equals the 200 Myr run bit for bit (snapshots, time series)", () => {
    expect(psibox(["run", "s.toml", "-q", "--set", "output.dir=short"]).code).toBe(0);
    const r = psibox(["extend", "short", "--to", "200 Myr", "-q"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    expect(psibox(["run", "s.toml", "-q", "--set", "output.dir=long", "--set", 'span.duration="200 Myr"']).code).toBe(0);
    const extended = runRecord(path.join(work, "short"));
    const long = runRecord(path.join(work, "long"));
    expect(extended.status).toBe("completed");
    expect(extended.snapshots.length).toBe(8); // 0, 30, …, 180 Myr and the end
    expect(extended).toEqual(long);
    expect(fs.readFileSync(path.join(work, "short", "config.toml"), "utf8")).toMatch(/duration = "200 Myr"/);
  });

  it("an expanding run extended from z = 20 to z = 10 equals the run to z = 10 bit for bit", () => {
    expect(psibox(["run", "e.toml", "-q", "--set", "output.dir=e-short"]).code).toBe(0);
    expect(psibox(["extend", "e-short", "--to", "10", "-q"]).code).toBe(0);
    expect(psibox(["run", "e.toml", "-q", "--set", "output.dir=e-long", "--set", "span.end_redshift=10"]).code).toBe(0);
    const extended = runRecord(path.join(work, "e-short"));
    expect(extended.end.z).toBeCloseTo(10, 9);
    expect(extended).toEqual(runRecord(path.join(work, "e-long")));
  });

  it("where checkpoints fall does not change a run: checkpoint_every = 1 gives the same fields bit for bit", () => {
    expect(psibox(["run", "s.toml", "-q", "--set", "output.dir=every", "--set", "output.checkpoint_every=1"]).code).toBe(0);
    const every = runRecord(path.join(work, "every")).psi;
    expect(every.length).toBe(5); // 0, 30, …, 120 Myr: the long run lands on the same times the same way
    expect(every).toEqual(runRecord(path.join(work, "long")).psi.slice(0, 5));
  });

  it("rejects an end that is not later, a wrong kind of end and a folder that is not a completed run, with one line and exit code 2", () => {
    const cases: [string[], RegExp][] = [
      [["extend", "long", "--to", "150 Myr"], /--to: 150 Myr is not later than the run's end/],
      [["extend", "long", "--to", "5"], /--to: "5" is not a duration of the whole run/],
      [["extend", "e-long", "--to", "1 Gyr"], /--to: an expanding run ends at a redshift: give a number/],
      [["extend", "nowhere", "--to", "1 Gyr"], /nowhere: not a psibox run folder \(no config\.toml\)/],
    ];
    for (const [args, message] of cases) {
      const r = psibox(args);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    }
  });
});

describe("psibox extend leaves a folder it cannot extend as it was", () => {
  const files = (dir: string) => ["config.toml", "summary.json", "checkpoint.h5"].map((f) => fs.readFileSync(path.join(work, dir, f)).toString("base64"));

  it("takes the folder's lock first: a folder another live run holds is refused and nothing changes", () => {
    const before = files("short");
    const lock = path.join(work, "short", ".psibox-lock");
    fs.writeFileSync(lock, JSON.stringify({ pid: process.pid, host: os.hostname(), started: null, since: "2026-01-01T00:00:00Z" }));
    try {
      const r = psibox(["extend", "short", "--to", "400 Myr"]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(/short is in use by psibox process \d+/);
    } finally {
      fs.rmSync(lock, { force: true });
    }
    expect(files("short")).toEqual(before);
  });

  it("verifies the checkpoint against the later end before rewriting config.toml: another run's checkpoint is refused and nothing changes", () => {
    fs.cpSync(path.join(work, "long"), path.join(work, "foreign"), { recursive: true });
    fs.copyFileSync(path.join(work, "e-long", "checkpoint.h5"), path.join(work, "foreign", "checkpoint.h5"));
    const before = files("foreign");
    const r = psibox(["extend", "foreign", "--to", "400 Myr"]);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toMatch(/checkpoint\.h5: config_sha256 does not match/);
    expect(files("foreign")).toEqual(before);
    expect(fs.existsSync(path.join(work, "foreign", ".psibox-lock"))).toBe(false);
  });
});

describe("a run folder's config.toml", () => {
  it("records the output folder, so running it again from another folder writes to the same place", () => {
    fs.mkdirSync(path.join(work, "a"));
    fs.mkdirSync(path.join(work, "b"));
    fs.copyFileSync(path.join(work, "s.toml"), path.join(work, "a", "x.toml"));
    expect(psibox(["run", "x.toml", "-q", "--set", 'output.dir="../rs/x"', "--set", 'span.duration="20 Myr"'], path.join(work, "a")).code).toBe(0);
    const config = fs.readFileSync(path.join(work, "rs", "x", "config.toml"), "utf8");
    expect(config).toContain(`dir = "${fs.realpathSync(path.join(work, "rs", "x"))}"`);
    fs.rmSync(path.join(work, "rs", "x", "summary.json"));
    const again = psibox(["run", "../rs/x/config.toml", "-q", "--force"], path.join(work, "b"));
    expect(again.code, again.stderr).toBe(0);
    expect(fs.existsSync(path.join(work, "b", "rs"))).toBe(false);
    expect(fs.existsSync(path.join(work, "b", "output"))).toBe(false);
    expect(fs.existsSync(path.join(work, "rs", "x", "summary.json"))).toBe(true);
  });
});
