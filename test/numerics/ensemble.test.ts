// Truncated-Wigner ensembles (psibox ensemble): the vacuum noise against the single-mode closed form of the
// method (its 1/N approach to the classical solution; the closed form itself, through psibox's solver, in
// ensemble-ordering.test.ts), the ensemble's depletion against the exact Bogoliubov n_k(t) of a uniform box (the method is exact
// for quadratic dynamics), the condensate number's power method against a closed-form eigenvalue, and the
// ensemble's independence of the worker count and of a stop and continue.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { resolveEnsemble } from "../../src/config/resolve-ensemble.js";
import { runEnsemble } from "../../src/ensemble/ensemble.js";
import { addVacuumNoise } from "../../src/ensemble/noise.js";
import { leadingMode } from "../../src/ensemble/density-matrix.js";
import { gramLeadingEigenvalue, gramMatrix } from "../../src/ensemble/gram.js";
import { SeededRandom } from "../../src/math/random.js";
import { bootstrapWeights } from "../../src/ensemble/observables.js";
import { checkEnsembleModel, validityWarning } from "../../src/ensemble/guards.js";
import { ConfigError } from "../../src/core/errors.js";
import { boxDepletion, boxMode, pairDepletion } from "../helpers/bogoliubov.js";
import { runCompanion } from "../../src/app/ensemble-companion.js";
import type { EnsembleReduction } from "../../src/ensemble/reduce.js";
import type { Comparison } from "../../src/ensemble/comparison.js";
import { HBAR_J_S } from "../../src/physics/constants.js";
import { makeWork, removeWork, writeIn } from "../helpers/cli.js";

const MYR_S = 3.15576e13;

/** ⟨b⟩_TWA = α e^{iX} (1 + iX/2)^{-2} exp(−iNX/(1 + iX/2)) for a real α = √N: the Gaussian average of the classical Kerr map. */
function kerrTwaClosedForm(n: number, x: number): [number, number] {
  const mul = (a: [number, number], b: [number, number]): [number, number] => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const div = (a: [number, number], b: [number, number]): [number, number] => {
    const d = b[0] ** 2 + b[1] ** 2;
    return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
  };
  const cexp = (z: [number, number]): [number, number] => [Math.exp(z[0]) * Math.cos(z[1]), Math.exp(z[0]) * Math.sin(z[1])];
  const d: [number, number] = [1, x / 2];
  const expo = div([0, -n * x], d);
  return mul(mul([Math.sqrt(n), 0], cexp([0, x])), mul(div([1, 0], mul(d, d)), cexp(expo)));
}

/** Members of a one-cell ensemble (m = ΔV = 1: a = ψ) after the classical Kerr map β → β e^{−iX(|β|² − 1)} (the Weyl symbol's equation of motion of H = (χ/2) b†b†bb). */
function kerrMembers(n: number, x: number, members: number, seed: number): Float64Array {
  const a = new Float64Array(2 * members);
  for (let j = 0; j < members; j++) a[2 * j] = Math.sqrt(n);
  addVacuumNoise(a, 1, 1, seed, 0);
  for (let j = 0; j < members; j++) {
    const re = a[2 * j]!;
    const im = a[2 * j + 1]!;
    const phase = -x * (re * re + im * im - 1);
    a[2 * j] = re * Math.cos(phase) - im * Math.sin(phase);
    a[2 * j + 1] = re * Math.sin(phase) + im * Math.cos(phase);
  }
  return a;
}

describe("single-mode limit: the Kerr oscillator's truncated-Wigner mean", () => {
  const [n, x] = [50, 0.1];
  it("closed form at N = 50, X = 0.1 is 1.4929 + 5.2900i (computed independently); the exact quantum value 1.5184 + 5.2947i differs", () => {
    const [re, im] = kerrTwaClosedForm(n, x);
    expect(re).toBeCloseTo(1.4929, 4);
    expect(im).toBeCloseTo(5.29, 4);
  });
  it("N → large at fixed NX = 5: the ensemble mean approaches the classical N^{1/2} e^{−iNX} as 1/N (the closed form's expansion: N·|⟨b⟩/b_cl − 1| → (NX)²/2 = 12.5, computed independently)", () => {
    const s = 5;
    const departure = (nParticles: number): number => {
      const count = 1_000_000;
      const a = kerrMembers(nParticles, s / nParticles, count, 13);
      let [sr, si] = [0, 0];
      for (let j = 0; j < count; j++) (sr += a[2 * j]!), (si += a[2 * j + 1]!);
      const [cr, ci] = [Math.sqrt(nParticles) * Math.cos(s), -Math.sqrt(nParticles) * Math.sin(s)];
      return Math.hypot(sr / count - cr, si / count - ci) / Math.sqrt(nParticles);
    };
    const [d200, d800] = [departure(200), departure(800)];
    expect(Math.abs(d200 / d800 / 4 - 1)).toBeLessThan(0.05);
    expect(Math.abs(800 * d800 / 12.5 - 1)).toBeLessThan(0.05);
  });
});

describe("the condensate number's power method", () => {
  it("on the Gram matrix gives the eigenvalue of the power method on the fields, for bootstrap weights (Horn & Johnson, Thm 1.3.22: AB and BA share their nonzero eigenvalues)", () => {
    const rng = new SeededRandom(4);
    const members = Array.from({ length: 12 }, () => Float64Array.from({ length: 2 * 32 }, (_, x) => (x % 2 === 0 ? 3 : 0) + rng.normal()));
    const weights = bootstrapWeights(12, 3, 9)[2]!;
    const start = Float64Array.from({ length: 64 }, (_, x) => (x % 2 === 0 ? 1 : 0));
    const overlaps = Float64Array.from({ length: 24 }, (_, k) => (k % 2 === 0 ? 1 : 0));
    const fields = leadingMode(members, start, weights).eigenvalue;
    expect(Math.abs(gramLeadingEigenvalue(gramMatrix(members), weights, overlaps) / fields - 1)).toBeLessThan(1e-10);
  });
  it("matches the closed-form largest eigenvalue of a 2×2 Hermitian W = (a₁a₁† + a₂a₂†)/2 (textbook)", () => {
    const a1 = Float64Array.of(1, 0.5, -0.3, 2);
    const a2 = Float64Array.of(0.2, -1, 1.5, 0.1);
    const w = (p: Float64Array, q: Float64Array, i: number, k: number) => [p[2 * i]! * q[2 * k]! + p[2 * i + 1]! * q[2 * k + 1]!, p[2 * i + 1]! * q[2 * k]! - p[2 * i]! * q[2 * k + 1]!];
    const entry = (i: number, k: number) => [0, 1].map((c) => (w(a1, a1, i, k)[c]! + w(a2, a2, i, k)[c]!) / 2);
    const [w00, w11, w01] = [entry(0, 0)[0]!, entry(1, 1)[0]!, entry(0, 1)];
    const exact = (w00 + w11) / 2 + Math.sqrt(((w00 - w11) / 2) ** 2 + w01[0]! ** 2 + w01[1]! ** 2);
    const lead = leadingMode([a1, a2], Float64Array.of(1, 0, 0, 0));
    expect(Math.abs(lead.eigenvalue / exact - 1)).toBeLessThan(1e-11);
  });
});

describe("validity guard and settings", () => {
  it("warns with the numbers when N is not well above the modes, and not when it is", () => {
    expect(validityWarning(300, 64)).toMatch(/N = 300 particles is not well above the grid's 64 modes \(N\/modes = 4\.69/);
    expect(validityWarning(1e4, 64)).toBeUndefined();
  });
  it("refuses M < 2, N < 1 and a seed that is not a whole number, naming the key", () => {
    const base = loadConfig(path.resolve("configs/jeans-collapse-2d.toml"));
    const bad = (ensemble: Record<string, unknown>) => () => resolveEnsemble({ ...base, ensemble: { members: 64, particles: "physical", noise_seed: 1, samples: 16, departure: 0.1, resamples: 32, ...ensemble } } as typeof base);
    expect(bad({ members: 1 })).toThrow(ConfigError);
    expect(bad({ members: 1 })).toThrow(/ensemble\.members/);
    expect(bad({ particles: 0.5 })).toThrow(/ensemble\.particles/);
    expect(bad({ noise_seed: 2.5 })).toThrow(/ensemble\.noise_seed: must be a whole number/);
  });
});

let work: string;
beforeAll(() => (work = makeWork("ensemble")));
afterAll(() => removeWork(work));

function boxConfig(name: string, cells: number, rho: number, durationMyr: number, members: number): ReturnType<typeof resolveRun> {
  const text =
    `[grid]\ncells = ${cells}\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "${durationMyr} Myr"\n` +
    `[initial]\nkind = "plane-wave"\nmean_density = "${rho} Msun/kpc^3"\ncontrast = 0\n[output]\ntime_unit = "Myr"\n` +
    `[ensemble]\nmembers = ${members}\nparticles = 1e8\nsamples = 2\nnoise_seed = 5\n`;
  return resolveRun(loadConfig(writeIn(work, `${name}.toml`, text)), name, work);
}

describe("what the members' equations leave out", () => {
  it("refuses a second species, naming the key, instead of dropping it; a contact interaction is advanced (test/numerics/ensemble-ordering.test.ts)", () => {
    const jeans = fs.readFileSync(path.resolve("configs/jeans-collapse-2d.toml"), "utf8");
    const run = (name: string, text: string) => resolveRun(loadConfig(writeIn(work, `${name}.toml`, text)), name, work);
    const contact = run("contact", jeans.replace(/\[particle\]\n/, '[particle]\nscattering_length = "1e-80 m"\n'));
    expect(() => checkEnsembleModel(contact)).not.toThrow();
    const two = run("two", jeans + '\n[[species]]\nname = "heavy"\nparticle_mass = "4e-22 eV"\n[species.initial]\nkind = "plane-wave"\nmean_density = "1e6 Msun/kpc^3"\ncontrast = 0\n');
    expect(() => checkEnsembleModel(two)).toThrow(/^species: psibox ensemble advances one species, and the config has 2/);
    expect(() => checkEnsembleModel(run("plain", jeans))).not.toThrow();
  });
});

/**
 * Each ±k shell's occupation at the last sample against the exact Bogoliubov n_k(t) of that pair (two modes; the
 * Nyquist shell one): every shell within 4 standard errors, and the shells holding more than `significant`
 * particles resolved to 30%.
 */
function checkPairs(reduction: EnsembleReduction, rho: number, cells: number, tMyr: number, significant: number): number {
  const occupations = reduction.occupations.at(-1)!;
  let resolved = 0;
  reduction.shells.k.forEach((k, i) => {
    const j = Math.round(k / (2 * Math.PI)); // code lengths: the box side is 1
    if (j === 0) return;
    const { eps, u } = boxMode(rho, 1e-22, 10, j);
    const exact = (j === cells / 2 ? 1 : 2) * pairDepletion(eps, u, tMyr * MYR_S, HBAR_J_S);
    const n = occupations[i]!;
    expect(Math.abs(n.value - exact), `pair ${j}: ${n.value} ± ${n.error} against ${exact}`).toBeLessThan(4 * n.error);
    if (exact > significant) {
      expect(n.error).toBeLessThan(0.3 * exact);
      resolved++;
    }
  });
  return resolved;
}

/** The ensemble's N − N₀, the tangent-linear Tr V†V and the exact Σ n_k agree within their errors at the last sample. */
function checkLinearPictures(comparison: Comparison, exact: number): void {
  const end = comparison.rows.at(-1)!;
  const [e, t] = [end.depletion, end.depletionTangent];
  expect(t.error).toBeLessThan(0.35 * exact);
  expect(Math.abs(t.value - exact)).toBeLessThan(3 * t.error);
  expect(Math.abs(e.value - t.value)).toBeLessThan(3 * Math.hypot(e.error, t.error));
}

describe("uniform box, where the method is exact (quadratic dynamics): the ensemble against the exact Bogoliubov n_k(t) pair by pair and in sum, and the tangent-linear depletion", () => {
  // exact n_k(t) = (U_k/ħω_k)² sin²(ω_k t), or sinh² with γ_k for unstable pairs, ħ²ω_k² = ε_k(ε_k + 2U_k), U_k = −4πGmρ̄/k²:
  // the time-dependent Bogoliubov solution of a coherent start (Pitaevskii & Stringari 2016, Bose–Einstein Condensation and
  // Superfluidity, the Bogoliubov transformation with gn replaced by gravity's U_k; computed independently in test/helpers/bogoliubov.ts).
  // N = 1e8 keeps the dynamics of the fluctuations linear (n_k/N < 1e-3).
  it("Jeans-unstable box (2 unstable mode pairs), 250 Myr; the same numbers on 1 worker, stopped after some members, then in the companion, and continued", async () => {
    const run = boxConfig("unstable", 64, 7e6, 250, 32);
    const whole = await runEnsemble(run, { workers: 2, dir: path.join(work, "two"), companion: runCompanion });
    const end = whole.reduction!.samples[2]!;
    const exact = boxDepletion(7e6, 1e-22, 10, 64, 250 * MYR_S);
    expect(exact.unstable).toBe(4);
    expect(end.depletion.error).toBeLessThan(0.3 * exact.total);
    expect(Math.abs(end.depletion.value - exact.total)).toBeLessThan(3 * end.depletion.error);
    expect(checkPairs(whole.reduction!, 7e6, 64, 250, 50)).toBe(2);
    checkLinearPictures(whole.comparison!, exact.total);
    let done = 0;
    const stopped = await runEnsemble(run, { workers: 1, dir: path.join(work, "one"), stopRequested: () => (++done > 6 ? "stopped by the test" : undefined) });
    expect(stopped.status).toBe("stopped");
    // continued with the companion, which is itself stopped after 20 steps and then resumed from its checkpoint
    let steps = 0;
    const companionStopped = await runEnsemble(run, { workers: 1, dir: path.join(work, "one"), companion: runCompanion, stopRequested: () => (++steps > 20 ? "stopped by the test" : undefined) });
    expect(companionStopped.status).toBe("stopped");
    expect(fs.existsSync(path.join(work, "one", "companion", "checkpoint.h5"))).toBe(true);
    const continued = await runEnsemble(run, { workers: 1, dir: path.join(work, "one"), companion: runCompanion });
    expect(continued.status).toBe("completed");
    const csv = (d: string, f = "series.csv") => fs.readFileSync(path.join(d, f), "utf8");
    for (const f of ["series.csv", "occupations.csv", "comparison.csv"]) expect(csv(path.join(work, "one"), f)).toBe(csv(path.join(work, "two"), f));
  });
  it("stable box near the Jeans threshold (every mode oscillates), a quarter period of the lowest pair", async () => {
    const [rho, tMyr] = [238475.78918749382, 1283.453344850469]; // 0.9 of the lowest pair's marginal density; ωt = π/2 (computed with boxMode)
    const run = boxConfig("stable", 16, rho, tMyr, 64);
    const result = await runEnsemble(run, { workers: 2, dir: path.join(work, "stable"), companion: runCompanion });
    const end = result.reduction!.samples[2]!;
    const exact = boxDepletion(rho, 1e-22, 10, 16, tMyr * MYR_S);
    expect(exact.unstable).toBe(0);
    expect(end.depletion.error).toBeLessThan(0.3 * exact.total);
    expect(Math.abs(end.depletion.value - exact.total)).toBeLessThan(3 * end.depletion.error);
    expect(checkPairs(result.reduction!, rho, 16, tMyr, 1)).toBe(1);
    checkLinearPictures(result.comparison!, exact.total);
  });
});
