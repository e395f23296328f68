// The quantum sidecar from the CLI: in-line clocks, the same clocks from dense snapshots, and estimate.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, removeWork, runPsibox } from "../helpers/cli.js";

let work: string;
beforeAll(() => {
  work = makeWork("sidecar");
});
afterAll(() => removeWork(work));

const psibox = (args: string[]) => runPsibox(work, args);

function lastRow(file: string): Record<string, number> {
  const [header, ...rows] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  return Object.fromEntries(rows.at(-1)!.split(",").map((v, i) => [cols[i]!, Number(v)]));
}

describe("sidecar clocks", () => {
  it("on a run with dense snapshots, psibox clocks agrees with the in-line clocks to 1e-3 (trapezoid over snapshots vs per-step integration)", () => {
    fs.writeFileSync(
      path.join(work, "dense.toml"),
      `[grid]\ncells = [64, 64]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "150 Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 1]\n` +
        `[output]\ntime_unit = "Myr"\nsnapshot_every = 4\n[sidecar]\nsqueezing_db = -20\n`,
    );
    const run = psibox(["run", "dense.toml", "-q"]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/squeezing onset \(N\|X\| = 1\) +at [\d.]+ Myr \(/);
    const inline = JSON.parse(fs.readFileSync(path.join(work, "output/dense/clocks.json"), "utf8"));
    const series = lastRow(path.join(work, "output/dense/timeseries.csv"));
    expect(Math.abs(series["chi_integral_rad"]! / inline.final.chi_integral_rad - 1)).toBeLessThan(1e-11);
    const r = psibox(["clocks", "output/dense", "--squeezing-db", "-20"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^49 snapshots, mode: box, N = /);
    const fromSnaps = lastRow(path.join(work, "output/dense/snapshot-clocks.csv"));
    for (const [a, b] of [
      ["theta_rad", "theta_rad"],
      ["chi_integral_rad", "chi_integral_rad"],
      ["breakdown_integral", "breakdown_integral"],
    ] as const) {
      expect(Math.abs(fromSnaps[b]! / inline.final[a] - 1), a).toBeLessThan(1e-3);
    }
    const snapSummary = JSON.parse(fs.readFileSync(path.join(work, "output/dense/snapshot-clocks.json"), "utf8"));
    for (let i = 0; i < 5; i++) {
      const a = inline.clocks[i].time_s;
      const b = snapSummary.clocks[i].time_s;
      // χ_ad carries ω, which swings with the wave's kinetic energy: the trapezoid over every 4th step is coarser there
      expect(Math.abs(b / a - 1), inline.clocks[i].name).toBeLessThan(inline.clocks[i].name === "phase-diffusion-adiabatic" ? 5e-3 : 2e-3);
    }
    // a region around the densest point, with its own (isolated) potential, also runs
    const region = psibox(["clocks", "output/dense/snapshots/snap_00048.h5", "--region", "densest", "--radius", "3 kpc", "--out", "region", "--json"]);
    expect(region.code).toBe(0);
    expect(JSON.parse(region.stdout).region).toBe("densest");
  });

  it("rejects regions outside the box, regions with N < 1 and files that are not snapshots", () => {
    fs.writeFileSync(
      path.join(work, "packet.toml"),
      `[grid]\ncells = 256\nbox = "20 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n` +
        `[initial]\nkind = "gaussian-packet"\nmass = "1e8 Msun"\nwidth = "0.1 kpc"\ncenter = ["6 kpc"]\n`,
    );
    expect(psibox(["run", "packet.toml", "-q"]).code).toBe(0);
    const outside = psibox(["clocks", "output/packet", "--region", "sphere", "--center", "25 kpc", "--radius", "1 kpc"]);
    expect(outside.code, outside.stderr + outside.stdout).toBe(2);
    expect(outside.stderr).toMatch(/^psibox: --center: lies outside the box on axis 1 \(0 … 20\.00 kpc\)\n$/);
    // (even far tails of a wave-dark-matter field hold many particles; this packet's tail underflows to zero)
    const empty = psibox(["clocks", "output/packet", "--region", "sphere", "--center", "18 kpc", "--radius", "0.5 kpc"]);
    expect(empty.code).toBe(2);
    expect(empty.stderr).toMatch(/the mode holds N = .* particles \(< 1\); choose a larger region/);
    fs.writeFileSync(path.join(work, "x.h5"), "nothing");
    expect(psibox(["clocks", "x.h5"]).stderr).toMatch(/x\.h5: not a readable HDF5 file/);
  });
});

describe("psibox estimate", () => {
  it("prints the four clocks with their formulas; the axion rule of thumb lands near 1e-4 s (common practice)", () => {
    const r = psibox(["estimate", "--particle-mass", "1e-5 eV", "--velocity", "1e-3 c", "--mode-mass", "1e-10 Msun", "--density", "0.3 GeV/cm^3"]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^squeezing onset +32\.9 µs +1\/\(N\|χ\|\) = ħ\/\(2 m ⟨v²⟩\)/m);
    expect(r.stdout).toMatch(/^classical breakdown +[\d.]+ Gyr +ln N \/ √\(4πG ρ\)/m);
    const json = JSON.parse(psibox(["estimate", "--particle-mass", "1e-22 eV", "--halo-mass", "1e9 Msun", "--radius", "1 kpc", "--json"]).stdout);
    expect(json.particles).toBeCloseTo(1.1154e97, -93);
    expect(json.clocks).toHaveLength(5);
  });

  it("names the missing or bad input", () => {
    expect(psibox(["estimate", "--particle-mass", "1e-22 eV", "--mode-mass", "1e9 Msun"]).stderr).toMatch(/^psibox: --velocity: give a velocity dispersion/);
    expect(psibox(["estimate", "--particle-mass", "1e-22", "--velocity", "10 km/s", "--mode-mass", "1 Msun"]).stderr).toMatch(/^psibox: --particle-mass: "1e-22" is not a mass/);
    const small = psibox(["estimate", "--particle-mass", "1 GeV", "--velocity", "10 km/s", "--mode-mass", "1e-30 kg"]);
    expect(small.code).toBe(2);
    expect(small.stderr).toMatch(/N = .* particles \(< 1\)/);
  });
});
