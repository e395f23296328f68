// The measured Lyapunov rate ([breakdown] tangent = true) through the run loop: a uniform static box
// (an unstable equilibrium) against the largest Jeans growth rate over the box's modes (Khlopov,
// Malomed & Zeldovich 1985, MNRAS 215, 575), a free field (no gravity: not chaotic, rate 0), a relaxed
// soliton (stable: the finite-time rate falls towards 0), and a stopped and resumed run against an
// uninterrupted one (bit for bit, with the tangent field in the checkpoint).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun, type ResolvedRun } from "../../src/config/resolve.js";
import { prepareOutputDir } from "../../src/simulation/run.js";
import { runSimulation } from "../../src/app/run.js";
import type { RunPlugin } from "../../src/simulation/plugin.js";
import { G_SI, HBAR_J_S, KG_PER_EV, M_SUN_KG, PC_M } from "../../src/physics/constants.js";
import { runStoppable } from "../helpers/runs.js";
import { makeWork, readCsv, removeWork, writeIn } from "../helpers/cli.js";
import { Grid } from "../../src/grid/grid.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { regionWeights } from "../../src/quantum/mode.js";
import { jeansWavenumber, tangentSeed } from "../../src/initial-conditions/tangent-seed.js";

const KPC = 1e3 * PC_M;
const MSUN_KPC3 = M_SUN_KG / KPC ** 3; // kg/m³ per Msun/kpc³

/** The scrambling clock in summary.json. */
interface Clock {
  readonly verdict: string;
  readonly time_s: number | null;
  readonly ln_N: number;
}

let work: string;
beforeAll(() => (work = makeWork("lyapunov")));
afterAll(() => removeWork(work));

function resolved(name: string, text: string): ResolvedRun {
  return resolveRun(loadConfig(writeIn(work, `${name}.toml`, text)), name, work);
}

const runIt = runStoppable;

/** The Jeans rates of a uniform medium of density rho [kg/m³] over the modes k = 2πj/L, j = 1 … n/2 (1/s). */
function jeansRates(rho: number, massEv: number, boxKpc: number, cells: number): number[] {
  const m = massEv * KG_PER_EV;
  return Array.from({ length: cells / 2 }, (_, i) => {
    const k = (2 * Math.PI * (i + 1)) / (boxKpc * KPC);
    const g2 = 4 * Math.PI * G_SI * rho - ((HBAR_J_S * k * k) / (2 * m)) ** 2;
    return g2 > 0 ? Math.sqrt(g2) : 0;
  });
}

describe("Lyapunov rate of the split-step map", () => {
  it("uniform static box: tends to max_k √(4πGρ̄ − (ħk²/2m)²) over the box's modes, to 1% (Khlopov, Malomed & Zeldovich 1985)", async () => {
    const rho = 7e6;
    const rates = jeansRates(rho * MSUN_KPC3, 1e-22, 10, 64);
    const top = Math.max(...rates);
    expect(rates.filter((r) => r > 0).length).toBe(2); // two unstable modes: the seed has both, the larger wins
    // 25 e-folds: round-off in the uniform reference grows by e^25 too and stays below 1e-5
    const duration = 25 / top / 3.15576e13; // Myr (Julian)
    const run = resolved(
      "uniform",
      `[grid]\ncells = 64\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "${duration} Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "${rho} Msun/kpc^3"\ncontrast = 0\n[output]\ntime_unit = "Myr"\ntimeseries_every = 20\n` +
        `[sidecar]\nenabled = false\n[breakdown]\ntangent = true\n`,
    );
    const summary = await runIt(run);
    const ly = summary["lyapunov"] as { rate_per_s: number; last_interval_rate_per_s: number; integral: number; intervals: number; scrambling_clock: Clock };
    // the scrambling clock: ln N ≈ 160 is beyond the run's 25 e-folds, projected at the rate of its second half
    const clock = ly.scrambling_clock;
    expect(clock.verdict).toBe("projected");
    const spanS = duration * 3.15576e13;
    expect(Math.abs(clock.time_s! / (spanS + (clock.ln_N - ly.integral) / top) - 1)).toBeLessThan(0.01);
    // (measured: last interval 2.7e-6 from the largest rate, the finite-time rate 0.96% below it after 25 e-folds)
    expect(ly.intervals).toBeGreaterThan(15);
    expect(Math.abs(ly.last_interval_rate_per_s / top - 1)).toBeLessThan(0.01);
    // the finite-time rate carries the seed's projection on the growing mode, ln(a₀)/T: it approaches from below
    expect(Math.abs(ly.rate_per_s / top - 1)).toBeLessThan(0.1);
    const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
    const finite = rows.map((r) => Number(r["lyapunov_rate_per_s"])).filter(Number.isFinite);
    const err = (v: number) => Math.abs(v / top - 1);
    expect(err(finite[finite.length - 1]!)).toBeLessThan(err(finite[Math.floor(finite.length / 3)]!));
    // the reference stayed uniform
    const densities = rows.map((r) => Number(r["max_density_Msun_kpc3"]));
    expect(Math.max(...densities) / rho - 1).toBeLessThan(1e-5);
  });

  it("in a region (a window on the perturbation's norm) of the uniform box: the same largest Jeans rate, to 1% (Khlopov, Malomed & Zeldovich 1985)", async () => {
    // the growing modes fill the box, so a window anywhere sees them grow at their own rate
    const rho = 7e6;
    const top = Math.max(...jeansRates(rho * MSUN_KPC3, 1e-22, 10, 64));
    const duration = 25 / top / 3.15576e13;
    const run = resolved(
      "uniform-region",
      `[grid]\ncells = 64\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "${duration} Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "${rho} Msun/kpc^3"\ncontrast = 0\n[output]\ntime_unit = "Myr"\ntimeseries_every = 50\n` +
        `[sidecar]\nenabled = false\n[breakdown]\ntangent = true\nregion = "sphere"\nregion_center = ["3 kpc"]\nregion_radius = "1.5 kpc"\n`,
    );
    const ly = (await runIt(run))["lyapunov"] as { last_interval_rate_per_s: number; region: { kind: string; center_kpc: number[]; radius_kpc: number } };
    expect(ly.region.kind).toBe("sphere");
    expect(ly.region.center_kpc[0]).toBeCloseTo(3, 9);
    expect(ly.region.radius_kpc).toBeCloseTo(1.5, 9);
    expect(Math.abs(ly.last_interval_rate_per_s / top - 1)).toBeLessThan(0.01);
  });

  it("a relaxed soliton is stable: the finite-time rate falls back towards 0, far below one per dynamical time", async () => {
    const run = resolved(
      "soliton",
      `[grid]\ncells = [16, 16]\nbox = "2.5 kpc"\ngravity = "isolated"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "400 Myr"\n` +
        `[initial]\nkind = "ground-state"\nmass = "1e9 Msun"\nguess_width = "0.3 kpc"\n[integrator]\nsafety = 0.5\n` +
        `[output]\ntime_unit = "Myr"\ntimeseries_every = 20\n[sidecar]\nenabled = false\n[breakdown]\ntangent = true\nprobes = 1\n`,
    );
    const summary = await runIt(run);
    const ly = summary["lyapunov"] as { rate_per_s: number; intervals: number; interval_s: number; scrambling_clock: Clock; depletion_time_from_rate: Clock };
    expect(ly.intervals).toBeGreaterThan(40);
    // every measured clock says never: scrambling, the rate's depletion time and the measured depletion
    expect(ly.scrambling_clock.verdict).toBe("never");
    expect(ly.depletion_time_from_rate.verdict).toBe("never");
    expect((summary["depletion"] as { depletion_clock: Clock }).depletion_clock.verdict).toBe("never");
    expect(ly.scrambling_clock.time_s).toBeNull();
    const rates = readCsv(path.join(run.outputDir, "timeseries.csv")).map((r) => Number(r["lyapunov_rate_per_s"])).filter(Number.isFinite);
    // (measured: the finite-time rate peaks at 2.6e-16/s near 95 Myr, as the seed's share of the oscillating modes
    // passes, and is −1.3e-18/s at 400 Myr; one dynamical time is 2.5e14 s, where an unstable case gives λτ ≈ 1)
    expect(ly.rate_per_s).toBeLessThan(0.25 * Math.max(...rates));
    expect(Math.abs(ly.rate_per_s) * ly.interval_s).toBeLessThan(0.05);
  });

  it("a free field (no gravity) is not chaotic: every interval's rate is 0 to round-off, and every clock says never", async () => {
    const run = resolved(
      "free",
      `[grid]\ncells = [32, 32]\nbox = "10 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "200 Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.5\nmode = [1, 2]\n[output]\ntime_unit = "Myr"\n` +
        `[breakdown]\ntangent = true\ninterval = "20 Myr"\nprobes = 1\n`,
    );
    const summary = await runIt(run);
    const ly = summary["lyapunov"] as { rate_per_s: number; integral: number; intervals: number; scrambling_clock: Clock };
    expect(ly.intervals).toBe(10);
    expect(ly.scrambling_clock.verdict).toBe("never");
    // the sidecar's gravitational estimate says never without gravity, and so does the measured depletion (V = 0)
    const estimate = (summary["clocks"] as { name: string; time_s: number | null; method: string }[]).find((c) => c.name === "classical-breakdown")!;
    expect(estimate.time_s).toBeNull();
    expect(estimate.method).toMatch(/^estimate: gravity is off/);
    const depletion = summary["depletion"] as { depleted_N: number; depletion_clock: Clock };
    expect(depletion.depletion_clock.verdict).toBe("never");
    expect(Math.abs(depletion.depleted_N)).toBeLessThan(1e-9);
    expect(Math.abs(ly.integral)).toBeLessThan(1e-10);
  });
});

describe("Lyapunov rate: the twin nonlinear run", () => {
  it("a chaotic 2D random-soliton merger: tangent-linear and twin-run rates agree to 5% (Benettin et al. 1980: both measure the same largest exponent)", async () => {
    const run = resolved(
      "merger",
      `[grid]\ncells = [32, 32]\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "400 Myr"\n` +
        `[initial]\nkind = "random-solitons"\ncount = 8\nmass = "1e10 Msun"\nseed = 3\nvelocity_dispersion = "10 km/s"\n` +
        `[output]\ntime_unit = "Myr"\ntimeseries_every = 100\n[sidecar]\nenabled = false\n[breakdown]\ntangent = true\ntwin_offset = 1e-7\n`,
    );
    const ly = (await runIt(run))["lyapunov"] as { rate_per_s: number; integral: number; intervals: number; scrambling_clock: Clock; twin: { rate_per_s: number; integral: number; ratio_to_tangent: number } };
    // chaotic: the separation grew by e^20 and more over the run (measured ∫λ dt = 35.5 over 151 intervals)
    expect(ly.integral).toBeGreaterThan(20);
    expect(ly.scrambling_clock.verdict).toBe("projected");
    // (measured: the rates agree to 2e-7, the twin's offset 1e-7 times the growth over one interval)
    expect(Math.abs(ly.twin.rate_per_s / ly.rate_per_s - 1)).toBeLessThan(0.05);
    expect(ly.twin.ratio_to_tangent).toBeCloseTo(ly.twin.rate_per_s / ly.rate_per_s, 12);
  });
});

describe("Lyapunov rate: resume", () => {
  const text =
    `[grid]\ncells = [16, 16]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "120 Myr"\n` +
    `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 1]\n[output]\ntime_unit = "Myr"\ncheckpoint_every = 7\n` +
    `[sidecar]\nenabled = false\n[breakdown]\ntangent = true\ninterval = "10 Myr"\nprobes = 1\ntwin_offset = 1e-6\n`;

  it("a stopped run resumed from its checkpoint (with the tangent, the probes and the twin in it) ends bit for bit like an uninterrupted one", async () => {
    const whole = resolved("whole", text);
    const a = await runIt(whole);
    const cut = { ...resolved("cut", text) };
    const stopped = await runIt(cut, { stopAfter: 25 });
    expect(stopped.status).toBe("stopped");
    const b = await runIt(cut, { resume: true });
    expect(b.status).toBe("completed");
    expect(b["lyapunov"]).toEqual(a["lyapunov"]);
    expect(b["depletion"]).toEqual(a["depletion"]);
    const series = (dir: string) => fs.readFileSync(path.join(dir, "timeseries.csv"), "utf8");
    expect(series(cut.outputDir)).toBe(series(whole.outputDir));
  });

  it("in a region of a free field: the growth of the perturbation's norm inside the window, which the whole box does not have (computed independently)", async () => {
    // Without gravity the tangent equation is the free Schrödinger equation: the perturbation's norm over the
    // box is conserved (rate 0), while the noise that disperses into and out of a window changes the norm
    // inside it. The test evolves the same seed itself (each mode turns by e^{−ik²t/2}, ħ/m = 1) and takes
    // ½ ln(‖w dψ(T)‖²/‖w dψ(0)‖²)/T with the same window: a rate the box-wide norm would not show.
    const run = resolved(
      "free-region",
      `[grid]\ncells = 64\nbox = "10 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "300 Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0\n[output]\ntime_unit = "Myr"\ntimeseries_every = 50\n` +
        `[sidecar]\nenabled = false\n[breakdown]\ntangent = true\nseed = 11\ninterval = "300 Myr"\nregion = "sphere"\nregion_center = ["3 kpc"]\nregion_radius = "1.5 kpc"\n`,
    );
    let grid: Grid | undefined;
    let psi0: Float64Array | undefined;
    let lengthKpc = 1;
    let timeS = 1;
    const probe: RunPlugin = {
      name: "probe",
      measures: ["field"],
      start(context) {
        grid = context.grid;
        lengthKpc = context.scales.units.lengthM / KPC;
        timeS = context.scales.units.timeS;
      },
      output(facts) {
        if (facts.kind === "row" && !psi0) psi0 = Float64Array.from(facts.psi!);
      },
    };
    prepareOutputDir(run.outputDir, true);
    const ly = (await runSimulation(run, { plugins: [probe] }))["lyapunov"] as { last_interval_rate_per_s: number; rate_per_s: number; intervals: number };
    expect(ly.intervals).toBe(1);
    const g = grid!;
    const rho = psi0![0]! ** 2 + psi0![1]! ** 2;
    const seed = tangentSeed(g, psi0!, jeansWavenumber(rho, 1), 11);
    const w = regionWeights(g, { kind: "sphere", center: [3 / lengthKpc], radius: 1.5 / lengthKpc }, psi0!).w;
    const windowed = (f: Float64Array) => f.reduce((acc, _, i) => (i % 2 === 0 ? acc + w[i / 2]! ** 2 * (f[i]! ** 2 + f[i + 1]! ** 2) : acc), 0);
    const T = (300 * 3.15576e13) / timeS;
    const evolved = Float64Array.from(seed);
    const fft = new ComplexFft(g.shape);
    fft.forward(evolved);
    const n = g.cells[0]!;
    for (let j = 0; j < n; j++) {
      const k = (2 * Math.PI * (j <= n / 2 ? j : j - n)) / g.extent[2]!;
      const [re, im] = [evolved[2 * j]!, evolved[2 * j + 1]!];
      const [c, s] = [Math.cos(-0.5 * k * k * T), Math.sin(-0.5 * k * k * T)];
      evolved[2 * j] = re * c - im * s;
      evolved[2 * j + 1] = re * s + im * c;
    }
    fft.inverse(evolved);
    const expected = (0.5 * Math.log(windowed(evolved) / windowed(seed))) / T / timeS;
    const scale = 1 / (300 * 3.15576e13);
    process.stdout.write(`free field in a sphere: rate ${ly.last_interval_rate_per_s.toExponential(4)} /s, expected ${expected.toExponential(4)} /s (1/T = ${scale.toExponential(2)})\n`);
    expect(Math.abs(expected)).toBeGreaterThan(1e-3 * scale); // the window's own answer, far from the box's 0
    expect(Math.abs(ly.last_interval_rate_per_s - expected)).toBeLessThan(1e-6 * scale);
  });
});
