// The mode's quantum state and decoherence from the CLI: estimate with a soliton, a squeezed start and
// loss; clocks --json with its numbers; one-line errors for bad states and rates.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { modeSentence } from "../../src/report/report-parts.js";

const BIN = path.resolve("dist/cli/bin.js");
const YEAR_S = 365.25 * 86400;
let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-mode-state-"));
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe("psibox estimate: state, rates, adiabatic clock", () => {
  it("the 1e9 Msun, m = 1e-22 eV soliton: χ = −1.6553e-111 /s, phase diffusion 5.73e54 yr frozen and 3.82e54 yr adiabatic (computed independently)", () => {
    const r = psibox(["estimate", "--particle-mass", "1e-22 eV", "--soliton-mass", "1e9 Msun", "--json"]);
    expect(r.stderr).toBe("");
    const j = JSON.parse(r.stdout);
    expect(j.particles).toBeCloseTo(1.1154e97, -93);
    expect(Math.abs(j.chiPerS / -1.6553e-111 - 1)).toBeLessThan(1e-4); // negative, like every other χ psibox prints
    expect(j.chiAdiabaticPerS / j.chiPerS).toBeCloseTo(1.5, 12);
    const clock = (name: string) => j.clocks.find((c: { name: string }) => c.name === name).timeS / YEAR_S;
    expect(Math.abs(clock("phase diffusion, frozen mode") / 5.73e54 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(clock("phase diffusion, adiabatic") / 3.82e54 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(j.numberSpread / Math.sqrt(j.particles) - 1)).toBeLessThan(1e-12);
  });

  it("a number-squeezed start diffuses e^r times slower; fast loss stops the phase diffusion altogether", () => {
    // an axion clump: N = 5.6e10, N|χ| = 1/(32.9 µs), ΔN|χ| = 0.13 /s
    const base = ["estimate", "--particle-mass", "1e-5 eV", "--velocity", "1e-3 c", "--mode-mass", "1e-30 kg"];
    const coherent = JSON.parse(psibox([...base, "--json"]).stdout);
    const squeezed = JSON.parse(psibox([...base, "--json", "--squeeze", "1"]).stdout);
    const t = (j: { clocks: { name: string; timeS: number | null }[] }, name: string) => j.clocks.find((c) => c.name === name)!.timeS as number;
    expect(t(squeezed, "phase diffusion, frozen mode") / t(coherent, "phase diffusion, frozen mode")).toBeCloseTo(Math.E, 3);
    // with γ = 10/s the Kerr phase spread saturates at ΔN|χ|/γ ≈ 0.013 rad: the mode empties first
    const lossy = psibox([...base, "--loss-rate", "10/s"]);
    expect(lossy.code).toBe(0);
    expect(lossy.stdout).toMatch(/^phase diffusion, frozen mode +— /m);
    expect(lossy.stdout).toMatch(/loss γ = 10 \/s/);
    const slow = JSON.parse(psibox([...base, "--json", "--loss-rate", "0.001/s"]).stdout);
    expect(t(slow, "phase diffusion, frozen mode") / t(coherent, "phase diffusion, frozen mode")).toBeGreaterThan(1);
  });

  it("a bad state flag is one line naming the flag, exit 2 (each flag's message: test/unit/mode-state-options.test.ts)", () => {
    const base = ["estimate", "--particle-mass", "1e-5 eV", "--velocity", "1e-3 c", "--mode-mass", "1e-30 kg"];
    const cases: [string[], RegExp][] = [
      [["--squeeze", "-0.2"], /^psibox: --squeeze: must be a finite squeeze parameter r ≥ 0, got "-0\.2"\n$/],
      [["--thermal", "1e12"], /^psibox: --thermal: the state's fluctuation holds .* more than the mode's N = /],
    ];
    for (const [flags, msg] of cases) {
      const r = psibox([...base, ...flags]);
      expect(r.code, flags.join(" ")).toBe(2);
      expect(r.stderr, flags.join(" ")).toMatch(msg);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    }
  });
});

describe("psibox clocks --json", () => {
  it("gives the numbers: every snapshot's row, the final state, the start and the rates; a squeezed lossy start changes the clocks", () => {
    fs.writeFileSync(
      path.join(work, "wave.toml"),
      `[grid]\ncells = [32, 32]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "40 Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 1]\n` +
        `[output]\ntime_unit = "Myr"\nsnapshot_every = 20\n`,
    );
    expect(psibox(["run", "wave.toml", "-q"]).code).toBe(0);
    const plain = psibox(["clocks", "output/wave", "--json", "--out", "plain"]);
    expect(plain.stderr).toBe("");
    const j = JSON.parse(plain.stdout);
    expect(j.rows.length).toBe(j.snapshots);
    const last = j.rows.at(-1);
    for (const key of ["t_s", "particles_N", "chi_per_s", "chi_integral_rad", "squeezing_dB", "chi_adiabatic_per_s"]) expect(typeof last[key], key).toBe("number");
    expect(last.chi_per_s).toBeLessThan(0);
    expect(j.final.chi_integral_rad).toBe(last.chi_integral_rad);
    expect(j.start.description).toBe("coherent");
    expect(j.clocks.map((c: { name: string }) => c.name)).toEqual(["squeezing-onset", "squeezing-level", "phase-diffusion", "phase-diffusion-adiabatic", "classical-breakdown"]);
    const sq = JSON.parse(psibox(["clocks", "output/wave", "--json", "--out", "sq", "--squeeze", "0.5", "--loss-rate", "1/Gyr"]).stdout);
    expect(sq.loss_rate_per_s).toBeCloseTo(1 / (1e9 * YEAR_S), 25);
    // the squeezed start is 4.34 dB below the vacuum before any Kerr evolution
    expect(sq.rows[0].squeezing_dB).toBeCloseTo(-10 * Math.log10(Math.E), 6);
    const bad = psibox(["clocks", "output/wave", "--loss-rate", "2 kpc"]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^psibox: --loss-rate: "2 kpc" is not a rate/);
  });
});

describe("runs with a squeezed, lossy mode ([sidecar] keys)", () => {
  const config = (extra: string) =>
    `[grid]\ncells = [32, 32]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "20 Myr"\n` +
    `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 1]\n` +
    `[output]\ntime_unit = "Myr"\n[sidecar]\n${extra}`;

  it("records the start, the rates and the adiabatic columns; the squeezed start begins 4.34 dB below the vacuum", () => {
    fs.writeFileSync(path.join(work, "sq.toml"), config(`squeeze = 0.5\nsqueeze_angle = 0\nloss_rate = "1/Gyr"\ndephasing_rate = "0.01/Gyr"\n`));
    const r = psibox(["run", "sq.toml", "-q"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const clocks = JSON.parse(fs.readFileSync(path.join(work, "output/sq/clocks.json"), "utf8"));
    expect(clocks.start).toMatchObject({ squeeze: 0.5, squeezeAngle: 0, thermal: 0 });
    expect(clocks.loss_rate_per_s * 1e9 * YEAR_S).toBeCloseTo(1, 10);
    expect(clocks.dephasing_rate_per_s * 1e9 * YEAR_S).toBeCloseTo(0.01, 12);
    expect(clocks.clocks.map((c: { name: string }) => c.name)).toContain("phase-diffusion-adiabatic");
    // the report says which start and rates the clocks are for (a number-squeezed start: ΔN = √N e^{−r})
    expect(modeSentence(clocks)).toMatch(/^The clocks are those of a squeezed r = 0\.5 at 0 rad start \(number spread ΔN = 1\.81 × 10⁴⁹, √N = 2\.99 × 10⁴⁹\), with loss at 3\.17 × 10⁻¹⁷ \/s and dephasing at 3\.17 × 10⁻¹⁹ \/s\.$/);
    const [header, first] = fs.readFileSync(path.join(work, "output/sq/timeseries.csv"), "utf8").split("\n");
    const row = Object.fromEntries(header!.split(",").map((c, i) => [c, Number(first!.split(",")[i])]));
    expect(row["squeezing_dB"]).toBeCloseTo(-10 * Math.log10(Math.E), 6);
    expect(row["chi_adiabatic_per_s"]).toBeLessThan(0);
  });

  it("a start that does not fit the mode's N is a one-line error naming the key, exit 2 (the other [sidecar] keys: test/unit/config.test.ts)", () => {
    fs.writeFileSync(path.join(work, "bad.toml"), config("thermal_quanta = 1e200\n"));
    const r = psibox(["run", "bad.toml", "-q"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^psibox: sidecar\.thermal_quanta: the state's fluctuation holds .* more than the mode's N/);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
  });
});
