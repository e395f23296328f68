// A region's measured mass outflow as a loss rate (psibox clocks --region, and in-line in the run with
// sidecar.outflow_region): a free Gaussian packet spreading out
// of a sphere centred on it. Reference (computed independently): the packet's density is Gaussian at every time,
// ρ(r, t) = M (2πσ²)^{−3/2} e^{−r²/2σ²} with σ(t)² = σ₀²(1 + (ħt/(2mσ₀²))²) (the textbook free spreading), so the
// mass the region holds is the radial integral of ρ times the region's window w² (the raised cosine of half-width
// one cell across the sphere's surface that the mode uses), and the loss rate over an interval is exactly
// −ln(N₁/N₀)/(t₁ − t₀).
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";
import { outflowSentence } from "../../src/report/report-parts.js";

let work: string;
beforeAll(() => {
  work = makeWork("outflow");
});
afterAll(() => removeWork(work));

// CODATA 2018 ħ, SI 2019 eV and c, IAU 2015 parsec
const HBAR = 6.62607015e-34 / (2 * Math.PI);
const M_KG = (1e-22 * 1.602176634e-19) / 299792458 ** 2;
const KPC = (648000 / Math.PI) * 149597870700 * 1e3;

/** Fraction of a Gaussian packet of width σ [kpc] inside the windowed sphere of radius R with edge half-width h. */
function inside(sigma: number, R: number, h: number): number {
  const w = (r: number) => {
    const d = r - R;
    return d <= -h ? 1 : d >= h ? 0 : 0.5 * (1 + Math.cos((Math.PI * (d + h)) / (2 * h)));
  };
  const f = (r: number) => 4 * Math.PI * r * r * Math.pow(2 * Math.PI * sigma * sigma, -1.5) * Math.exp((-r * r) / (2 * sigma * sigma)) * w(r) ** 2;
  const n = 20000; // composite Simpson over [0, R + h]
  const dr = (R + h) / n;
  let s = f(0) + f(R + h);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(i * dr);
  return (s * dr) / 3;
}

describe("mass outflow of a region as a loss rate", () => {
  it("a free 3D Gaussian packet leaving a sphere of 3 kpc: the measured rate per interval and its mean match the analytic spreading to 5e-4", () => {
    const sigma0 = 1.5; // kpc
    writeIn(
      work,
      "spread.toml",
      `[grid]\ncells = [32, 32, 32]\nbox = "20 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "300 Myr"\n` +
        `[initial]\nkind = "gaussian-packet"\nmass = "1e8 Msun"\nwidth = "${sigma0} kpc"\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "30 Myr"\n` +
        `[sidecar]\noutflow_region = "sphere"\noutflow_center = ["10 kpc", "10 kpc", "10 kpc"]\noutflow_radius = "3 kpc"\n`,
    );
    const run = runPsibox(work, ["run", "spread.toml"]);
    expect(run.code).toBe(0);
    const args = ["clocks", "output/spread", "--region", "sphere", "--center", "10 kpc, 10 kpc, 10 kpc", "--radius", "3 kpc", "--out", "sphere"];
    const r = runPsibox(work, args);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const rows = readCsv(path.join(work, "sphere/snapshot-clocks.csv"));
    expect(rows).toHaveLength(11);
    const tau = (2 * M_KG * (sigma0 * KPC) ** 2) / HBAR; // the spreading time 2mσ₀²/ħ [s]
    const frac = (t: number) => inside(sigma0 * Math.sqrt(1 + (t / tau) ** 2), 3, 20 / 32);
    const n0 = Number(rows[0]!["particles_N"]);
    expect(Math.abs(n0 / (1e8 * 1.3271244e20 / 6.6743e-11 / M_KG) / frac(0) - 1)).toBeLessThan(2e-3); // the cell sum over the windowed sphere vs the integral
    for (let j = 1; j < rows.length; j++) {
      const [t0, t1] = [Number(rows[j - 1]!["t_s"]), Number(rows[j]!["t_s"])];
      const expected = -Math.log(frac(t1) / frac(t0)) / (t1 - t0);
      expect(Math.abs(Number(rows[j]!["outflow_loss_rate_per_s"]) / expected - 1), `interval ${j}`).toBeLessThan(5e-4); // measured 1.2e-4
    }
    const summary = readJson<{ outflow_loss_rate_per_s: number; outflow_loss_rate_per_yr: number }>(path.join(work, "sphere/snapshot-clocks.json"));
    const t1 = Number(rows.at(-1)!["t_s"]);
    const mean = -Math.log(frac(t1) / frac(0)) / t1;
    expect(Math.abs(summary.outflow_loss_rate_per_s / mean - 1)).toBeLessThan(5e-4);
    expect(Math.abs(summary.outflow_loss_rate_per_yr / (summary.outflow_loss_rate_per_s * 365.25 * 86400) - 1)).toBeLessThan(1e-12);
    // the screen says it, with the flag to feed it back; fed back, it is the mode's loss rate
    const hint = /--loss-rate "([^"]+)"/.exec(r.stdout);
    expect(r.stdout).toMatch(/mass outflow of the region, mean over the snapshots: [\d.]+ × 10⁻¹⁷ \/s = [\d.]+ × 10⁻⁹ \/yr/);
    // the whole periodic box keeps its mass: no rate is read from its round-off
    const whole = runPsibox(work, ["clocks", "output/spread", "--out", "whole"]);
    expect(whole.code).toBe(0);
    expect(whole.stdout).toMatch(/\n {2}N is the same at every snapshot to round-off \(\|ΔN\|\/N ≤ [\d.]+ × 10⁻¹[³⁴⁵⁶]\): no outflow to measure\n/);
    expect(whole.stdout).not.toMatch(/mass (in|out)flow/);
    const fed = runPsibox(work, [...args, "--loss-rate", hint![1]!, "--json"]);
    expect(fed.code).toBe(0);
    expect(Math.abs(JSON.parse(fed.stdout).loss_rate_per_s / summary.outflow_loss_rate_per_s - 1)).toBeLessThan(1e-3);
    // measured in-line by the run at its time-series rows: per interval, over the run, on screen and in the files
    const series = readCsv(path.join(work, "output/spread/timeseries.csv"));
    let worst = 0;
    for (let j = 1; j < series.length; j++) {
      const [ta, tb] = [Number(series[j - 1]!["t_Myr"]), Number(series[j]!["t_Myr"])].map((t) => t * 1e6 * 365.25 * 86400) as [number, number];
      const expected = -Math.log(frac(tb) / frac(ta)) / (tb - ta);
      worst = Math.max(worst, Math.abs(Number(series[j]!["outflow_loss_rate_per_s"]) / expected - 1));
    }
    expect(worst).toBeLessThan(5e-4); // measured 1.3e-4
    expect(series[0]!["outflow_loss_rate_per_s"]).toBe("NaN");
    const inline = readJson<{ outflow: Parameters<typeof outflowSentence>[0] & { loss_rate_per_s: number; loss_integral: number } }>(path.join(work, "output/spread/clocks.json")).outflow;
    expect(Math.abs(inline.loss_rate_per_s / mean - 1)).toBeLessThan(5e-4);
    expect(Math.abs(inline.loss_integral / -Math.log(frac(t1) / frac(0)) - 1)).toBeLessThan(5e-4);
    expect(readJson<{ outflow: unknown }>(path.join(work, "output/spread/summary.json")).outflow).toEqual(inline);
    expect(outflowSentence(inline)).toMatch(/^The sphere region held [\d.]+ × 10⁹⁵ particles at the first time-series row and [\d.]+ × 10⁹⁵ at the last: it lost matter at a mean rate of 9\.53 × 10⁻¹⁷ \/s/);
    expect(run.stdout).toMatch(/mass outflow of the sphere region over the run: [\d.]+ × 10⁻¹⁷ \/s = [\d.]+ × 10⁻⁹ \/yr; as a loss rate: sidecar\.loss_rate = "[\d.e-]+\/s"/);
    // the whole periodic box loses nothing (unitarity)
    const box = runPsibox(work, ["clocks", "output/spread", "--out", "box", "--json"]);
    expect(Math.abs(JSON.parse(box.stdout).outflow_loss_rate_per_s)).toBeLessThan(1e-12 / t1);
  });

  it("a region nothing crosses (a cube as large as the box): its N constant to round-off, said so instead of a rate, on screen and in the report's sentence", () => {
    writeIn(
      work,
      "whole.toml",
      `[grid]\ncells = 64\nbox = "20 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "10 Myr"\n` +
        `[initial]\nkind = "gaussian-packet"\nmass = "1e8 Msun"\nwidth = "1 kpc"\n[sidecar]\noutflow_region = "cube"\noutflow_center = ["10 kpc"]\noutflow_radius = "10 kpc"\n`,
    );
    const run = runPsibox(work, ["run", "whole.toml"]);
    expect(run.code, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/\n {2}N of the cube region is the same at the end as at the start to round-off \(\|ΔN\|\/N = [^)]+\): no outflow to measure\n/);
    const inline = readJson<{ outflow: Parameters<typeof outflowSentence>[0] }>(path.join(work, "output/whole/clocks.json")).outflow;
    expect(outflowSentence(inline)).toMatch(/^The cube region held [\d.]+ × 10⁹⁶ particles at the first time-series row and the same at the last to round-off \(\|ΔN\|\/N = [^)]+\): no matter crossed its boundary to measure\.$/);
  });
});
