// The condensate's depletion from tangent-linear probes ([breakdown] probes = p): first the exact Bogoliubov
// depletion of one mode pair, n_k(t) = (U_k/ħγ_k)² sinh²(γ_k t), against an exact evolution of the pair
// Hamiltonian in its Fock space (computed independently here); then Hutchinson's estimate on a uniform
// static box against Σ_k n_k(t) over the box's modes, stable and unstable, within its own stated error.
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { prepareOutputDir } from "../../src/simulation/run.js";
import { runSimulation } from "../../src/app/run.js";
import { boxDepletion, pairDepletion } from "../helpers/bogoliubov.js";
import { makeWork, readCsv, removeWork, writeIn } from "../helpers/cli.js";

/**
 * ⟨a†a⟩(t) from the vacuum under H = (ε + U)(a†a + b†b) + U(a†b† + ab) (ħ = 1), by RK4 in the span of |n, n⟩,
 * n < levels: H|n,n⟩ = 2(ε + U)n|n,n⟩ + U(n + 1)|n+1,n+1⟩ + Un|n−1,n−1⟩.
 */
function fockDepletion(eps: number, u: number, t: number, levels = 160, steps = 3000): number {
  const re = new Float64Array(levels);
  const im = new Float64Array(levels);
  re[0] = 1;
  const h = t / steps;
  // dc/dt = −iHc
  const deriv = (cr: Float64Array, ci: Float64Array, dr: Float64Array, di: Float64Array) => {
    for (let n = 0; n < levels; n++) {
      let hr = 2 * (eps + u) * n * cr[n]!;
      let hi = 2 * (eps + u) * n * ci[n]!;
      if (n > 0) (hr += u * n * cr[n - 1]!), (hi += u * n * ci[n - 1]!);
      if (n + 1 < levels) (hr += u * (n + 1) * cr[n + 1]!), (hi += u * (n + 1) * ci[n + 1]!);
      dr[n] = hi;
      di[n] = -hr;
    }
  };
  const k = Array.from({ length: 8 }, () => new Float64Array(levels));
  const tr = new Float64Array(levels);
  const ti = new Float64Array(levels);
  for (let s = 0; s < steps; s++) {
    deriv(re, im, k[0]!, k[1]!);
    for (let n = 0; n < levels; n++) (tr[n] = re[n]! + 0.5 * h * k[0]![n]!), (ti[n] = im[n]! + 0.5 * h * k[1]![n]!);
    deriv(tr, ti, k[2]!, k[3]!);
    for (let n = 0; n < levels; n++) (tr[n] = re[n]! + 0.5 * h * k[2]![n]!), (ti[n] = im[n]! + 0.5 * h * k[3]![n]!);
    deriv(tr, ti, k[4]!, k[5]!);
    for (let n = 0; n < levels; n++) (tr[n] = re[n]! + h * k[4]![n]!), (ti[n] = im[n]! + h * k[5]![n]!);
    deriv(tr, ti, k[6]!, k[7]!);
    for (let n = 0; n < levels; n++) {
      re[n] = re[n]! + (h / 6) * (k[0]![n]! + 2 * k[2]![n]! + 2 * k[4]![n]! + k[6]![n]!);
      im[n] = im[n]! + (h / 6) * (k[1]![n]! + 2 * k[3]![n]! + 2 * k[5]![n]! + k[7]![n]!);
    }
  }
  let mean = 0;
  for (let n = 0; n < levels; n++) mean += n * (re[n]! ** 2 + im[n]! ** 2);
  return mean;
}

describe("exact Bogoliubov depletion of one mode pair", () => {
  it("check value n_k = 4.077226058 at ε = 0.3, U = −0.5, ħ = 1, t = 3 (computed independently by Fock evolution), and a stable pair", () => {
    expect(fockDepletion(0.3, -0.5, 3)).toBeCloseTo(4.077226058, 8);
    expect(pairDepletion(0.3, -0.5, 3)).toBeCloseTo(4.077226058, 9);
    // stable: ε + 2U > 0
    expect(Math.abs(pairDepletion(0.3, -0.1, 3) / fockDepletion(0.3, -0.1, 3) - 1)).toBeLessThan(1e-9);
  });
});

/** The depletion clock in summary.json. */
interface DepletionClock {
  readonly verdict: string;
  readonly time_s: number | null;
  readonly rate_per_s: number | null;
}
const MYR_S = 3.15576e13;
let work: string;
beforeAll(() => (work = makeWork("depletion")));
afterAll(() => removeWork(work));

describe("Hutchinson's estimate of the depletion on the grid", () => {
  // (measured: unstable 7.68e4 ± 1.27e4 against 5.95e4, 1.4σ; stable 0.659 ± 0.131 against 0.559, 0.8σ)
  for (const [label, rho, duration, seed] of [
    ["Jeans-unstable box (two unstable mode pairs)", 7e6, 250, 3],
    ["stable box (every mode oscillates)", 2e5, 400, 8],
  ] as const) {
    it(`matches Σ_k n_k(t) of a uniform static box within its stated error: ${label}`, async () => {
      const dir = label.startsWith("Jeans") ? "unstable" : "stable";
      const text =
        `[grid]\ncells = 64\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "${duration} Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "${rho} Msun/kpc^3"\ncontrast = 0\n[output]\ntime_unit = "Myr"\ntimeseries_every = 50\n` +
        `[sidecar]\nenabled = false\n[breakdown]\nprobes = 16\nseed = ${seed}\n`;
      const run = resolveRun(loadConfig(writeIn(work, `${dir}.toml`, text)), dir, work);
      prepareOutputDir(run.outputDir, true);
      const summary = await runSimulation(run);
      const d = summary["depletion"] as { depleted_N: number; depleted_N_error: number; probes: number; particles_N: number; depletion_clock: DepletionClock };
      const exact = boxDepletion(rho, 1e-22, 10, 64, duration * MYR_S);
      expect(exact.unstable).toBe(dir === "unstable" ? 4 : 0);
      expect(d.depleted_N_error).toBeLessThan(0.5 * exact.total); // a meaningful error bar
      expect(Math.abs(d.depleted_N - exact.total)).toBeLessThan(3 * d.depleted_N_error);
      const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
      expect(Number(rows[0]!["depleted_N"])).toBe(0); // no depletion at the start
      // the depletion clock (N_dep = 0.1 N, N ≈ 1e96: far beyond the run): projected at the growth rate of the
      // unstable pairs' sinh², 2γ_max, for the unstable box; never for the stable one, whose depletion oscillates
      const clock = d.depletion_clock;
      if (dir === "stable") expect(clock.verdict).toBe("never");
      else {
        expect(clock.verdict).toBe("projected");
        expect(Math.abs(clock.rate_per_s! / (2 * exact.growth) - 1)).toBeLessThan(0.05);
        const projected = duration * MYR_S + Math.log((0.1 * d.particles_N) / d.depleted_N) / clock.rate_per_s!;
        expect(Math.abs(clock.time_s! / projected - 1)).toBeLessThan(1e-9);
      }
    });
  }
});
