// The [breakdown] companion from the command line: the run header announces its cost, the time series
// and summary.json carry the Lyapunov rate, and bad values are one-line errors naming the key (exit 2,
// nothing written).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";

const BASE = `[grid]
cells = [32, 32]
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "100 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.3
mode = [1, 1]
[output]
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
    expect(r.stderr).toMatch(/breakdown +Lyapunov rate by a tangent-linear companion: 1 extra field, \+0\.041 MB, about twice the work per step; renormalised every 10(\.0*)? Myr, seed 5/);
    const rows = readCsv(path.join(work, "output/on/timeseries.csv"));
    expect(Object.keys(rows[0]!).slice(-3)).toEqual(["lyapunov_rate_per_s", "lyapunov_interval_rate_per_s", "lyapunov_integral"]);
    const summary = readJson<{ lyapunov: { intervals: number; seed: number; interval_s: number } }>(path.join(work, "output/on/summary.json"));
    expect(summary.lyapunov.intervals).toBe(10);
    expect(summary.lyapunov.seed).toBe(5);
    expect(summary.lyapunov.interval_s / 3.15576e13).toBeCloseTo(10, 9);
  });

  it("refuses bad values with one line naming the key, exit code 2, and writes nothing", () => {
    const cases: [string, RegExp][] = [
      ["seed = -1\n", /^psibox: breakdown\.seed: must be a whole number from 0 to 4294967295, got -1$/],
      ["seed = 1.5\n", /^psibox: breakdown\.seed: must be a whole number/],
      ['interval = "3 km"\n', /^psibox: breakdown\.interval: "3 km" is not a time/],
      ['interval = "-1 Myr"\n', /^psibox: breakdown\.interval: must be a positive time/],
      ['interval = "1 Gyr"\n', /^psibox: breakdown\.interval: must be at most the run's span/],
      ['seed = "seven"\n', /^psibox: .*breakdown\.seed/],
      ["probes = 3\n", /^psibox: .*breakdown.*probes/],
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
});
