// Several species ([[species]]) through the config and the run loop: two species of different particle
// mass in a static box grow at the eigen-rate of the coupled linear system, keep their masses to
// round-off and the total energy as a run of one species does; a stopped and resumed run repeats the
// uninterrupted one bit for bit (snapshots with every species: test/io/netcdf.test.ts); bad species
// lists are refused with one-line errors naming the key.
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
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
 * Linear theory of two species of particle masses m_i sharing one potential (SI):
 * δ_i'' = −(ħk²/2m_i)² δ_i + 4πG Σ_j ρ_j δ_j. The growth rate is the square root of the larger
 * eigenvalue of that 2×2 matrix, v its eigenvector (computed independently; for one species it is the
 * Jeans rate of Khlopov, Malomed & Zeldovich 1985, MNRAS 215, 575). Started at rest along v, each
 * contrast follows ε v_i cosh γt.
 */
function growingMode(k: number, rho: readonly number[], mass: readonly number[]): { gamma: number; v: [number, number] } {
  const q = mass.map((m) => ((HBAR_J_S * k * k) / (2 * m)) ** 2);
  const g = rho.map((r) => 4 * Math.PI * G_SI * r);
  const [a, b, c, d] = [g[0]! - q[0]!, g[1]!, g[0]!, g[1]! - q[1]!];
  const lambda = (a + d) / 2 + Math.sqrt(((a + d) * (a + d)) / 4 - (a * d - b * c));
  const v: [number, number] = [b, lambda - a];
  const top = Math.max(Math.abs(v[0]), Math.abs(v[1]));
  return { gamma: Math.sqrt(lambda), v: [v[0] / top, v[1] / top] };
}

describe("two species of different particle mass in a static box, through the config", () => {
  it("grow at the eigen-rate of the coupled linear system to 1% and keep each species' mass to round-off", async () => {
    const boxKpc = 8; // near the light species' Jeans length: quantum pressure sets the mode
    const rhoMsun = [5e5, 5e5];
    const massEv = [1e-22, 3e-22];
    const { gamma, v } = growingMode((2 * Math.PI) / (boxKpc * KPC), rhoMsun.map((r) => r * MSUN_KPC3), massEv.map((m) => m * KG_PER_EV));
    expect(v[0] / v[1]).toBeLessThan(0.7); // the two species grow with different contrasts
    const eps = 1e-4;
    const durationMyr = 3 / gamma / (1e6 * 365.25 * 86400);
    const run = resolved(
      "growth",
      `[grid]\ncells = 64\nbox = "${boxKpc} kpc"\n[particle]\nmass = "${massEv[0]} eV"\nname = "light"\n[span]\nduration = "${durationMyr} Myr"\n` +
        `[initial]\nkind = "plane-wave"\nmean_density = "${rhoMsun[0]} Msun/kpc^3"\ncontrast = ${eps * v[0]}\n` +
        `[[species]]\nname = "heavy"\nparticle_mass = "${massEv[1]} eV"\n[species.initial]\nkind = "plane-wave"\nmean_density = "${rhoMsun[1]} Msun/kpc^3"\ncontrast = ${eps * v[1]}\n` +
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

describe("a run of two species", () => {
  it("conserves K + W of both species together as a run of one does (1e-4 of K with a phase budget of π/8, as the one-species test)", async () => {
    const run = resolved("energy", PACKETS);
    await runIt(run);
    const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
    const num = (r: Record<string, string>, c: string) => Number(r[c]);
    const e0 = num(rows[0]!, "total_Msun_km2_s2");
    const k0 = num(rows[0]!, "kinetic_Msun_km2_s2");
    const worst = Math.max(...rows.map((r) => Math.abs(num(r, "total_Msun_km2_s2") - e0)));
    expect(worst / k0).toBeLessThan(1e-4);
    // the totals are the sums of the species' columns, and the dynamics moved energy between them
    for (const r of [rows[0]!, rows.at(-1)!]) {
      for (const q of ["mass_%_Msun", "kinetic_%_Msun_km2_s2", "potential_%_Msun_km2_s2"]) {
        const parts = num(r, q.replace("%", "main")) + num(r, q.replace("%", "heavy"));
        expect(Math.abs(parts / num(r, q.replace("_%", "")) - 1)).toBeLessThan(1e-10);
      }
    }
    expect(Math.abs(num(rows.at(-1)!, "kinetic_heavy_Msun_km2_s2") / num(rows[0]!, "kinetic_heavy_Msun_km2_s2") - 1)).toBeGreaterThan(0.05);
  });

  it("stopped and resumed repeats the uninterrupted run bit for bit, every species", async () => {
    const whole = resolved("whole", PACKETS);
    await runIt(whole);
    const parted = resolved("parted", PACKETS);
    expect((await runIt(parted, { stopAfter: 40 })).status).toBe("stopped");
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
    const run = resolved("modes", PACKETS.replace("enabled = false", "enabled = true").replace('duration = "150 Myr"', 'duration = "20 Myr"'));
    await runIt(run);
    const rows = readCsv(path.join(run.outputDir, "timeseries.csv"));
    const last = rows.at(-1)!;
    const num = (c: string) => Number(last[c]);
    expect(num("chi_main_heavy_per_s")).toBeLessThan(0);
    expect(num("particles_N_heavy")).toBeGreaterThan(0);
    const summary = (await analyzeSnapshot(path.join(run.outputDir, "snapshots", "snap_00001.h5"), path.join(work, "modes-analysis"), false)).summary;
    const species = summary["species"] as { each: { name: string; mass_Msun: number; particles_N: number; chi_per_s: number; energies_Msun_km2_s2: { kinetic: number; potential: number } }[]; total: { mass_Msun: number; energies_Msun_km2_s2: { total: number } }; cross: { species: string[]; chi_per_s: number }[] };
    expect(species.each.map((e) => e.name)).toEqual(["main", "heavy"]);
    // the same state as the run's last row: the same numbers to the time series' 12 digits
    const close = (x: number, y: number) => expect(Math.abs(x / y - 1)).toBeLessThan(1e-9);
    for (const e of species.each) {
      close(e.mass_Msun, num(`mass_${e.name}_Msun`));
      close(e.energies_Msun_km2_s2.kinetic, num(`kinetic_${e.name}_Msun_km2_s2`));
      close(e.energies_Msun_km2_s2.potential, num(`potential_${e.name}_Msun_km2_s2`));
      close(e.particles_N, num(`particles_N_${e.name}`));
      close(e.chi_per_s, num(`chi_${e.name}_per_s`));
    }
    close(species.total.mass_Msun, num("mass_Msun"));
    close(species.total.energies_Msun_km2_s2.total, num("total_Msun_km2_s2"));
    expect(species.cross[0]!.species).toEqual(["main", "heavy"]);
    close(species.cross[0]!.chi_per_s, num("chi_main_heavy_per_s"));
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
  it("the CLI prints the error on one line and exits with 2", () => {
    writeIn(work, "dup.toml", `${base}[[species]]\nname = "main"\nparticle_mass = "2e-22 eV"\n${packet}`);
    const r = runPsibox(work, ["run", "dup.toml"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/species\[0\]\.name: "main" is already the name of particle\.name/);
  });
});
