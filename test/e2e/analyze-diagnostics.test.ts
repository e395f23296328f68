// psibox analyze's field diagnostics from the CLI: tables, pictures, Δ²(k) in h/Mpc against the linear spectrum, and bad input.
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { PNG } from "pngjs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The same, without waiting: independent invocations run side by side. */
function psiboxAsync(args: string[]): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [BIN, ...args], { cwd: work });
    let stderr = "";
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString("utf8")));
    child.on("close", (code) => resolve({ code, stderr }));
  });
}

function readCsv(file: string): Record<string, number>[] {
  const [header, ...rows] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  return rows.map((r) => Object.fromEntries(r.split(",").map((v, i) => [cols[i]!, Number(v)])));
}

const PLANE = (cells: string, mode: string) =>
  `[grid]\ncells = ${cells}\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "300 Myr"\n` +
  `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = ${mode}\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "300 Myr"\n`;

beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-diagnostics-"));
  fs.writeFileSync(path.join(work, "one.toml"), PLANE("[256]", "[1]"));
  fs.writeFileSync(path.join(work, "two.toml"), PLANE("[32, 32]", "[1, 1]"));
  for (const c of ["one", "two"]) expect(psibox(["run", `${c}.toml`, "-q"]).code).toBe(0);
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

function pngOk(file: string): void {
  const png = PNG.sync.read(fs.readFileSync(file));
  expect(png.width).toBeGreaterThan(300);
  expect(png.height).toBeGreaterThan(200);
  const colours = new Set<number>();
  for (let i = 0; i < png.data.length; i += 4 * 37) colours.add((png.data[i]! << 16) | (png.data[i + 1]! << 8) | png.data[i + 2]!);
  expect(colours.size, file).toBeGreaterThan(5);
}

describe("psibox analyze: field diagnostics", () => {
  it("1D: energy spectra, granules and the Husimi x–v image with its frames; the split sums to the run's kinetic energy", () => {
    const r = psibox(["analyze", "output/one", "--frames", "--husimi-window", "0.4 kpc"]);
    expect(r.code, r.stderr).toBe(0);
    const dir = path.join(work, "output/one/analysis/snap_00001");
    for (const f of ["energy-spectra.csv", "granule-pdf.csv", "granule-correlation.csv", "husimi.csv"]) expect(fs.existsSync(path.join(dir, f)), f).toBe(true);
    for (const f of ["energy-spectra.png", "velocity-power.png", "granules.png", "husimi.png"]) pngOk(path.join(dir, f));
    expect(fs.existsSync(path.join(dir, "vortices.csv"))).toBe(false);
    expect(fs.existsSync(path.join(work, "output/one/analysis/frames/husimi_00001.png"))).toBe(true);
    const summary = JSON.parse(fs.readFileSync(path.join(dir, "summary.json"), "utf8"));
    const e = summary.energy_split_Msun_km2_s2;
    // two code paths: the split's parts and the kinetic energy of the existing summary (Parseval)
    expect((e.quantum + e.incompressible + e.compressible + e.unresolved_nyquist) / summary.energies_Msun_km2_s2.kinetic).toBeCloseTo(1, 10);
    expect(summary.husimi.window_kpc).toBeCloseTo(0.4, 12);
    expect(summary.husimi.wehrl_entropy).toBeGreaterThan(1); // Lieb 1978: ≥ d
    // the husimi table integrates to the mass (over the run's depth convention): Σ f Δx Δv = M (Widrow & Kaiser 1993 normalisation)
    const rows = readCsv(path.join(dir, "husimi.csv"));
    const xs = [...new Set(rows.map((q) => q["x_kpc"]!))];
    const vs = [...new Set(rows.map((q) => q["v_km_s"]!))].sort((a, b) => a - b);
    const total = rows.reduce((t, q) => t + q["f_Msun_per_kpc_km_s"]!, 0) * (xs[1]! - xs[0]!) * (vs[1]! - vs[0]!);
    expect(Math.abs(total / summary.mass_Msun - 1)).toBeLessThan(1e-4);
  });

  it("2D: vortices, the Husimi speed distribution at chosen points, and --diagnostics choosing a subset", () => {
    const r = psibox(["analyze", "output/two", "--husimi-points", "5,5;12.5,7", "--out", "a"]);
    expect(r.code, r.stderr).toBe(0);
    const dir = path.join(work, "a/snap_00001");
    for (const f of ["vortices.png", "husimi-points.png", "energy-spectra.png", "granules.png"]) pngOk(path.join(dir, f));
    const summary = JSON.parse(fs.readFileSync(path.join(dir, "summary.json"), "utf8"));
    expect(summary.vortices.net_charge).toBe(0);
    expect(summary.husimi.points.flat().map((x: number) => Number(x.toPrecision(9)))).toEqual([5, 5, 12.5, 7]);
    const points = readCsv(path.join(dir, "husimi-points.csv"));
    expect(new Set(points.map((p) => p["point"])).size).toBe(2);
    const only = psibox(["analyze", "output/two", "--diagnostics", "vortices", "--no-pictures", "--out", "b"]);
    expect(only.code, only.stderr).toBe(0);
    const files = fs.readdirSync(path.join(work, "b/snap_00001"));
    expect(files).toContain("vortices.csv");
    expect(files).not.toContain("granule-pdf.csv");
    expect(files).not.toContain("energy-spectra.csv");
    // the snapshot's own tables do not depend on the diagnostics chosen: the same bytes with none of them, and the
    // same summary apart from the diagnostics' keys
    expect(psibox(["analyze", "output/two", "--diagnostics", "none", "--no-pictures", "--out", "c"]).code).toBe(0);
    for (const f of ["power.csv", "pdf.csv", "peaks.csv", "profiles.csv", "halos.csv"]) expect(fs.readFileSync(path.join(work, "c/snap_00001", f), "utf8"), f).toBe(fs.readFileSync(path.join(dir, f), "utf8"));
    const bare = JSON.parse(fs.readFileSync(path.join(work, "c/snap_00001/summary.json"), "utf8"));
    const { energy_split_Msun_km2_s2: _s, vortices: _v, granules: _g, husimi: _h, ...rest } = summary;
    expect(bare).toEqual(rest);
  });

  it("bad input: one-line errors naming the option and what is valid, exit code 2", async () => {
    const cases: [string[], RegExp][] = [
      [["output/two", "--husimi-window", "0.1 kpc"], /^psibox: --husimi-window: 0\.1 kpc is smaller than a cell; valid for .* 0\.6250 to 1\.250 kpc$/],
      [["output/two", "--husimi-window", "5 kpc"], /^psibox: --husimi-window: 5 kpc is too wide for the box .*; valid for .* 0\.6250 to 1\.250 kpc$/],
      [["output/two", "--husimi-window", "3 km/s"], /^psibox: --husimi-window: .*length/],
      [["output/two", "--husimi-points", "5,25"], /^psibox: --husimi-points: the point 5,25 is outside the box .*axis 2 runs from 0 to 20/],
      [["output/two", "--husimi-points", "5"], /^psibox: --husimi-points: the point 5 has 1 coordinates; .* is 2D$/],
      [["output/two", "--husimi-points", "a,b"], /^psibox: --husimi-points: "a,b" is not a list of points/],
      [["output/one", "--diagnostics", "vortices"], /^psibox: --diagnostics: vortices need a 2D or 3D run, .* is 1D/],
      [["output/one", "--husimi-points", "3"], /^psibox: --husimi-points: .* is a 1D run/],
      [["output/two", "--diagnostics", "vortex"], /^psibox: --diagnostics: unknown diagnostic "vortex"; valid: energy-split, vortices, granules, husimi or none$/],
    ];
    const results = await Promise.all(cases.map(([args]) => psiboxAsync(["analyze", ...args, "--out", "bad"])));
    for (const [i, [args, message]] of cases.entries()) {
      const r = results[i]!;
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stderr.trim().split("\n"), args.join(" ")).toHaveLength(1);
      expect(r.stderr.trim(), args.join(" ")).toMatch(message);
    }
  });
});

describe("vortex census in the time series (output.vortex_census)", () => {
  const NOISE = (cells: string) =>
    `[grid]\ncells = ${cells}\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "200 Myr"\n[initial]\nkind = "white-noise"\n` +
    `mean_density = "1e7 Msun/kpc^3"\namplitude = 0.5\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "200 Myr"\ntimeseries_every = 50\nvortex_census = true\n`;

  it("counts the vortices at every row; the last row equals psibox analyze's count on the final snapshot (the raw field and the kicked field have the same zeros)", () => {
    fs.writeFileSync(path.join(work, "noise.toml"), NOISE("[32, 32]"));
    const r = psibox(["run", "noise.toml", "-q"]);
    expect(r.code, r.stderr).toBe(0);
    const rows = readCsv(path.join(work, "output/noise/timeseries.csv"));
    expect(rows[0]!["vortices"]).toBe(0); // a real positive field has no zeros
    const last = rows.at(-1)!["vortices"]!;
    expect(last).toBeGreaterThan(10);
    expect(last % 2).toBe(0); // net charge zero in a periodic box
    const a = psibox(["analyze", "output/noise/snapshots/snap_00001.h5", "--diagnostics", "vortices", "--no-pictures", "--out", "census"]);
    expect(a.code, a.stderr).toBe(0);
    expect(JSON.parse(fs.readFileSync(path.join(work, "census/summary.json"), "utf8")).vortices.count).toBe(last);
    expect(JSON.parse(fs.readFileSync(path.join(work, "output/noise/summary.json"), "utf8")).final_vortices).toBe(last);
  });

  it("refuses the census for a 1D run with a one-line error naming the key, exit code 2", () => {
    fs.writeFileSync(path.join(work, "noise1.toml"), NOISE("[32]"));
    const r = psibox(["run", "noise1.toml", "-q"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe("psibox: output.vortex_census: vortices need a 2D or 3D grid; this grid is 1D (set it to false)");
  });
});

describe("cosmological conventions", () => {
  it("Δ²(k) = k³P/(2π²) of a cosmological initial field in h/Mpc follows the linear spectrum it was drawn from, within cosmic variance", () => {
    fs.writeFileSync(
      path.join(work, "cosmo.toml"),
      `[grid]\ncells = [32, 32, 32]\nbox = "50 Mpc/h"\n[particle]\nmass = "1e-22 eV"\n[background]\nkind = "lcdm"\n[span]\nstart_redshift = 100\n[initial]\nkind = "cosmological"\nseed = 3\n`,
    );
    expect(psibox(["ic", "cosmo.toml", "-q"]).code).toBe(0);
    const r = psibox(["analyze", "output/cosmo", "--no-pictures", "--diagnostics", "none"]);
    expect(r.code, r.stderr).toBe(0);
    const measured = readCsv(path.join(work, "output/cosmo/analysis/snap_00000/power.csv"));
    const linear = readCsv(path.join(work, "output/cosmo/initial-power.csv"));
    const at = (k: number) => {
      // log-log interpolation of P_start [(Mpc/h)³] in k [h/Mpc]
      const j = linear.findIndex((row) => row["k_h_per_Mpc"]! >= k);
      const a = linear[j - 1]!;
      const b = linear[j]!;
      const t = Math.log(k / a["k_h_per_Mpc"]!) / Math.log(b["k_h_per_Mpc"]! / a["k_h_per_Mpc"]!);
      return Math.exp(Math.log(a["P_start_Mpc3_per_h3"]!) * (1 - t) + Math.log(b["P_start_Mpc3_per_h3"]!) * t);
    };
    let checked = 0;
    for (const bin of measured.slice(0, 14)) {
      const k = bin["k_h_per_Mpc"]!;
      expect(bin["Delta2"]! / ((k ** 3 * bin["P_Mpc3_per_h3"]!) / (2 * Math.PI ** 2))).toBeCloseTo(1, 6); // the definition, in h units
      const expected = (k ** 3 * at(k)) / (2 * Math.PI ** 2);
      const sigma = Math.sqrt(2 / bin["modes"]!);
      expect(Math.abs(bin["Delta2"]! / expected - 1), `k = ${k} h/Mpc`).toBeLessThan(4 * sigma + 0.05);
      checked++;
    }
    expect(checked).toBe(14);
    // the physical-unit columns agree with the h units (h = 0.6736, Planck 2018 default)
    const h = measured[3]!["k_h_per_Mpc"]! / (measured[3]!["k_per_kpc"]! * 1e3);
    expect(1 / h).toBeCloseTo(0.6736, 6);
  });
});
