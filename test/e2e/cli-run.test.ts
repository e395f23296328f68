// The psibox CLI run end to end, as a user runs it: the built binary in a temporary folder.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { BIN, makeWork, readCsv, removeWork, runPsibox } from "../helpers/cli.js";
import { FREE_PACKET_1D } from "../helpers/configs.js";

let work: string;

const psibox = (args: string[]) => runPsibox(work, args);

function writeConfig(name: string, text: string): string {
  const file = path.join(work, name);
  fs.writeFileSync(file, text);
  return file;
}

const PACKET = FREE_PACKET_1D;

beforeAll(() => {
  expect(fs.existsSync(BIN)).toBe(true);
  work = makeWork("e2e");
});
afterAll(() => removeWork(work));

describe("psibox run", () => {
  it("runs a config and writes a time series in physical units", () => {
    writeConfig("packet.toml", PACKET);
    const r = psibox(["run", "packet.toml", "--quiet"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^completed \d+ steps in .* s; outputs in output\/packet\n/);
    const rows = readCsv(path.join(work, "output/packet/timeseries.csv"));
    expect(Object.keys(rows[0]!).slice(0, 9)).toEqual([
      "step", "t_Myr", "dt_Myr", "limiter", "mass_Msun", "kinetic_Msun_km2_s2", "potential_Msun_km2_s2", "total_Msun_km2_s2", "max_density_Msun_kpc3",
    ]);
    const last = rows.at(-1)!;
    expect(Number(last["t_Myr"])).toBeCloseTo(10, 9);
    expect(Number(last["mass_Msun"]) / 1e8).toBeCloseTo(1, 10);
    // Kinetic energy of a moving Gaussian packet (textbook): K = M (v²/2 + (ħ/m)²/(8σ²)),
    // with ħ/m = 19.1715 kpc km/s for 1e-22 eV (computed independently): 1e8 × (450 + 183.75) Msun (km/s)²
    const expected = 1e8 * (0.5 * 30 ** 2 + 19.1715 ** 2 / (8 * 0.5 ** 2));
    expect(Math.abs(Number(last["kinetic_Msun_km2_s2"]) / expected - 1)).toBeLessThan(1e-4);
    const summary = JSON.parse(fs.readFileSync(path.join(work, "output/packet/summary.json"), "utf8"));
    expect(summary.status).toBe("completed");
    expect(summary.end.t).toBeCloseTo(10, 9);
  });

  it("refuses to overwrite a run without --force, and overwrites with it", () => {
    const again = psibox(["run", "packet.toml", "--quiet"]);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/already holds a run; pass --force/);
    expect(psibox(["run", "packet.toml", "--quiet", "--force"]).code).toBe(0);
  });

  it("applies --set overrides", () => {
    const r = psibox(["run", "packet.toml", "--quiet", "--set", 'output.dir="other"', "--set", 'span.duration="2 Myr"']);
    expect(r.code).toBe(0);
    const rows = readCsv(path.join(work, "other/timeseries.csv"));
    expect(Number(rows.at(-1)!["t_Myr"])).toBeCloseTo(2, 9);
  });

  it("prints progress on stderr when not quiet", () => {
    const r = psibox(["run", "packet.toml", "--force"]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/├─ grid +1D, 256 cells, box 20 kpc, gravity none/);
    expect(r.stderr).toMatch(/100% step \d+, t = 10 Myr/);
  });

  const bad: [string, string, RegExp][] = [
    ["non-power-of-two grid", PACKET.replace("cells = 256", "cells = 250"), /^psibox: grid\.cells: 250 is not a power of two/],
    ["negative particle mass", PACKET.replace('"1e-22 eV"', '"-1e-22 eV"'), /^psibox: particle\.mass: must be positive/],
    ["zero box", PACKET.replace('"20 kpc"', '"0 kpc"'), /^psibox: grid\.box: must be positive/],
    ["unknown key", PACKET.replace("[span]", "[span]\nlength = 3"), /^psibox: span\.length: unknown key; valid keys here: duration, start_redshift, end_redshift/],
    ["missing unit", PACKET.replace('"10 Myr"', '"10"'), /^psibox: span\.duration: "10" is not a time/],
    [
      "impossible redshift range",
      PACKET.replace("[span]", '[background]\nkind = "lcdm"\n[span]').replace('duration = "10 Myr"', "start_redshift = 1\nend_redshift = 3").replace('gravity = "none"', 'gravity = "periodic"'),
      /^psibox: span\.start_redshift: must be larger than span\.end_redshift \(3\)/,
    ],
    ["TOML syntax", "[grid\ncells = 4", /^psibox: bad\.toml: not valid TOML at line 1/],
  ];
  for (const [what, text, message] of bad) {
    it(`rejects ${what} with a one-line error and exit code 2`, () => {
      writeConfig("bad.toml", text);
      const r = psibox(["run", "bad.toml"]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(r.stdout).toBe("");
      expect(fs.existsSync(path.join(work, "output/bad"))).toBe(false);
    });
  }

  it("usage errors (unknown command or option, a missing required option) are one psibox line, exit code 2", () => {
    const cases: [string[], RegExp][] = [
      [["frobnicate"], /^psibox: unknown command 'frobnicate' \(psibox --help lists the commands\)$/],
      [["analyze", "--bogus", "x"], /^psibox: unknown option '--bogus' \(psibox analyze --help lists the options\)$/],
      [["estimate"], /^psibox: required option '--particle-mass <mass>' not specified \(psibox estimate --help lists the options\)$/],
    ];
    for (const [args, message] of cases) {
      const r = psibox(args);
      expect(r.code).toBe(2);
      expect(r.stderr.trim()).toMatch(message);
    }
  });

  it("rejects a missing config file", () => {
    const r = psibox(["run", "nowhere.toml"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe("psibox: cannot read config file nowhere.toml: no such file\n");
  });

  it("stops with exit code 3 when the mass drifts beyond its tolerance, naming the step, time and likely cause", () => {
    // round-off alone moves the mass by ~1e-15 per step: a tolerance of 1e-18 must trip
    writeConfig(
      "drift.toml",
      `[grid]\ncells = 64\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "500 Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.5\n[integrator]\nmass_tolerance = 1e-18\n`,
    );
    const r = psibox(["run", "drift.toml", "--quiet"]);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^psibox: run stopped: step \d+ at t = [\d.e+-]+ Myr \(Δt = .*\): the mass changed by .*likely cause: a time step too large/);
    const summary = JSON.parse(fs.readFileSync(path.join(work, "output/drift/summary.json"), "utf8"));
    expect(summary.status).toBe("stopped");
    expect(summary.reason).toMatch(/the last good state is kept/);
  });
});

describe("psibox init", () => {
  it("lists the templates, writes one that runs, and refuses to overwrite it", () => {
    const list = psibox(["init", "--list"]);
    expect(list.code).toBe(0);
    for (const name of ["cosmological-box-3d", "soliton-merger-2d", "plane-wave-collapse-1d", "ground-state-3d", "jeans-collapse-2d"]) {
      expect(list.stdout).toMatch(new RegExp(`^${name} +\\S`, "m"));
    }
    const r = psibox(["init", "plane-wave-collapse-1d", "mine"]);
    expect(r.code).toBe(0);
    expect(fs.readFileSync(path.join(work, "mine/plane-wave-collapse-1d.toml"), "utf8")).toMatch(/^# Plane-wave \(pancake\) collapse/);
    expect(psibox(["init", "plane-wave-collapse-1d", "mine"]).code).toBe(2);
    const bad = psibox(["init", "nope"]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^psibox: unknown template "nope"; choose one of: cosmological-box-3d, /);
  });
});

describe("psibox inspect", () => {
  it("prints a snapshot's metadata and statistics, as a table or JSON", () => {
    writeConfig("insp.toml", PACKET.replace('duration = "10 Myr"', 'duration = "4 Myr"') + '\n[output]\nsnapshot_interval = "2 Myr"\n');
    expect(psibox(["run", "insp.toml", "-q"]).code).toBe(0);
    const snaps = fs.readdirSync(path.join(work, "output/insp/snapshots"));
    expect(snaps).toEqual(["snap_00000.h5", "snap_00001.h5", "snap_00002.h5"]);
    const table = psibox(["inspect", "output/insp/snapshots/snap_00002.h5"]);
    expect(table.code).toBe(0);
    expect(table.stdout).toMatch(/^time +4 Myr$/m);
    expect(table.stdout).toMatch(/^mass +1 × 10⁸ Msun$/m);
    const json = JSON.parse(psibox(["inspect", "output/insp/snapshots/snap_00001.h5", "--json"]).stdout);
    expect(json.time).toBeCloseTo(2, 12);
    expect(json.cells).toEqual([256]);
    expect(json.stats.massMsun / 1e8).toBeCloseTo(1, 10);
    // the kinetic energy read back from the file equals the run's own time-series value at that step
    const rows = readCsv(path.join(work, "output/insp/timeseries.csv"));
    const row = rows.find((r) => Number(r["step"]) === json.step)!;
    expect(json.stats.kineticMsunKm2S2 / Number(row["kinetic_Msun_km2_s2"])).toBeCloseTo(1, 9);
  });

  it("rejects a file that is not a snapshot", () => {
    fs.writeFileSync(path.join(work, "plain.h5"), "hello");
    const r = psibox(["inspect", "plain.h5"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe("psibox: plain.h5: not a readable HDF5 file (Not an HDF5 file)\n");
  });
});
