// The collapse guard by dimension and for every species with an attractive contact term.
// 2D: the contact term alone collapses a field above the Townes norm. The threshold of
// i ψ_t = −½Δψ − |ψ|²ψ is ∫|Q|² of its ground state Q(r) = R(√2 r), R the Townes profile of ΔR − R + R³ = 0,
// whose ∫R² d²x = 2π × 1.8623 (Weinstein 1983, Commun. Math. Phys. 87, 567); here R is shot independently.
// 1D: the bright soliton ρ₀ sech²(x/w), w = 1/√(|g|ρ₀) in code units (ħ/m = 1), is stable at every mass, so
// the guard speaks of a soliton narrower than a cell and of finer cells, not of a critical mass.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { checkConfig, loadConfig } from "../../src/config/load.js";
import { resolveRun, type ResolvedRun } from "../../src/config/resolve.js";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { OutputScales } from "../../src/simulation/scales.js";
import { collapseProblem, collapseVerdict } from "../../src/simulation/collapse-guard.js";
import { contactCode, townesLineMassKgPerM } from "../../src/physics/contact.js";
import { HBAR_J_S, KG_PER_EV, M_SUN_KG, PC_M } from "../../src/physics/constants.js";
import { loadHdf5 } from "../../src/io/h5.js";
import { runStoppable } from "../helpers/runs.js";
import { makeWork, removeWork, writeIn } from "../helpers/cli.js";

const KPC = 1e3 * PC_M;
const M = 1e-22 * KG_PER_EV;
const AS = -1e-80;

/** ∫R² r dr of the 2D ground state of R'' + R'/r − R + R³ = 0, by shooting on R(0) with RK4 (computed independently). */
function townesMoment(): number {
  const dr = 4e-3;
  const shoot = (r0: number): { crossed: boolean; moment: number } => {
    // series start at r = dr: R ≈ R₀ + R''(0) r²/2, R' ≈ R''(0) r with R''(0) = (R₀ − R₀³)/2
    const curvature = (r0 - r0 ** 3) / 2;
    let [r, y, v] = [dr, r0 + (curvature * dr * dr) / 2, curvature * dr];
    let moment = 0;
    const f = (x: number, yy: number, vv: number): [number, number] => [vv, -vv / x + yy - yy ** 3];
    while (r < 14) {
      const k1 = f(r, y, v);
      const k2 = f(r + dr / 2, y + (dr / 2) * k1[0], v + (dr / 2) * k1[1]);
      const k3 = f(r + dr / 2, y + (dr / 2) * k2[0], v + (dr / 2) * k2[1]);
      const k4 = f(r + dr, y + dr * k3[0], v + dr * k3[1]);
      moment += y * y * r * dr;
      y += (dr / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
      v += (dr / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
      r += dr;
      if (y < 0) return { crossed: true, moment };
      if (v > 0) return { crossed: false, moment };
    }
    return { crossed: false, moment };
  };
  let [lo, hi] = [2, 2.5];
  for (let i = 0; i < 40; i++) {
    const mid = 0.5 * (lo + hi);
    if (shoot(mid).crossed) hi = mid;
    else lo = mid;
  }
  // the moment up to where the shot leaves the ground state (R is e^{−r}-small there)
  return shoot(lo).moment + (dr * dr * lo * lo) / 2;
}

const base = { particle: { mass: "1e-22 eV", scattering_length: `${AS} m` }, span: { duration: "1 Myr" } };
const resolved = (cells: number[], box: string, initial: object): ResolvedRun =>
  resolveRun(checkConfig({ ...base, grid: { cells, box, gravity: "none" }, initial }), "t", "/");

describe("the 2D Townes threshold of the contact term", () => {
  it("is 1.8623 m/(4|a_s|) per unit depth: the shot Townes moment (published 1.8623, Weinstein 1983) through the code's conversion", () => {
    const moment = townesMoment();
    expect(Math.abs(moment / 1.8623 - 1)).toBeLessThan(1e-4);
    // iħψ_t = −ħ²/(2m)Δψ − |g||ψ|²ψ with χ = ψ√(m|g|)/ħ is i χ_t = −½Δχ − |χ|²χ, whose threshold is
    // ∫|R(√2 r)|² d²x = π × moment; per unit depth the mass is m π moment ħ²/(m|g|), g = 4πħ²|a_s|/m
    const g = (4 * Math.PI * HBAR_J_S ** 2 * Math.abs(AS)) / M;
    const expected = (M * Math.PI * moment * HBAR_J_S ** 2) / (M * g);
    expect(Math.abs(townesLineMassKgPerM(AS, M) / expected - 1)).toBeLessThan(1e-4);
  });

  it("words the verdict by dimension: Townes in 2D, no critical mass in 1D, the soliton's M_max in 3D", () => {
    const depth = 0.5 * KPC;
    const limit = townesLineMassKgPerM(AS, M) * depth;
    const above = collapseVerdict(3 * limit, 2, { scatteringLengthM: AS }, M, undefined, depth);
    expect(above).toMatch(/over the depth 0\.5 kpc, .* Msun\/kpc \(mass per unit depth\), above it: the contact term alone collapses a 2D field above the Townes mass per unit depth, .* \(Λ_c = 1\.8623 m\/\(4\|a_s\|\), Weinstein 1983, .*; self-gravity lowers it further\); use less mass/);
    expect(collapseVerdict(0.3 * limit, 2, { scatteringLengthM: AS }, M, undefined, depth)).toMatch(/below it: .*so self-gravity drives the collapse, or the cells are too coarse/);
    const one = collapseVerdict(1e12 * M_SUN_KG, 1, { scatteringLengthM: AS }, M);
    expect(one).toMatch(/in 1D the attractive contact term alone does not collapse a field/);
    expect(one).not.toMatch(/M_max|largest stable/);
    expect(collapseVerdict(1.5e10 * M_SUN_KG, 3, { scatteringLengthM: AS }, M)).toMatch(/above the largest stable soliton, 4\.92 × 10⁹ Msun \(M_max = 1\.0125/);
  });
});

describe("the guard in 1D and for a later species", () => {
  /** A 1D stepper without gravity holding, in field `which`, the bright soliton ρ₀ sech²((x − L/2)/w) of width w (code lengths). */
  function soliton(run: ResolvedRun, kinds: { massRatio: number; g: number } | undefined, wCells: number) {
    const units = new OutputScales(run).units;
    const grid = new Grid(run.grid.cells, run.grid.lengths);
    const g = contactCode(AS, units);
    const fields = kinds ? [{ kind: "species" as const, massRatio: kinds.massRatio, contact: kinds.g }] : [];
    const s = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "none"), "auto", 1, fields, g);
    const h = grid.spacing[2]!;
    const w = wCells * h;
    const mu = kinds?.massRatio ?? 1;
    const rho0 = 1 / (mu * mu * Math.abs(kinds?.g ?? g) * w * w); // w² = 1/(μ²|g|ρ₀)
    const profile = new Float64Array(2 * grid.size);
    for (let i = 0; i < grid.size; i++) profile[2 * i] = Math.sqrt(rho0) / Math.cosh(((i - grid.size / 2) * h) / w);
    const flat = new Float64Array(2 * grid.size).fill(0).map((_, i) => (i % 2 === 0 ? 1e-3 : 0));
    if (kinds) s.setField(1, profile);
    s.setState(kinds ? flat : profile, 0);
    return { s, w: units.toSI(w, "length") / KPC, h: units.toSI(h, "length") / KPC };
  }

  it("names a 1D soliton narrower than a cell with its width and the cells it needs, no critical mass", () => {
    const run = resolved([64], "0.5 kpc", { kind: "plane-wave", mean_density: "1e7 Msun/kpc^3" });
    const { s, w } = soliton(run, undefined, 0.25);
    const msg = collapseProblem(s, new OutputScales(run), run)!;
    expect(msg).toMatch(/^the field collapses under its attractive self-interaction/);
    const printed = Number(/of width w = ħ\/√\(m\|g\|n_max\) = ([0-9.]+) kpc/.exec(msg)![1]);
    expect(Math.abs(printed / w - 1)).toBeLessThan(2e-3); // three significant digits
    expect(msg).toMatch(/grid\.cells of at least 512 \(Δx ≤ w\/2\)/); // 64 cells of 4w each: 2·64·4 = 512
    expect(msg).not.toMatch(/M_max|largest stable/);
    // a resolved soliton (4 cells wide) does not trip the guard
    expect(collapseProblem(soliton(run, undefined, 4).s, new OutputScales(run), run)).toBeUndefined();
  });

  it("guards a later species with its own coefficient and particle mass, and names it", () => {
    const run = resolved([64], "0.5 kpc", { kind: "plane-wave", mean_density: "1e7 Msun/kpc^3" });
    const units = new OutputScales(run).units;
    const heavy = { massRatio: 2, g: contactCode(AS, units, 2) };
    const guarded = { ...run, firstSpecies: "main", species: [{ name: "heavy", particleMassKg: 2 * M, contact: { scatteringLengthM: AS } }] };
    const { s, w } = soliton(run, heavy, 0.25);
    const msg = collapseProblem(s, new OutputScales(run), guarded)!;
    expect(msg).toMatch(/^species heavy: the field collapses/);
    const printed = Number(/= ([0-9.]+) kpc, narrower/.exec(msg)![1]);
    expect(Math.abs(printed / w - 1)).toBeLessThan(2e-3);
    // without its own interaction the species is not guarded (the main field is nearly uniform)
    expect(collapseProblem(s, new OutputScales(run), { ...guarded, species: [{ name: "heavy", particleMassKg: 2 * M }] })).toBeUndefined();
  });
});

describe("a 2D Gaussian under the contact term alone, from its config", () => {
  let work: string;
  beforeAll(async () => {
    await loadHdf5();
    work = makeWork("collapse-2d");
  });
  afterAll(() => removeWork(work));

  // Λ_c = 1.8623 m/(4|a_s|) = 1.29e11 Msun/kpc for m = 1e-22 eV, a_s = −1e-80 m: 6.47e10 Msun over a 0.5 kpc depth
  const config = (mass: string) =>
    `[grid]\ncells = [32, 32]\nbox = "0.5 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\nscattering_length = "${AS} m"\n[span]\nduration = "0.3 Myr"\n[initial]\nkind = "gaussian-packet"\nmass = "${mass}"\nwidth = "40 pc"\n[output]\ntime_unit = "Myr"\ntimeseries_every = 50\n`;

  it("collapses through the guard well above the Townes mass, and does not well below it", async () => {
    const above = resolveRun(loadConfig(writeIn(work, "above.toml", config("2e11 Msun"))), "above", work);
    const stopped = await runStoppable(above);
    expect(stopped.status).toBe("stopped");
    expect(stopped.reason).toMatch(/the field collapses under its attractive self-interaction.* Msun\/kpc \(mass per unit depth\), above it: the contact term alone collapses a 2D field above the Townes mass per unit depth, 1\.29 × 10¹¹ Msun\/kpc/);
    const below = resolveRun(loadConfig(writeIn(work, "below.toml", config("2e10 Msun"))), "below", work);
    expect((await runStoppable(below)).status).toBe("completed");
  });
});
