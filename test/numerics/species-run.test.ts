// Several species ([[species]]) through the config and the run loop: two species of different particle
// mass in a static box grow at the eigen-rate of the coupled linear system, keep their masses to
// round-off and the total energy as a run of one species does; a stopped and resumed run repeats the
// uninterrupted one bit for bit (snapshots with every species: test/io/netcdf.test.ts); bad species
// lists are refused with one-line errors naming the key.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun, type ResolvedRun } from "../../src/config/resolve.js";
import { readSnapshot } from "../../src/io/snapshot.js";
import { prepareOutputDir } from "../../src/simulation/run.js";
import { runSimulation } from "../../src/app/run.js";
import { analyzeSnapshot } from "../../src/report/analyze.js";
import { loadHdf5 } from "../../src/io/h5.js";
import { ConfigError } from "../../src/core/errors.js";
import { G_SI, HBAR_J_S, KG_PER_EV, M_SUN_KG, PC_M } from "../../src/physics/constants.js";
import { runStoppable } from "../helpers/runs.js";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { makeBackground } from "../../src/physics/cosmology/background.js";
import { contactCode } from "../../src/physics/contact.js";
import { CodeUnits } from "../../src/physics/units.js";
import { buildInitialField } from "../../src/initial-conditions/build.js";
import { speciesInitialField } from "../../src/simulation/species-start.js";
import { speciesMassProblem } from "../../src/simulation/guards.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { inspectCommand } from "../../src/cli/inspect-command.js";
import { makeWork, readCsv, removeWork, runPsibox, writeIn } from "../helpers/cli.js";

const KPC = 1e3 * PC_M;
const MSUN_KPC3 = M_SUN_KG / KPC ** 3;

let work: string;
beforeAll(async () => {
  await loadHdf5();
  work = makeWork("species");
});
afterAll(() => removeWork(work));

function resolved(name: string, text: string): ResolvedRun {
  return resolveRun(loadConfig(writeIn(work, `${name}.toml`, text)), name, work);
}

const runIt = runStoppable;

const snap = (run: ResolvedRun, i: number) => readSnapshot(path.join(run.outputDir, "snapshots", `snap_${String(i).padStart(5, "0")}.h5`));

/** 2 Re of the density's Fourier mode 1 along x over its mean (the contrast ε of 1 + ε cos kx), 1D. */
function contrast(psi: Float64Array): number {
  const n = psi.length / 2;
  let sum = 0;
  let mode = 0;
  for (let i = 0; i < n; i++) {
    const rho = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
    sum += rho;
    mode += rho * Math.cos((2 * Math.PI * i) / n);
  }
  return (2 * mode) / sum;
}

/**
 * Linear theory of two species of particle masses m_i sharing one potential, each with its own contact
 * term of scattering length a_i (SI): δ_i'' = −[(ħk²/2m_i)² + (g_i n_i/m_i)k²] δ_i + 4πG Σ_j ρ_j δ_j with
 * g_i = 4πħ²a_i/m_i and n_i = ρ_i/m_i. The growth rate is the square root of the larger eigenvalue of
 * that 2×2 matrix, v its eigenvector (computed independently; for one species it is the Bogoliubov
 * sound speed g n/m of Pethick & Smith, Bose–Einstein Condensation in Dilute Gases, plus the Jeans term
 * of Khlopov, Malomed & Zeldovich 1985, MNRAS 215, 575). Started at rest along v, each contrast follows
 * ε v_i cosh γt.
 */
function growingMode(k: number, rho: readonly number[], mass: readonly number[], scattering: readonly number[] = [0, 0]): { gamma: number; v: [number, number] } {
  const q = mass.map((m, i) => ((HBAR_J_S * k * k) / (2 * m)) ** 2 + (4 * Math.PI * HBAR_J_S ** 2 * scattering[i]! * rho[i]! * k * k) / m ** 3);
  const g = rho.map((r) => 4 * Math.PI * G_SI * r);
  const [a, b, c, d] = [g[0]! - q[0]!, g[1]!, g[0]!, g[1]! - q[1]!];
  const lambda = (a + d) / 2 + Math.sqrt(((a + d) * (a + d)) / 4 - (a * d - b * c));
  const v: [number, number] = [b, lambda - a];
  const top = Math.max(Math.abs(v[0]), Math.abs(v[1]));
  return { gamma: Math.sqrt(lambda), v: [v[0] / top, v[1] / top] };
}

describe("two species of different particle mass in a static box, through the config", () => {
  it("each with its own contact term (light repulsive, heavy attractive) grow at the eigen-rate of the coupled linear system to 1% and keep each species' mass to round-off", async () => {
    const boxKpc = 8; // near the light species' Jeans length: quantum pressure sets the mode
    const rhoMsun = [5e5, 5e5];
    const massEv = [1e-22, 3e-22];
    // contact terms (g_i n_i/m_i)k² of +0.38 and −0.42 of 4πGρ_i: the rate is 8.9% above gravity's alone
    const scattering = [2e-77, -6e-76];
    const args = [(2 * Math.PI) / (boxKpc * KPC), rhoMsun.map((r) => r * MSUN_KPC3), massEv.map((m) => m * KG_PER_EV)] as const;
    const { gamma, v } = growingMode(...args, scattering);
    expect(gamma / growingMode(...args).gamma - 1).toBeGreaterThan(0.08); // the contact terms matter
    expect(v[0] / v[1]).toBeLessThan(0.7); // the two species grow with different contrasts
    const eps = 1e-4;
    const durationMyr = 3 / gamma / (1e6 * 365.25 * 86400);
    const run = resolved(
      "growth",
      `[grid]\ncells = 64\nbox = "${boxKpc} kpc"\n[particle]\nmass = "${massEv[0]} eV"\nname = "light"\nscattering_length = "${scattering[0]} m"\n[span]\nduration = "${durationMyr} Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "${rhoMsun[0]} Msun/kpc^3"\ncontrast = ${eps * v[0]}\n` +
        `[[species]]\nname = "heavy"\nparticle_mass = "${massEv[1]} eV"\nscattering_length = "${scattering[1]} m"\n[species.initial]\nkind = "plane-wave"\nmean_density = "${rhoMsun[1]} Msun/kpc^3"\ncontrast = ${eps * v[1]}\n` +
        `[integrator]\nsafety = 0.1\n[sidecar]\nenabled = false\n`,
    );
    const summary = await runIt(run);
    expect(summary.status).toBe("completed");
    const [first, last] = [snap(run, 0), snap(run, 1)];
    expect(last.meta.species?.map((s) => s.name)).toEqual(["light", "heavy"]);
    const t = durationMyr * 1e6 * 365.25 * 86400;
    const fields = (s: typeof first) => [s.psi, s.speciesPsi![0]!];
    fields(last).forEach((psi, i) => {
      const ratio = contrast(psi) / contrast(fields(first)[i]!);
      expect(Math.abs(Math.acosh(ratio) / t / gamma - 1)).toBeLessThan(0.01);
    });
    first.meta.species!.forEach((s, i) => expect(Math.abs(last.meta.species![i]!.massMsun / s.massMsun - 1)).toBeLessThan(1e-12));
  });
});

/** Two packets of different particle mass, one moving, falling together in a periodic 1D box. */
const PACKETS =
  `[grid]\ncells = 128\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "150 Myr"\n` +
  `[initial]\nkind = "gaussian-packet"\nmass = "2e9 Msun"\nwidth = "1.5 kpc"\ncenter = ["8 kpc"]\n` +
  `[[species]]\nname = "heavy"\nparticle_mass = "3e-22 eV"\n[species.initial]\nkind = "gaussian-packet"\nmass = "1e9 Msun"\nwidth = "1 kpc"\ncenter = ["12 kpc"]\nvelocity = ["20 km/s"]\n` +
  `[integrator]\nsafety = 0.0625\n[sidecar]\nenabled = false\n[output]\nsnapshot_every = 100000\n`;

/** The same packets, each species with its own contact term: the light one attractive, the heavy one repulsive. */
const CONTACT_PACKETS = PACKETS.replace('mass = "1e-22 eV"\n', 'mass = "1e-22 eV"\nscattering_length = "-4e-77 m"\n').replace('particle_mass = "3e-22 eV"\n', 'particle_mass = "3e-22 eV"\nscattering_length = "4e-75 m"\n');

describe("a run of two species", () => {
  it.each([
    ["gravity alone", PACKETS, false],
    ["each species with its own contact term", CONTACT_PACKETS, true],
  ])("conserves K + W (+ U) of both species together as a run of one does (1e-4 of K with a phase budget of π/8, as the one-species test): %s", async (_, text, contact) => {
    const run = resolved(contact ? "energy-contact" : "energy", text);
    await runIt(run);
    const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
    const num = (r: Record<string, string>, c: string) => Number(r[c]);
    const e0 = num(rows[0]!, "total_Msun_km2_s2");
    const k0 = num(rows[0]!, "kinetic_Msun_km2_s2");
    const worst = Math.max(...rows.map((r) => Math.abs(num(r, "total_Msun_km2_s2") - e0)));
    expect(worst / k0).toBeLessThan(1e-4);
    // the totals are the sums of the species' columns, and the dynamics moved energy between them
    const columns = ["mass_%_Msun", "kinetic_%_Msun_km2_s2", "potential_%_Msun_km2_s2", ...(contact ? ["contact_%_Msun_km2_s2"] : [])];
    for (const r of [rows[0]!, rows.at(-1)!]) {
      for (const q of columns) {
        const parts = num(r, q.replace("%", "main")) + num(r, q.replace("%", "heavy"));
        expect(Math.abs(parts / num(r, q.replace("_%", "")) - 1)).toBeLessThan(1e-10);
      }
    }
    expect(Math.abs(num(rows.at(-1)!, "kinetic_heavy_Msun_km2_s2") / num(rows[0]!, "kinetic_heavy_Msun_km2_s2") - 1)).toBeGreaterThan(0.05);
    // every species' mass to round-off (unitarity of each species' step)
    for (const name of ["main", "heavy"]) {
      const m0 = num(rows[0]!, `mass_${name}_Msun`);
      expect(Math.max(...rows.map((r) => Math.abs(num(r, `mass_${name}_Msun`) / m0 - 1)))).toBeLessThan(1e-12);
    }
    if (!contact) return expect(rows[0]!["contact_Msun_km2_s2"]).toBeUndefined();
    // each species' own contact energy at the start against the closed form of a Gaussian packet of mass M and
    // width σ in a 1D box of depth D (the first side): U = (g/2)∫n² = √π ħ² a M² / (σ D² m³) (computed independently),
    // −0.26 K and +0.35 K here; the dynamics then move energy in and out of them
    const packets = [
      { name: "main", a: -4e-77, M: 2e9, sigma: 1.5, m: 1e-22 },
      { name: "heavy", a: 4e-75, M: 1e9, sigma: 1, m: 3e-22 },
    ];
    for (const p of packets) {
      const u = (Math.sqrt(Math.PI) * HBAR_J_S ** 2 * p.a * (p.M * M_SUN_KG) ** 2) / (p.sigma * KPC * (20 * KPC) ** 2 * (p.m * KG_PER_EV) ** 3) / (M_SUN_KG * 1e6);
      expect(Math.abs(num(rows[0]!, `contact_${p.name}_Msun_km2_s2`) / u - 1)).toBeLessThan(1e-9);
      expect(Math.abs(num(rows.at(-1)!, `contact_${p.name}_Msun_km2_s2`) / u - 1)).toBeGreaterThan(0.1);
    }
    expect(num(rows[0]!, "contact_main_Msun_km2_s2") / k0).toBeLessThan(-0.2);
  });

  it("stopped and resumed repeats the uninterrupted run bit for bit, every species (each with its own contact term)", async () => {
    const whole = resolved("whole", CONTACT_PACKETS);
    await runIt(whole);
    const parted = resolved("parted", CONTACT_PACKETS);
    expect((await runIt(parted, { stopAfter: 40 })).status).toBe("stopped");
    // a changed interaction of a species is changed physics: resume refuses it, as it refuses any edit beyond [span]
    const config = path.join(parted.outputDir, "config.toml");
    const text = fs.readFileSync(config, "utf8");
    const edited = text.replace('scattering_length = "4e-75 m"', 'scattering_length = "5e-75 m"');
    expect(edited).not.toBe(text);
    fs.writeFileSync(config, edited);
    await expect(runIt(parted, { resume: true })).rejects.toThrow(/config_sha256 does not match the folder's config\.toml/);
    fs.writeFileSync(config, text);
    // the checkpoint keeps the later species' start masses for the mass guard: the mass it holds, to round-off
    const kept = readSnapshot(path.join(parted.outputDir, "checkpoint.h5"), true).state!;
    const heavy = kept.fieldsCode![0]!.reduce((s, v) => s + v * v, 0) * (20 / 128 / (parted.lengthUnitM / KPC)) * (20 / (parted.lengthUnitM / KPC)) ** 2;
    expect(Math.abs(kept.speciesMass0Code![0]! / heavy - 1)).toBeLessThan(1e-12);
    expect((await runIt(parted, { resume: true })).status).toBe("completed");
    const [a, b] = [snap(whole, 1), snap(parted, 1)]; // the resumed run's end replaces the stop's snapshot
    expect(b.meta.step).toBe(a.meta.step);
    expect(Buffer.from(b.psi.buffer).equals(Buffer.from(a.psi.buffer))).toBe(true);
    expect(Buffer.from(b.speciesPsi![0]!.buffer).equals(Buffer.from(a.speciesPsi![0]!.buffer))).toBe(true);
  });
});

describe("a run started from a snapshot of several species", () => {
  it("takes each species' field from the file's species of the same name", async () => {
    const source = resolved("source", PACKETS.replace('duration = "150 Myr"', 'duration = "5 Myr"'));
    await runIt(source);
    const file = path.join(source.outputDir, "snapshots", "snap_00001.h5").split(path.sep).join("/");
    const grid = PACKETS.slice(0, PACKETS.indexOf("[initial]"));
    const text = `${grid}[initial]\nkind = "snapshot"\nfile = "${file}"\n[[species]]\nname = "heavy"\nparticle_mass = "3e-22 eV"\n[species.initial]\nkind = "snapshot"\nfile = "${file}"\n[sidecar]\nenabled = false\n`;
    const run = resolved("from", text);
    prepareOutputDir(run.outputDir, true);
    await runSimulation(run, { initialOnly: true });
    const [a, b] = [readSnapshot(file), snap(run, 0)];
    const worst = (x: Float64Array, y: Float64Array) => x.reduce((w, v, i) => Math.max(w, Math.abs(v - y[i]!)), 0) / y.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
    expect(worst(b.psi, a.psi)).toBeLessThan(1e-14);
    expect(worst(b.speciesPsi![0]!, a.speciesPsi![0]!)).toBeLessThan(1e-14);
  });
});

describe("the species' modes and analyze", () => {
  it("give each species' mode and the cross coefficient in the time series, and analyze the same of the last snapshot with the totals", async () => {
    const run = resolved("modes", CONTACT_PACKETS.replace("enabled = false", "enabled = true").replace('duration = "150 Myr"', 'duration = "20 Myr"'));
    await runIt(run);
    const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
    const last = rows.at(-1)!;
    const num = (c: string) => Number(last[c]);
    expect(num("chi_main_heavy_per_s")).toBeLessThan(0);
    expect(num("particles_N_heavy")).toBeGreaterThan(0);
    const summary = (await analyzeSnapshot(path.join(run.outputDir, "snapshots", "snap_00001.h5"), path.join(work, "modes-analysis"), false)).summary;
    type Each = { name: string; mass_Msun: number; particles_N: number; chi_per_s: number; chi_contact_per_s: number; energies_Msun_km2_s2: { kinetic: number; potential: number; contact: number } };
    const species = summary["species"] as { each: Each[]; total: { mass_Msun: number; energies_Msun_km2_s2: { total: number; contact: number } }; cross: { species: string[]; chi_per_s: number }[] };
    expect(species.each.map((e) => e.name)).toEqual(["main", "heavy"]);
    // the same state as the run's last row: the same numbers to the time series' 12 digits
    const close = (x: number, y: number) => expect(Math.abs(x / y - 1)).toBeLessThan(1e-9);
    for (const e of species.each) {
      close(e.mass_Msun, num(`mass_${e.name}_Msun`));
      close(e.energies_Msun_km2_s2.kinetic, num(`kinetic_${e.name}_Msun_km2_s2`));
      close(e.energies_Msun_km2_s2.potential, num(`potential_${e.name}_Msun_km2_s2`));
      close(e.particles_N, num(`particles_N_${e.name}`));
      close(e.chi_per_s, num(`chi_${e.name}_per_s`));
      // each species' own contact energy and its mode's contact part, ħχ_SI,i = 2U_i/N_i², beside the gravitational part
      close(e.energies_Msun_km2_s2.contact, num(`contact_${e.name}_Msun_km2_s2`));
      close(e.chi_contact_per_s, num(`chi_contact_${e.name}_per_s`));
      close(num(`chi_gravity_${e.name}_per_s`) + num(`chi_contact_${e.name}_per_s`), num(`chi_${e.name}_per_s`));
      const u = e.energies_Msun_km2_s2.contact * M_SUN_KG * 1e6;
      close(e.chi_contact_per_s, (2 * u) / (e.particles_N ** 2 * HBAR_J_S));
    }
    expect(num("chi_contact_main_per_s")).toBeLessThan(0);
    expect(num("chi_contact_heavy_per_s")).toBeGreaterThan(0);
    close(species.total.energies_Msun_km2_s2.contact, num("contact_Msun_km2_s2"));
    close(species.total.mass_Msun, num("mass_Msun"));
    close(species.total.energies_Msun_km2_s2.total, num("total_Msun_km2_s2"));
    expect(species.cross[0]!.species).toEqual(["main", "heavy"]);
    // psibox inspect names each species with its particle mass, mass and own interaction
    const printed: string[] = [];
    const spy = vi.spyOn(process.stdout, "write").mockImplementation((chunk) => (printed.push(String(chunk)), true));
    try {
      await inspectCommand(path.join(run.outputDir, "snapshots", "snap_00001.h5"), false);
    } finally {
      spy.mockRestore();
    }
    const lines = printed.join("").split("\n");
    expect(lines.find((l) => l.startsWith("species 1: main"))).toMatch(/m = 1 × 10⁻²² eV, 2 × 10⁹ Msun, a_s = −4 × 10⁻⁷⁷ m$/);
    expect(lines.find((l) => l.startsWith("species 2: heavy"))).toMatch(/m = 3 × 10⁻²² eV, 1 × 10⁹ Msun, a_s = 4 × 10⁻⁷⁵ m$/);
    close(species.cross[0]!.chi_per_s, num("chi_main_heavy_per_s"));
  });
});

describe("a later species' ground state", () => {
  // the same particle (3e-22 eV, a_s > 0) relaxed as a run's first species, whose contact ground state is checked
  // against shooting the stationary equations in contact-ground-state.test.ts (computed independently)
  const body = (first: string, initial: string, later: string) =>
    `[grid]\ncells = 64\nbox = "40 kpc"\n[particle]\n${first}[span]\nduration = "1 Myr"\n[initial]\n${initial}${later}[sidecar]\nenabled = false\n`;
  const ground = 'kind = "ground-state"\nmass = "2e9 Msun"\nguess_width = "2 kpc"\n';
  const packet = 'kind = "gaussian-packet"\nmass = "1e8 Msun"\nwidth = "1 kpc"\n';
  const asSpecies = (a: string) => body('mass = "1e-22 eV"\n', packet, `[[species]]\nname = "b"\nparticle_mass = "3e-22 eV"\n${a}[species.initial]\n${ground}`);
  /** A field's density over its total (the profile, free of units). */
  const profile = (psi: Float64Array) => {
    const rho = Float64Array.from({ length: psi.length / 2 }, (_, p) => psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2);
    const total = rho.reduce((x, y) => x + y, 0);
    return rho.map((r) => r / total);
  };
  const laterField = (run: ResolvedRun) => {
    const grid = new Grid(run.grid.cells, run.grid.lengths);
    return speciesInitialField(run, run.species[0]!, 0, grid, makePoissonSolver(grid, run.grid.gravity, run.grid.poisson)).psi;
  };
  it("relaxes with its own contact term: the profile of the same particle relaxed as a run's first species (1e-9), wider than without", () => {
    const a = 'scattering_length = "1e-75 m"\n';
    const first = resolved("gs-first", body(`mass = "3e-22 eV"\n${a}`, ground, ""));
    const grid = new Grid(first.grid.cells, first.grid.lengths);
    const gravity = makePoissonSolver(grid, first.grid.gravity, first.grid.poisson);
    const contact = contactCode(first.contact!.scatteringLengthM, new CodeUnits(first.particleMassKg, first.lengthUnitM));
    const reference = profile(buildInitialField(first.initial as Exclude<ResolvedRun["initial"], { kind: "snapshot" }>, grid, makeBackground(first.background), first.span.startTime, gravity, undefined, undefined, contact).psi);
    const differs = (x: Float64Array, y: Float64Array) => x.reduce((w, v, i) => Math.max(w, Math.abs(v - y[i]!)), 0) / Math.max(...y);
    expect(differs(profile(laterField(resolved("gs-later", asSpecies(a)))), reference)).toBeLessThan(1e-9);
    const plain = profile(laterField(resolved("gs-plain", asSpecies(""))));
    expect(differs(plain, reference)).toBeGreaterThan(0.05);
    expect(Math.max(...plain)).toBeGreaterThan(Math.max(...reference)); // the repulsion widens it
  });
});

describe("the mass guard of every species", () => {
  it("names a later species whose mass drifted beyond the tolerance or whose field is not finite, and passes a kept mass", () => {
    const grid = new Grid([16], [1]);
    const stepper = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic", "spectral"), "js", 1, [{ kind: "species", massRatio: 2 }]);
    try {
      const field = Float64Array.from({ length: 32 }, (_, i) => 1 + 0.1 * Math.sin(i));
      stepper.setField(1, field);
      const mass0 = [stepper.fieldMass(1)];
      expect(speciesMassProblem(stepper, ["heavy"], mass0, 1e-8)).toBeUndefined();
      stepper.setField(1, field.map((v) => v * (1 + 1e-6))); // a drift of 2e-6
      expect(speciesMassProblem(stepper, ["heavy"], mass0, 1e-8)).toMatch(/^the mass of the species heavy changed by 2\.00e-6 \(tolerance 1\.0e-8\)/);
      stepper.setField(1, field.map((v, i) => (i === 3 ? Number.NaN : v)));
      expect(speciesMassProblem(stepper, ["heavy"], mass0, 1e-8)).toBe("the field of the species heavy became non-finite");
    } finally {
      stepper.close();
    }
  });
});

describe("bad species lists", () => {
  const base = `[grid]\ncells = 16\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n[initial]\nkind = "gaussian-packet"\nmass = "1e9 Msun"\nwidth = "1 kpc"\n`;
  const packet = `[species.initial]\nkind = "gaussian-packet"\nmass = "1e9 Msun"\nwidth = "1 kpc"\n`;
  const refused = (text: string): ConfigError => {
    try {
      resolved("bad", text);
    } catch (e) {
      if (e instanceof ConfigError) return e;
      throw e;
    }
    throw new Error("accepted");
  };
  it("refuse a name given twice, naming the key", () => {
    const twice = `[[species]]\nname = "b"\nparticle_mass = "2e-22 eV"\n${packet}[[species]]\nname = "b"\nparticle_mass = "3e-22 eV"\n${packet}`;
    expect(refused(base + twice).message).toBe('species[1].name: "b" is already the name of species[0].name; each species needs its own name');
    const first = `[[species]]\nname = "main"\nparticle_mass = "2e-22 eV"\n${packet}`;
    expect(refused(base + first).key).toBe("species[0].name");
  });
  it("refuse a species with no initial field and errors inside one, naming the key", () => {
    expect(refused(`${base}[[species]]\nname = "b"\nparticle_mass = "2e-22 eV"\n`).key).toBe("species[0].initial");
    const negative = `[[species]]\nname = "b"\nparticle_mass = "2e-22 eV"\n${packet.replace('"1e9 Msun"', '"-1e9 Msun"')}`;
    expect(refused(base + negative).message).toMatch(/^species\[0\]\.initial\.mass: must be positive/);
  });
  it("refuse a species' contact interaction given twice, and a decay constant that is not an energy, naming the species' key", () => {
    const sp = (keys: string) => `[[species]]\nname = "b"\nparticle_mass = "2e-22 eV"\n${keys}${packet}`;
    const both = refused(base + sp('scattering_length = "1e-80 m"\ndecay_constant = "1e17 GeV"\n'));
    expect(both.message).toBe("species[0].decay_constant: give either species[0].scattering_length or species[0].decay_constant, not both (a decay constant fixes the scattering length)");
    expect(refused(base + sp('decay_constant = "1e-30 m"\n')).key).toBe("species[0].decay_constant");
    const lcdm = base.replace("[initial]", '[background]\nkind = "lcdm"\n[initial]').replace('duration = "1 Myr"', 'start_redshift = 10\nend_redshift = 9');
    // an expanding box takes it (the comoving form), but not with a relaxed start
    expect(resolved("lcdm", lcdm + sp('scattering_length = "-1e-80 m"\n')).species[0]!.contact?.scatteringLengthM).toBe(-1e-80);
  });
  it("refuse a species' ground state above its own largest stable mass, naming its initial mass key and its interaction's key", () => {
    // M_max = 1.0125 ħ/√(G m |a_s|) (Chavanis & Delfini 2011): 2.0e8 Msun for m = 2e-22 eV and a_s = −3e-78 m
    const text = base.replace("cells = 16", "cells = [16, 16, 16]").replace('box = "20 kpc"', 'box = ["20 kpc", "20 kpc", "20 kpc"]');
    const sp = (mass: string) => `[[species]]\nname = "b"\nparticle_mass = "2e-22 eV"\nscattering_length = "-3e-78 m"\n[species.initial]\nkind = "ground-state"\nmass = "${mass}"\n`;
    const e = refused(text + sp("3e8 Msun"));
    expect(e.key).toBe("species[0].initial.mass");
    expect(e.message).toMatch(/above the largest stable soliton, 2\.0\d* × 10⁸ Msun .*\|species\[0\]\.scattering_length\| below/);
    expect(resolved("good", text + sp("1e8 Msun")).species[0]!.contact?.scatteringLengthM).toBe(-3e-78);
  });
  it("the CLI prints the error on one line and exits with 2", () => {
    writeIn(work, "dup.toml", `${base}[[species]]\nname = "main"\nparticle_mass = "2e-22 eV"\n${packet}`);
    const r = runPsibox(work, ["run", "dup.toml"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/species\[0\]\.name: "main" is already the name of particle\.name/);
  });
});
