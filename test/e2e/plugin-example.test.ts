// The README's plug-in example (scripts/plugin-participation-ratio.mjs), run as a researcher runs it: it adds
// its own column to the time series and its own key to summary.json, through the public API.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot } from "../../src/io/snapshot.js";
import { makeWork, node, readCsv, readJson, removeWork, writeIn } from "../helpers/cli.js";

const SCRIPT = path.resolve("scripts/plugin-participation-ratio.mjs");
const EPS = 0.2;
const CONFIG = `
[grid]
cells = 256
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "40 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = ${EPS}
mode = [1]
[output]
time_unit = "Myr"
`;

let work: string;
beforeAll(async () => {
  await loadHdf5();
  work = makeWork("plugin");
});
afterAll(() => removeWork(work));

describe("a user plug-in through runSimulation (the README's example)", () => {
  it("the README shows the example script exactly", () => {
    expect(fs.readFileSync("README.md", "utf8")).toContain(fs.readFileSync(SCRIPT, "utf8"));
  });

  it("adds its column and summary key; the values match the definition computed independently from the snapshots", () => {
    writeIn(work, "wave.toml", CONFIG);
    const r = node(work, [SCRIPT, "wave.toml", "out"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^completed after \d+ steps; participation ratio/);
    const rows = readCsv(path.join(work, "out/timeseries.csv"));
    expect(Object.keys(rows[0]!).at(-1)).toBe("participation_ratio");
    // ρ = ρ̄(1 + ε cos kx): mean of ρ² is ρ̄²(1 + ε²/2) on the grid (exact for a single mode), so PR = 1/(1 + ε²/2)
    expect(Number(rows[0]!["participation_ratio"])).toBeCloseTo(1 / (1 + (EPS * EPS) / 2), 10);
    // the last row against (Σρ)²/(N Σρ²) of the final snapshot, computed here (computed independently)
    const last = readSnapshot(path.join(work, "out/snapshots/snap_00001.h5")).psi;
    let s1 = 0;
    let s2 = 0;
    for (let i = 0; i < last.length; i += 2) {
      const rho = last[i]! ** 2 + last[i + 1]! ** 2;
      s1 += rho;
      s2 += rho * rho;
    }
    const final = (s1 * s1) / ((last.length / 2) * s2);
    expect(Number(rows.at(-1)!["participation_ratio"])).toBeCloseTo(final, 9);
    expect(final).toBeLessThan(1 / (1 + (EPS * EPS) / 2)); // the overdensity has grown
    const summary = readJson(path.join(work, "out/summary.json"));
    expect(summary["participation_ratio_final"]).toBeCloseTo(final, 9);
    expect(summary["clocks"]).toHaveLength(5); // the config's own plug-in (the sidecar) ran too
  });
});
