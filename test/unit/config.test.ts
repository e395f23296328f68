// Config loading, validation and resolution.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { applyOverrides, checkConfig, loadConfig, parseTomlText } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { ConfigError } from "../../src/core/errors.js";
import { VERSION } from "../../src/version.js";

const base = {
  grid: { cells: [32], box: "10 kpc" },
  particle: { mass: "1e-22 eV" },
  span: { duration: "1 Gyr" },
  initial: { kind: "plane-wave", mean_density: "1e7 Msun/kpc^3" },
};

function errorOf(raw: unknown): string {
  try {
    resolveRun(checkConfig(raw), "t", "/");
  } catch (e) {
    expect(e).toBeInstanceOf(ConfigError);
    return (e as Error).message;
  }
  throw new Error("expected a config error");
}

describe("config", () => {
  it("every shipped config in configs/ resolves", () => {
    const dir = path.resolve("configs");
    const files = fs.readdirSync(dir).filter((f) => f.endsWith(".toml"));
    expect(files.length).toBeGreaterThanOrEqual(4);
    for (const f of files) {
      const run = resolveRun(loadConfig(path.join(dir, f)), f, process.cwd());
      expect(run.span.endTime).toBeGreaterThan(run.span.startTime);
    }
  });

  it("records a time-series row every step below 2^18 cells and every 16th step from there, unless told", () => {
    const every = (cells: number[], set?: number) =>
      resolveRun(checkConfig({ ...base, grid: { cells, box: "10 kpc" }, ...(set ? { output: { timeseries_every: set } } : {}) }), "t", "/tmp").output.timeseriesEvery;
    expect(every([32, 32, 32])).toBe(1);
    expect(every([2 ** 17])).toBe(1);
    expect(every([64, 64, 64])).toBe(16);
    expect(every([512, 512])).toBe(16);
    expect(every([64, 64, 64], 1)).toBe(1);
    expect(errorOf({ ...base, output: { timeseries_every: 0 } })).toMatch(/^output\.timeseries_every/);
  });

  it("uses the cores from 2^17 cells on in 1D and 2D (2^18 in 3D) and one thread below, unless told (the crossover measured by scripts/bench-threads.mjs)", () => {
    const threads = (cells: number[]) => resolveRun(checkConfig({ ...base, grid: { cells, box: "10 kpc" } }), "t", "/tmp").integrator.threads;
    const saved = process.env["PSIBOX_THREADS"];
    delete process.env["PSIBOX_THREADS"];
    try {
      const cores = os.availableParallelism();
      expect([threads([32, 32, 32]), threads([64, 64, 32]), threads([256, 256]), threads([2 ** 16])]).toEqual([1, 1, 1, 1]);
      expect([threads([64, 64, 64]), threads([256, 512]), threads([2 ** 17])]).toEqual([cores, cores, cores]);
      process.env["PSIBOX_THREADS"] = "3";
      expect(threads([32, 32, 32])).toBe(3);
    } finally {
      if (saved === undefined) delete process.env["PSIBOX_THREADS"];
      else process.env["PSIBOX_THREADS"] = saved;
    }
  });

  it("fills defaults and converts to code units", () => {
    const run = resolveRun(checkConfig(base), "t", "/tmp");
    expect(run.grid.gravity).toBe("periodic");
    expect(run.integrator.safety).toBe(0.25);
    expect(run.grid.lengths[0]).toBe(1);
    expect(run.output.timeUnit).toBe("Gyr");
    expect(run.outputDir).toBe(path.resolve("/tmp", "output", "t"));
  });

  it("sidecar.outflow_region: the region in code lengths, and errors naming the key", () => {
    const box = { ...base, grid: { cells: [32, 32], box: "10 kpc" } };
    const run = resolveRun(checkConfig({ ...box, sidecar: { outflow_region: "cube", outflow_radius: "2 kpc", outflow_center: ["3 kpc", "4 kpc"] } }), "t", "/");
    const cube = run.sidecar.outflow as { kind: string; center: number[]; halfWidth: number };
    expect(cube.kind).toBe("cube");
    [0.3, 0.4].forEach((c, i) => expect(cube.center[i]).toBeCloseTo(c, 14)); // code length: the 10 kpc box side
    expect(cube.halfWidth).toBeCloseTo(0.2, 14);
    expect(resolveRun(checkConfig({ ...box, sidecar: { outflow_region: "sphere", outflow_radius: "1 kpc" } }), "t", "/").sidecar.outflow).toMatchObject({ center: [0.5, 0.5] });
    expect(resolveRun(checkConfig(box), "t", "/").sidecar.outflow).toBeUndefined();
    const bad = (sidecar: Record<string, unknown>) => errorOf({ ...box, sidecar });
    expect(bad({ outflow_region: "ball" })).toMatch(/^sidecar\.outflow_region: must be one of "none", "sphere", "cube", "densest"/);
    expect(bad({ outflow_region: "sphere" })).toMatch(/^sidecar\.outflow_radius: missing: the sphere's radius/);
    expect(bad({ outflow_region: "sphere", outflow_radius: "2 Myr" })).toMatch(/^sidecar\.outflow_radius: "2 Myr" is not a length/);
    expect(bad({ outflow_region: "cube", outflow_radius: "2 kpc", outflow_center: ["30 kpc", "1 kpc"] })).toMatch(/^sidecar\.outflow_center: lies outside the box on axis 1/);
    expect(bad({ outflow_radius: "2 kpc" })).toMatch(/^sidecar\.outflow_radius: needs sidecar\.outflow_region/);
    // the mode's start and rates (a start too large for the mode's N is found when the run starts: test/e2e/mode-state.test.ts)
    expect(bad({ squeeze: -1 })).toMatch(/^sidecar\.squeeze: must be a finite squeeze parameter r ≥ 0/);
    expect(bad({ loss_rate: "3 km" })).toMatch(/^sidecar\.loss_rate: "3 km" is not a rate/);
    expect(bad({ dephasing_rate: "-2/Gyr" })).toMatch(/^sidecar\.dephasing_rate: must be a rate ≥ 0/);
    // the shared region parser's checks, with the sidecar's keys in the messages
    expect(bad({ outflow_region: "sphere", outflow_radius: "6 kpc" })).toMatch(/^sidecar\.outflow_radius: must be at most half the box's smallest side \(5\.000 kpc\)/);
    expect(bad({ outflow_region: "cube", outflow_radius: "1 kpc", outflow_center: ["1 kpc"] })).toMatch(/^sidecar\.outflow_center: give one value or 2/);
    expect(bad({ enabled: false, outflow_region: "densest", outflow_radius: "2 kpc" })).toMatch(/^sidecar\.outflow_region: needs sidecar\.enabled = true/);
  });

  it("names the key and what is valid in every error", () => {
    expect(errorOf({ ...base, grid: { cells: [48], box: "10 kpc" } })).toMatch(/^grid\.cells: 48 is not a power of two/);
    expect(errorOf({ ...base, particle: { mass: "-1e-22 eV" } })).toMatch(/^particle\.mass: must be positive/);
    expect(errorOf({ ...base, grid: { cells: [32], box: "0 kpc" } })).toMatch(/^grid\.box: must be positive/);
    expect(errorOf({ ...base, grid: { cells: [32], box: "10 km/s" } })).toMatch(/^grid\.box: "10 km\/s" is not a length/);
    expect(errorOf({ ...base, extra: 1 })).toMatch(/^extra: unknown key; valid keys here: grid, particle/);
    expect(errorOf({ ...base, grid: { ...base.grid, cell: 3 } })).toMatch(/^grid\.cell: unknown key/);
    const lcdm = { ...base, background: { kind: "lcdm" }, span: { start_redshift: 0, end_redshift: 5 }, initial: { kind: "plane-wave" } };
    expect(errorOf(lcdm)).toMatch(/^span\.start_redshift: must be larger than span\.end_redshift/);
    expect(errorOf({ ...base, span: { start_redshift: 10 } })).toMatch(/^span\.start_redshift: needs background\.kind = "lcdm"/);
    expect(errorOf({ ...base, initial: { kind: "soliton" } })).toMatch(/^initial\.kind: must be one of "plane-wave"/);
    expect(errorOf({ ...base, integrator: { safety: 2 } })).toMatch(/^integrator\.safety: must be in \(0, 1\]/);
    expect(errorOf({ ...base, grid: { cells: [32], box: "1 Mpc/h" } })).toMatch(/^grid\.box: unit "h" in "Mpc\/h" needs a cosmology/);
  });

  it("applies --set overrides as TOML values or plain strings", () => {
    const out = applyOverrides(base, ["grid.cells=[64, 64]", "particle.mass=2e-22 eV", "integrator.safety=0.1"]);
    expect(out["grid"]).toEqual({ cells: [64, 64], box: "10 kpc" });
    expect(out["particle"]).toEqual({ mass: "2e-22 eV" });
    expect(out["integrator"]).toEqual({ safety: 0.1 });
    expect(() => applyOverrides(base, ["grid"])).toThrow(/--set: "grid" is not of the form/);
  });

  it("reports TOML syntax errors with the line", () => {
    expect(() => parseTomlText("[grid]\ncells = [32,\n", "x.toml")).toThrow(/^x\.toml: not valid TOML at line \d+/);
  });

  it("the code version matches package.json", () => {
    expect(VERSION).toBe(JSON.parse(fs.readFileSync("package.json", "utf8")).version);
  });
});
