// The adiabatic coefficient measured in a run by a twin field (sidecar.twin_excess): ψ₂(0) = (1 + e/2)ψ(0) advanced
// with its own gravity beside the run's field, χ_ad = −(d/dt) arg∫conj(ψ)ψ₂ dV / ΔN. On a relaxed soliton it must
// agree with N dμ/dN of the stationary state: the stationary-state value 2ω/N + 2χ, and (3/2) Nħχ (computed
// independently: μ ∝ N² by the scaling symmetry of Schrödinger–Poisson and the virial theorem give
// N dμ/dN = 3W/N against Nħχ = 2W/N; Lewenstein & You 1996, PRL 77, 3489, for the principle).
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { twinSentence } from "../../src/report/report-parts.js";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";

let work: string;
beforeAll(() => {
  work = makeWork("twin");
});
afterAll(() => removeWork(work));

const YEAR_S = 365.25 * 86400;

/** A 1e9 Msun soliton for m = 1e-22 eV relaxed in an isolated box, then evolved with the sidecar's twin. */
function config(cells: number, duration: string, sidecar: string, snapshots = duration): string {
  return (
    `[grid]\ncells = [${cells}, ${cells}, ${cells}]\nbox = "2.5 kpc"\ngravity = "isolated"\n[particle]\nmass = "1e-22 eV"\n` +
    `[span]\nduration = "${duration}"\n[initial]\nkind = "ground-state"\nmass = "1e9 Msun"\nguess_width = "0.3 kpc"\n` +
    `[integrator]\nsafety = 0.5\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "${snapshots}"\n[sidecar]\n${sidecar}`
  );
}

interface Twin {
  excess: number;
  chi_adiabatic_per_s: number;
  chi_adiabatic_stationary_per_s: number;
  chi_frozen_per_s: number;
  ratio_to_stationary: number;
  ratio_to_frozen: number;
  chi_adiabatic_integral_rad: number;
}

describe("twin-field measurement of the adiabatic coefficient (psibox run)", () => {
  it("on a relaxed 32³ soliton over 40 Myr (about 25 central dynamical times), χ_ad agrees with dμ/dN to 2% and starts at the frozen-mode χ", () => {
    writeIn(work, "twin.toml", config(32, "40 Myr", "twin_excess = 0.001\n"));
    const r = runPsibox(work, ["run", "twin.toml", "-q"]);
    expect(r.code, r.stderr).toBe(0);
    const summary = readJson<{ adiabatic_twin: Twin }>(path.join(work, "output/twin/summary.json"));
    const twin = summary.adiabatic_twin;
    expect(twin.excess).toBe(0.001);
    expect(twin.chi_adiabatic_per_s).toBeLessThan(0);
    expect(Math.abs(twin.ratio_to_stationary - 1)).toBeLessThan(0.02); // measured 3e-4
    expect(Math.abs(twin.chi_adiabatic_per_s / twin.chi_adiabatic_stationary_per_s - twin.ratio_to_stationary)).toBeLessThan(1e-12);
    expect(Math.abs(twin.ratio_to_frozen / 1.5 - 1)).toBeLessThan(0.02); // measured 4e-4
    // on screen, in clocks.json (with the adiabatic clock projected on the twin's rate) and in the time series
    expect(r.stdout).toMatch(/adiabatic coefficient by the twin field \(e = 0\.001\): χ_ad = −2\.4\d* × 10⁻¹¹¹ \/s, (0\.9|1\.0)\d+ × the stationary-state 2ω\/N \+ 2χ, 1\.\d+ × the frozen-mode χ/);
    const clocks = readJson<{ clocks: { name: string; time_s: number; method: string }[]; adiabatic_twin: Twin }>(path.join(work, "output/twin/clocks.json"));
    expect(clocks.adiabatic_twin).toEqual(twin);
    const adiabatic = clocks.clocks.find((c) => c.name === "phase-diffusion-adiabatic")!;
    expect(adiabatic.method).toMatch(/measured by the twin field/);
    // the 1e9 Msun soliton's adiabatic phase-diffusion time, 3.82e54 yr (computed independently), to the 32³ grid's 1%
    expect(Math.abs(adiabatic.time_s / YEAR_S / 3.82e54 - 1)).toBeLessThan(0.01);
    const rows = readCsv(path.join(work, "output/twin/timeseries.csv"));
    const last = rows.at(-1)!;
    expect(Number(last["chi_adiabatic_integral_rad"]) / twin.chi_adiabatic_integral_rad).toBeCloseTo(1, 9);
    // at first the twin's mode function has not relaxed: its phase runs at the frozen-mode rate (within 1% over 0.3 Myr)
    const early = rows.filter((row) => Number(row["t_Myr"]) > 0 && Number(row["t_Myr"]) < 0.3);
    expect(early.length).toBeGreaterThan(2);
    for (const row of early) expect(Math.abs(Number(row["chi_adiabatic_per_s"]) / Number(row["chi_per_s"]) - 1)).toBeLessThan(0.01);
    // the report says it in a sentence (from clocks.json)
    expect(twinSentence(clocks.adiabatic_twin)).toMatch(/^A twin field \(ψ₂ = \(1 \+ e\/2\)ψ at the start with e = 0\.001, .* measured the adiabatic coefficient χ_ad = −2\.4\d × 10⁻¹¹¹ \/s/);
  });

  it("a run with a twin continues exactly through its checkpoint (psibox extend vs the run with the later end)", () => {
    // a self-gravitating packet (no relaxation needed) in a 16³ box
    const packet = (d: string) => config(16, d, "twin_excess = 0.01\n", "2 Myr").replace(/kind = "ground-state"[^[]*/, 'kind = "gaussian-packet"\nmass = "1e9 Msun"\nwidth = "0.3 kpc"\n');
    writeIn(work, "short.toml", packet("4 Myr"));
    writeIn(work, "long.toml", packet("6 Myr"));
    expect(runPsibox(work, ["run", "short.toml", "-q"]).code).toBe(0);
    expect(runPsibox(work, ["run", "long.toml", "-q"]).code).toBe(0);
    const ext = runPsibox(work, ["extend", "output/short", "--to", "6 Myr", "-q"]);
    expect(ext.code, ext.stderr).toBe(0);
    const a = readJson<{ adiabatic_twin: Twin }>(path.join(work, "output/short/summary.json")).adiabatic_twin;
    const b = readJson<{ adiabatic_twin: Twin }>(path.join(work, "output/long/summary.json")).adiabatic_twin;
    expect(a).toEqual(b);
    expect(readCsv(path.join(work, "output/short/timeseries.csv")).at(-1)).toEqual(readCsv(path.join(work, "output/long/timeseries.csv")).at(-1));
  });

  it("refuses an e outside 1e-6 … 0.1 and a twin without the sidecar, naming the key (exit code 2)", () => {
    for (const [text, message] of [
      ["twin_excess = 0.5\n", /^psibox: sidecar\.twin_excess: must be 0 \(no twin\) or from 1e-6 to 0\.1/],
      ["twin_excess = -0.001\n", /^psibox: sidecar\.twin_excess: must be 0 \(no twin\) or from 1e-6 to 0\.1/],
      ["enabled = false\ntwin_excess = 0.001\n", /^psibox: sidecar\.twin_excess: needs sidecar\.enabled = true/],
    ] as const) {
      writeIn(work, "bad.toml", config(16, "1 Myr", text));
      const r = runPsibox(work, ["run", "bad.toml", "-q", "--force"]);
      expect(r.code, text).toBe(2);
      expect(r.stderr, text).toMatch(message);
      expect(r.stderr.trim().split("\n"), text).toHaveLength(1);
    }
  });
});
