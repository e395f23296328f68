// psibox ensemble from the command line: a small ensemble's outputs and headline, continuing a finished one,
// and bad input (M < 2, N < 1, a seed that is not a whole number, an ensemble too large for the machine) as
// one-line errors naming the key, exit code 2 (N < 1 and the seed are checked in test/numerics/ensemble.test.ts).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";
import { OCCUPATION_COLUMNS, SERIES_COLUMNS } from "../../src/ensemble/outputs.js";
import { COMPARISON_COLUMNS } from "../../src/ensemble/comparison-output.js";

let work: string;
beforeAll(() => (work = makeWork("ensemble-cli")));
afterAll(() => removeWork(work));

const config = (cells: string, ensemble: string) =>
  `[grid]\ncells = ${cells}\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "100 Myr"\n` +
  `[initial]\nkind = "plane-wave"\nmean_density = "1e6 Msun/kpc^3"\ncontrast = 0.1\n[output]\ntime_unit = "Myr"\n[ensemble]\n${ensemble}\n`;

describe("psibox ensemble", () => {
  it("writes series.csv, fields.h5 and summary.json, warns when N is not well above the modes, and continues a finished ensemble", () => {
    writeIn(work, "small.toml", config("16", "members = 4\nparticles = 100\nsamples = 2"));
    const r = runPsibox(work, ["ensemble", "small.toml", "--workers", "2"]);
    expect(r.stderr).toMatch(/warning: N = 100 particles is not well above the grid's 16 modes/);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^completed 4 members \(N = 100\); outputs in output\/small\/ensemble\n/);
    // the progress reaches 100% when the last member is saved, not while it is still running
    expect(r.stderr).toMatch(/\n {2}100% 4 of 4 members\n/);
    const dir = path.join(work, "output", "small", "ensemble");
    const rows = readCsv(path.join(dir, "series.csv"));
    expect(Object.keys(rows[0]!)).toEqual([...SERIES_COLUMNS]);
    rows.forEach((row, i) => expect(Number(row["time"])).toBeCloseTo(50 * i, 9));
    expect(Math.abs(Number(rows[0]!["particles_N"]) - 100)).toBeLessThan(5 * Number(rows[0]!["particles_N_err"]));
    expect(fs.readdirSync(path.join(dir, "members"))).toHaveLength(4);
    // the comparison with the classical companion's predictions, and the occupation of each ±k pair (k = 0 … 8 per time)
    expect(r.stdout).toMatch(/\n  depletion reaches 10% of N: ensemble .*, tangent-linear .*\n  mean field \|⟨b⟩\|²\/N falls to 1\/e: ensemble .*, Kerr mode .*, adiabatic Kerr mode .*\n$/);
    const comparison = readCsv(path.join(dir, "comparison.csv"));
    expect(Object.keys(comparison[0]!)).toEqual([...COMPARISON_COLUMNS]);
    expect(Number(comparison[2]!["depletion_tangent"])).toBeGreaterThan(0);
    expect(fs.existsSync(path.join(dir, "companion", "timeseries.csv"))).toBe(true);
    const occupations = readCsv(path.join(dir, "occupations.csv"));
    expect(Object.keys(occupations[0]!)).toEqual([...OCCUPATION_COLUMNS]);
    expect(occupations).toHaveLength(3 * 9);
    expect(readJson(path.join(dir, "summary.json"))["members_reduced"]).toBe(4);
    const again = runPsibox(work, ["ensemble", "small.toml", "--quiet"]);
    expect(again.code).toBe(0);
    expect(again.stdout).toMatch(/^completed 4 members/);
    // other settings in the same folder are refused without --force
    const other = runPsibox(work, ["ensemble", "small.toml", "--set", "ensemble.noise_seed=9"]);
    expect(other.code).toBe(2);
    expect(other.stderr).toMatch(/holds an ensemble with another seed; pass --force/);
    // psibox report on the ensemble folder: the headline sentences, the figure and the series table
    const report = runPsibox(work, ["report", "output/small/ensemble"]);
    expect(report.code).toBe(0);
    // nothing but the line naming the file: no warning of the figures' libraries on the terminal
    expect(report.stderr).toBe("");
    const html = fs.readFileSync(path.join(dir, "report.html"), "utf8");
    expect(html).toMatch(/4 of 4 members reduced \(completed\); N = 100 particles over 16 grid modes/);
    expect(html).toMatch(/<img alt="The condensate fraction/);
    expect((html.match(/<tr>/g) ?? []).length).toBe(8); // header and three sample times, in the series and the comparison tables
    expect(html).toMatch(/<img alt="Top: the depletion N − N₀ of the ensemble and the tangent-linear/);
  });
  for (const [label, cells, ensemble, key] of [
    ["one member", "16", "members = 1", /ensemble\.members: must be a whole number from 2/],
    ["a particle number that is neither a number nor \"physical\"", "16", 'particles = "many"', /^psibox: ensemble\.particles: expected "physical" or a number ≥ 1, e\.g\. 1e6$/m],
    ["a 3D ensemble beyond the machine's memory", "[256, 256, 256]", "members = 100000", /ensemble\.members: 100000 members of 256×256×256 cells need about .* of memory/],
  ] as const) {
    it(`refuses ${label} with a one-line error and exit code 2`, () => {
      writeIn(work, "bad.toml", config(cells, ensemble));
      const r = runPsibox(work, ["ensemble", "bad.toml"]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(key);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    });
  }
});
