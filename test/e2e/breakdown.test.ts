// The [breakdown] companion from the command line: the run header announces its cost, the time series
// and summary.json carry the Lyapunov rate, and bad values are one-line errors naming the key (exit 2,
// nothing written).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";
import { PLANE_WAVE_2D } from "../helpers/configs.js";

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
    expect(r.stderr).toMatch(/breakdown +Lyapunov rate \(renormalised every 10(\.0*)? Myr\) by tangent-linear fields: 1 extra field, \+0\.041 MB, about 2 times the work per step; seed 5/);
    // the measured clock is printed after the run: projected, or never with the growth it saw
    expect(r.stdout).toMatch(/^measured classical breakdown \(Lyapunov rate of the tangent-linear companion\):\n  scrambling \(∫λ dt = ln N\)  (never: .*|projected at .*)$/m);
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
      ["seed = 1.5\n", /^psibox: breakdown\.seed: must be a whole number/],
      ['interval = "3 km"\n', /^psibox: breakdown\.interval: "3 km" is not a time/],
      ['interval = "-1 Myr"\n', /^psibox: breakdown\.interval: must be a positive time/],
      ['interval = "1 Gyr"\n', /^psibox: breakdown\.interval: must be at most the run's span/],
      ['seed = "seven"\n', /^psibox: .*breakdown\.seed/],
      ["probes = -3\n", /^psibox: breakdown\.probes: must be a whole number ≥ 0/],
      ["probes = 1e9\n", /^psibox: breakdown\.probes: 1000000000 probes need .* GB .*; at most \d+ fit$/],
      ["fraction = 3\n", /^psibox: breakdown\.fraction: unknown key/],
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
