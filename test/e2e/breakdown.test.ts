// The [breakdown] companion from the command line: the run header announces its cost, the time series
// and summary.json carry the Lyapunov rate, and bad values are one-line errors naming the key (exit 2,
// nothing written); more bad values, and probes beyond the memory, checked where the config is resolved.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";
import { PLANE_WAVE_2D } from "../helpers/configs.js";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { ConfigError } from "../../src/core/errors.js";
import { breakdownFields, checkBreakdownMemory } from "../../src/app/breakdown-memory.js";
import { estimateMemory } from "../../src/simulation/memory-estimate.js";

const BASE = `${PLANE_WAVE_2D}[output]
time_unit = "Myr"
[sidecar]
enabled = false
[breakdown]
`;

let work: string;
beforeAll(() => (work = makeWork("breakdown")));
afterAll(() => removeWork(work));

describe("[breakdown] from the CLI", () => {
  it("announces the companion's cost and writes the Lyapunov columns and summary", () => {
    writeIn(work, "on.toml", `${BASE}tangent = true\ninterval = "10 Myr"\nseed = 5\n`);
    const r = runPsibox(work, ["run", "on.toml"]);
    expect(r.code, r.stderr).toBe(0);
    // 32² cells × 40 bytes
    // the memory is the run's estimate with the field and without: 32² cells × 56 bytes (the field, its undo
    // copy, dφ's real grid, the checkpoint's copy)
    expect(r.stderr).toMatch(/breakdown +Lyapunov rate \(renormalised every 10(\.0*)? Myr\) by 1 tangent-linear field: 1 extra field, \+0\.057\d* MB, about 2 times the work per step; seed 5/);
    // the measured clocks are printed after the run: projected, or never with the growth they saw
    expect(r.stdout).toMatch(/^measured classical breakdown \(tangent-linear companion\):\n  depletion, from the rate \(∫λ dt = ½ ln N\)  (never: .*|projected at .*)\n  scrambling \(∫λ dt = ln N\) +(never: .*|projected at .*)$/m);
    const rows = readCsv(path.join(work, "output/on/timeseries.csv"));
    expect(Object.keys(rows[0]!).slice(-3)).toEqual(["lyapunov_rate_per_s", "lyapunov_interval_rate_per_s", "lyapunov_integral"]);
    const summary = readJson<{ lyapunov: { intervals: number; seed: number; interval_s: number } }>(path.join(work, "output/on/summary.json"));
    expect(summary.lyapunov.intervals).toBe(6);
    expect(summary.lyapunov.seed).toBe(5);
    expect(summary.lyapunov.interval_s / 3.15576e13).toBeCloseTo(10, 9);
  });

  it("refuses bad values with one line naming the key, exit code 2, and writes nothing", () => {
    const cases: [string, RegExp][] = [
      ["seed = -1\n", /^psibox: breakdown\.seed: must be a whole number from 0 to 4294967295, got -1$/],
      ['interval = "1 Gyr"\n', /^psibox: breakdown\.interval: must be at most the run's span/],
      ['seed = "seven"\n', /^psibox: .*breakdown\.seed/],
      ["probes = -3\n", /^psibox: breakdown\.probes: must be a whole number ≥ 1 to measure the depletion \(0, the default: none\), got -3$/],
      ["probes = 1e9\n", /^psibox: breakdown\.probes: at most 31 probes \(62 tangent fields\) in one run, got 1000000000$/],
      ["fraction = 3\n", /^psibox: breakdown\.fraction: unknown key/],
      ["depletion_fraction = 0\n", /^psibox: breakdown\.depletion_fraction: must be a fraction of N in \(0, 1\], got 0$/],
      ['region = "sphere"\nregion_radius = "1 kpc"\nregion_center = ["25 kpc", "1 kpc"]\n', /^psibox: breakdown\.region_center: lies outside the box on axis 1 \(0 … 20\.00 kpc\)$/],
      ["twin_offset = 0.5\n", /^psibox: breakdown\.twin_offset: must be 0 \(no twin\) or from 1e-12 to 1e-3, got 0\.5$/],
    ];
    cases.forEach(([extra, msg], i) => {
      writeIn(work, `bad${i}.toml`, `${BASE}tangent = true\n${extra}`);
      const r = runPsibox(work, ["run", `bad${i}.toml`, "-q"]);
      expect(r.code, extra).toBe(2);
      expect(r.stderr.trim(), extra).toMatch(msg);
      expect(r.stderr.trim().split("\n"), extra).toHaveLength(1);
      expect(fs.existsSync(path.join(work, `output/bad${i}`)), extra).toBe(false);
    });
  });

  it("refuses more region, fraction and twin values when the config is resolved (the same one-line ConfigError, exit code 2)", () => {
    const cases: [string, RegExp][] = [
      ["tangent = true\nseed = 1.5\n", /^breakdown\.seed: must be a whole number/],
      ['tangent = true\ninterval = "3 km"\n', /^breakdown\.interval: "3 km" is not a time/],
      ['tangent = true\ninterval = "-1 Myr"\n', /^breakdown\.interval: must be a positive time/],
      ["tangent = true\ndepletion_fraction = 1.5\n", /^breakdown\.depletion_fraction: must be a fraction of N in \(0, 1\], got 1\.5$/],
      ['tangent = true\nregion = "ellipse"\n', /^breakdown\.region: must be box, sphere, cube or densest, got "ellipse"$/],
      ['tangent = true\nregion = "sphere"\nregion_center = ["1 kpc", "1 kpc"]\n', /^breakdown\.region_radius: needed with breakdown\.region sphere$/],
      ['tangent = true\nregion = "cube"\nregion_radius = "1 kpc"\nregion_center = ["5 kpc"]\n', /^breakdown\.region_center: give 2 lengths \(one per axis\), got 1$/],
      ['tangent = true\nregion = "densest"\nregion_radius = "15 kpc"\n', /^breakdown\.region_radius: must be at most half the box's smallest side \(10\.00 kpc\); for the whole box use breakdown\.region box$/],
      ['region = "densest"\nregion_radius = "1 kpc"\n', /^breakdown\.region: restricts the Lyapunov rate: set breakdown\.tangent = true with it$/],
      ["twin_offset = 1e-6\n", /^breakdown\.twin_offset: the twin run cross-checks the Lyapunov rate: set breakdown\.tangent = true with it$/],
    ];
    cases.forEach(([extra, msg], i) => {
      const file = writeIn(work, `lib${i}.toml`, `${BASE}${extra}`);
      let error: unknown;
      try {
        resolveRun(loadConfig(file), `lib${i}`, work);
      } catch (e) {
        error = e;
      }
      expect(error, extra).toBeInstanceOf(ConfigError);
      expect((error as ConfigError).exitCode).toBe(2);
      expect((error as Error).message, extra).toMatch(msg);
    });
  });

  it("refuses probes that would not fit the memory, naming the key and how many fit (the run's own estimate first)", () => {
    const file = writeIn(work, "mem.toml", `${BASE}tangent = true\nprobes = 20\n`);
    const run = resolveRun(loadConfig(file), "mem", work);
    const base = { cells: run.grid.cells, gravity: run.grid.gravity, threads: run.integrator.threads, fft: run.integrator.fft };
    const plain = estimateMemory(base).total;
    // a machine with room for the run and 10 fields beside it: 1 tangent + 2 × 4 probes fit, 5 probes do not
    const limits = { memory: estimateMemory({ ...base, fields: breakdownFields({ ...run.breakdown, probes: 4 }) }).total + 1 };
    expect(limits.memory).toBeGreaterThan(plain);
    expect(() => checkBreakdownMemory(run, limits)).toThrow(/^breakdown\.probes: 20 probes need about \d+ MiB with the run, more than this machine's \d+ MiB; at most 4 fit$/);
    expect(() => checkBreakdownMemory({ ...run, breakdown: { ...run.breakdown, probes: 4 } }, limits)).not.toThrow();
  });
});
