// The contact term in an expanding box. In code units (ħ/m = 1, 4πG = 1, |ψ|² the comoving density ρ) the
// comoving equation is i ∂ψ/∂t = −∇²ψ/(2a²) + (φ/a)ψ + (g|ψ|²/a³)ψ with ∇²φ = ρ − ρ̄.
//
// Linear theory (computed independently, below by RK4): a density mode of comoving wavenumber k of a
// self-interacting scalar obeys δ'' + 2Hδ' = (4πGρ̄_phys − c_s²k²/a² − (ħk²/(2ma²))²) δ, c_s² = g n_phys/m,
// n_phys ∝ a⁻³ (the fluid form of the Gross–Pitaevskii equation: e.g. Pethick & Smith, "Bose–Einstein
// Condensation in Dilute Gases", for the sound speed of a condensate; the comoving Jeans equation of wave
// dark matter, Hu, Barkana & Gruzinov 2000, PRL 85, 1158; the self-interacting form e.g. Chavanis 2012,
// A&A 537, A127). In code units: δ'' + 2Hδ' = (ρ̄/a³ − gρ̄k²/a⁵ − k⁴/(4a⁴)) δ.
//
// Energy: K = ½∫|∇ψ|²/a², W = ½∫ρφ/a, U = ½g∫ρ²/a³ obey d(K + W + U)/dt + H(2K + W + 3U) = 0 (Layzer 1963,
// ApJ 138, 174, with the contact term: U ∝ a⁻³ at a fixed comoving field).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { LcdmBackground, type Background } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { evolve } from "../../src/simulation/evolve.js";
import { chooseTimestep } from "../../src/integrators/timestep.js";
import { contactEnergy, kineticEnergy, potentialEnergy } from "../../src/diagnostics/energies.js";
import { expandingTwoModeStart, fillComplex, modeAmplitude } from "../helpers/fields.js";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun, type ResolvedRun } from "../../src/config/resolve.js";
import { readSnapshot } from "../../src/io/snapshot.js";
import { loadHdf5 } from "../../src/io/h5.js";
import { fieldStats, loadField } from "../../src/simulation/from-snapshot.js";
import { HBAR_J_S, KG_PER_EV, M_SUN_KG, PC_M } from "../../src/physics/constants.js";
import { runStoppable } from "../helpers/runs.js";
import { makeWork, readCsv, removeWork, writeIn } from "../helpers/cli.js";
import { conservationDrifts, energyRows } from "../../src/report/energy-series.js";

function stepper(grid: Grid, bg: Background, g: number, psi: Float64Array, t0: number): SplitStepper {
  const s = new SplitStepper(grid, bg, makePoissonSolver(grid, "periodic"), "auto", 1, [], g);
  s.setState(psi, t0);
  return s;
}

/**
 * δ(t) of the linear equation above in Einstein–de Sitter, a = (t/t₁)^{2/3} with t₁ = 2/(3H0) and H = 2/(3t),
 * by classical RK4 in t from (δ, δ') at t0 (computed independently of psibox's background).
 */
function linearDelta(hubble0: number, rhoBar: number, g: number, k: number, t0: number, start: [number, number], t: number): number {
  const t1 = 2 / (3 * hubble0);
  const rhs = (tt: number, d: number, v: number): [number, number] => {
    const a = (tt / t1) ** (2 / 3);
    const source = rhoBar / a ** 3 - (g * rhoBar * k * k) / a ** 5 - k ** 4 / (4 * a ** 4);
    return [v, source * d - (4 / (3 * tt)) * v];
  };
  const steps = 20000;
  // uniform steps in ln t: the rates fall as t grows
  const h = Math.log(t / t0) / steps;
  let [d, v] = start;
  for (let i = 0; i < steps; i++) {
    const ta = t0 * Math.exp(i * h);
    const tb = t0 * Math.exp((i + 1) * h);
    const dt = tb - ta;
    const tm = 0.5 * (ta + tb);
    const k1 = rhs(ta, d, v);
    const k2 = rhs(tm, d + 0.5 * dt * k1[0], v + 0.5 * dt * k1[1]);
    const k3 = rhs(tm, d + 0.5 * dt * k2[0], v + 0.5 * dt * k2[1]);
    const k4 = rhs(tb, d + dt * k3[0], v + dt * k3[1]);
    d += (dt / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
    v += (dt / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
  }
  return d;
}

describe("linear growth with a repulsive contact term in an Einstein–de Sitter box", () => {
  it("follows the independent RK4 integration of the linear equation to 1%, where the contact term first halts growth", () => {
    const hubble0 = 1e4;
    const bg = new LcdmBackground({ hubble0, omegaMatter: 1, omegaRadiation: 0 });
    const grid = new Grid([64], [1]);
    const k = 2 * Math.PI;
    const rhoBar = 1.5 * hubble0 * hubble0; // 4πGρ̄ = (3/2) Ω_m H0²
    const aStart = 0.1;
    // c_s²k²/a² = gk²/a² of 4πGρ̄_phys: 2 at the start (Jeans-stable: the mode oscillates), 0.02 at a = 1
    const g = (2 * aStart * aStart) / (k * k);
    const eps = 1e-6;
    const t0 = bg.time(aStart);
    const rate = eps * bg.hubble(aStart); // δ'(t0) = εH: any start will do, the reference starts the same way
    // δ' = −∇²S/a² (continuity) ⇒ the phase S = (a²/k²) δ' cos kz
    const phaseAmp = ((aStart * aStart) / (k * k)) * rate;
    const psi = fillComplex(grid, (_x, _y, z) => {
      const amp = Math.sqrt(rhoBar * (1 + eps * Math.cos(k * z)));
      const s = phaseAmp * Math.cos(k * z);
      return [amp * Math.cos(s), amp * Math.sin(s)];
    });
    const s = stepper(grid, bg, g, psi, t0);
    const results = [0.15, 0.2, 0.5, 1].map((a) => {
      const t = bg.time(a);
      evolve(s, { safety: 0.25, maxDlnA: 0.002 }, { endTime: t, massTolerance: 1e-8, maxSteps: 1e6 });
      return { measured: modeAmplitude(grid, s.psi, 1) / eps, reference: linearDelta(hubble0, rhoBar, g, k, t0, [1, rate / eps], t) };
    });
    for (const r of results) expect(Math.abs(r.measured / r.reference - 1)).toBeLessThan(0.01);
    // the contact term matters: without it the same start grows as the CDM mode, far more
    const cold = linearDelta(hubble0, rhoBar, 0, k, t0, [1, rate / eps], bg.time(1));
    expect(results.at(-1)!.reference).toBeLessThan(0.8 * cold);
  });

  it("keeps the contact phase per step |g| n_phys Δt/ħ = |g|ρ_max Δt/a³ at πs (common practice)", () => {
    const bg = new LcdmBackground({ hubble0: 10, omegaMatter: 1, omegaRadiation: 0 });
    const grid = new Grid([16], [1]);
    const a = 0.05;
    const rho = 150;
    const s = stepper(grid, bg, 0.3, fillComplex(grid, () => [Math.sqrt(rho), 0]), bg.time(a));
    const { dt, limiter } = chooseTimestep(s, { safety: 0.25, maxDlnA: 1 });
    expect(limiter).toBe("contact");
    expect(Math.abs((0.3 * rho * dt) / a ** 3 / (0.25 * Math.PI) - 1)).toBeLessThan(1e-12);
  });
});

describe("Layzer–Irvine equation with the contact term, d(K + W + U)/dt + H(2K + W + 3U) = 0", () => {
  /** The integrated residual over ∫H|2K + W + 3U|dt of a nonlinear expanding 2D run with contact coefficient g. */
  function residual(g: number): { residual: number; uShare: number; growth: number } {
    const hubble0 = 1000;
    const bg = new LcdmBackground({ hubble0, omegaMatter: 0.3, omegaRadiation: 0 });
    const grid = new Grid([32, 32], [1, 1]);
    const rhoBar = 1.5 * 0.3 * hubble0 * hubble0;
    const aStart = 0.2;
    const psi = expandingTwoModeStart(grid, rhoBar, aStart, bg.hubble(aStart), bg.growthRate(aStart));
    const s = stepper(grid, bg, g, psi, bg.time(aStart));
    const scratch = new Float64Array(psi.length);
    const record = () => {
      const a = bg.scaleFactor(s.time);
      const field = s.psi;
      let rho2 = 0;
      for (let i = 0; i < field.length; i += 2) rho2 += (field[i]! ** 2 + field[i + 1]! ** 2) ** 2;
      return { t: s.time, a, K: kineticEnergy(grid, field, a, s.fft, scratch), W: potentialEnergy(grid, field, s.phi, a), U: contactEnergy(grid, g, rho2, a) };
    };
    const series = [record()];
    const result = evolve(s, { safety: 0.1, maxDlnA: 0.004 }, { endTime: bg.time(1), massTolerance: 1e-8, maxSteps: 1e6 }, { onStep: () => series.push(record()) });
    expect(result.status).toBe("completed");
    let sum = 0;
    let scale = 0;
    let uShare = 0;
    for (let i = 1; i < series.length; i++) {
      const [p, q] = [series[i - 1]!, series[i]!];
      const dt = q.t - p.t;
      const src = 0.5 * (bg.hubble(p.a) * (2 * p.K + p.W + 3 * p.U) + bg.hubble(q.a) * (2 * q.K + q.W + 3 * q.U));
      sum += q.K + q.W + q.U - (p.K + p.W + p.U) + src * dt;
      scale += Math.abs(src) * dt;
      uShare = Math.max(uShare, Math.abs(q.U / q.W));
    }
    return { residual: Math.abs(sum) / scale, uShare, growth: Math.abs(series.at(-1)!.W / series[0]!.W) };
  }

  it("holds in a nonlinear expanding 2D run with a repulsive term at the level of the same run without it", () => {
    const without = residual(0);
    // U reaches 0.93 of |W| (measured); the residuals measured 9.0e-6 with it and 1.05e-5 without
    const withContact = residual(1.5e-5);
    expect(withContact.uShare).toBeGreaterThan(0.1);
    expect(withContact.growth).toBeGreaterThan(1.5);
    expect(withContact.residual).toBeLessThan(Math.max(3 * without.residual, 1e-5));
    expect(withContact.residual).toBeLessThan(1e-4);
  });
});

describe("an expanding run with a contact interaction, from its config", () => {
  let work: string;
  beforeAll(async () => {
    await loadHdf5();
    work = makeWork("contact-comoving");
  });
  afterAll(() => removeWork(work));

  const CONFIG = `[grid]\ncells = 64\nbox = "1 Mpc/h"\n[particle]\nmass = "1e-23 eV"\nscattering_length = "1e-79 m"\n[background]\nkind = "lcdm"\nhubble = "67.36 km/s/Mpc"\nomega_matter = 0.3153\n[span]\nstart_redshift = 50\nend_redshift = 20\n[initial]\nkind = "plane-wave"\ncontrast = 1e-3\n[integrator]\nmax_dln_a = 0.01\n[output]\ntimeseries_every = 1\n`;
  const resolved = (name: string) => resolveRun(loadConfig(writeIn(work, `${name}.toml`, CONFIG)), name, work);
  const lastSnapshot = (run: ResolvedRun) => {
    const dir = path.join(run.outputDir, "snapshots");
    return readSnapshot(path.join(dir, fs.readdirSync(dir).sort().at(-1)!));
  };

  it("resumes bit for bit across a checkpoint that owes the closing kick, and reports U = (g/2m²)∫ρ_phys² dV_phys", async () => {
    const whole = resolved("whole");
    expect((await runStoppable(whole)).status).toBe("completed");
    const parted = resolved("parted");
    expect((await runStoppable(parted, { stopAfter: 25 })).status).toBe("stopped");
    expect((await runStoppable(parted, { resume: true })).status).toBe("completed");
    const [a, b] = [lastSnapshot(whole), lastSnapshot(parted)];
    expect(b.meta.step).toBe(a.meta.step);
    expect(Buffer.from(b.psi.buffer).equals(Buffer.from(a.psi.buffer))).toBe(true);
    // U in SI from the snapshot (computed independently of the run's code units): ρ_phys = ρ/a³,
    // dV_phys = a³ dV (the 1D total over a depth of one box side along each missing axis), g = 4πħ²a_s/m
    const KPC = 1e3 * PC_M;
    const m = 1e-23 * KG_PER_EV;
    const g = (4 * Math.PI * HBAR_J_S ** 2 * 1e-79) / m;
    const scale = a.meta.scaleFactor;
    const side = a.meta.boxSizeKpc[0]! * KPC;
    let sum = 0;
    for (let i = 0; i < a.psi.length; i += 2) sum += ((a.psi[i]! ** 2 + a.psi[i + 1]! ** 2) * (M_SUN_KG / KPC ** 3)) ** 2;
    const uSI = ((g / (2 * m * m)) * sum * (side / 64) * side * side) / scale ** 3;
    const rows = readCsv(path.join(whole.outputDir, "timeseries.csv"));
    // the time series' Layzer–Irvine residual with U (here 10⁶ |W|: the uniform field's U)
    const drifts = conservationDrifts(energyRows(rows, "t_Gyr"));
    expect(Math.max(...drifts.map((d) => Math.abs(d.energy)))).toBeLessThan(1e-3);
    const uRun = Number(rows.at(-1)!["contact_Msun_km2_s2"]) * M_SUN_KG * 1e6;
    expect(Math.abs(uRun / uSI - 1)).toBeLessThan(1e-9);
    expect(Math.abs(fieldStats(loadField(a)).contactMsunKm2S2 * M_SUN_KG * 1e6 / uSI - 1)).toBeLessThan(1e-9);
    // the snapshot carries a_s itself: without the config text a reader still gets the same U
    expect(a.meta.scatteringLengthM).toBe(1e-79);
    expect(Math.abs(fieldStats(loadField({ ...a, meta: { ...a.meta, config: "" } })).contactMsunKm2S2 * M_SUN_KG * 1e6 / uSI - 1)).toBeLessThan(1e-9);
  });

  it("gives a later species its own comoving contact term: the Layzer–Irvine residual holds with its U, and a relaxed species start is refused", async () => {
    // the first species without an interaction, a lighter second one with its own (ΔE + ∫(2K + W + 3U) d ln a summed over both)
    const species = `[[species]]\nname = "light"\nparticle_mass = "5e-24 eV"\nscattering_length = "1e-79 m"\n[species.initial]\nkind = "plane-wave"\ncontrast = 1e-3\n`;
    const config = CONFIG.replace('scattering_length = "1e-79 m"\n', "") + species;
    const run = resolveRun(loadConfig(writeIn(work, "pair.toml", config)), "pair", work);
    expect(run.species[0]!.contact?.scatteringLengthM).toBe(1e-79);
    expect((await runStoppable(run)).status).toBe("completed");
    const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
    const last = rows.at(-1)!;
    expect(Number(last["contact_light_Msun_km2_s2"])).toBeGreaterThan(0);
    expect(Number(last["contact_Msun_km2_s2"])).toBe(Number(last["contact_light_Msun_km2_s2"]));
    // U here exceeds |W| by orders (a nearly uniform field), so a missing or wrong power of a in the species' U breaks it
    const drifts = conservationDrifts(energyRows(rows, "t_Gyr"));
    expect(Math.max(...drifts.map((d) => Math.abs(d.energy)))).toBeLessThan(1e-3);
    const relaxed = config.replace('[species.initial]\nkind = "plane-wave"\ncontrast = 1e-3', '[species.initial]\nkind = "ground-state"\nmass = "1e8 Msun"');
    expect(() => resolveRun(loadConfig(writeIn(work, "relaxed.toml", relaxed)), "relaxed", work)).toThrow(/species\[0\]\.initial\.kind/);
  });
});

