/**
 * psibox analyze on a snapshot of several species: each species' mass,
 * kinetic energy and share of the potential energy in the shared potential
 * (as the run's time series has them), their totals, and each species'
 * condensate mode with the cross coefficients between modes
 * (quantum/species-modes.ts), in physical units; written as species.csv and
 * returned for summary.json's "species".
 */
import path from "node:path";
import type { Snapshot } from "../io/snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { SplitStepper } from "../integrators/split-step.js";
import type { FieldKind } from "../integrators/extra-fields.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import { speciesEnergies } from "../simulation/species-energies.js";
import { speciesModes } from "../quantum/species-modes.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { csvTable as csv } from "./csv-table.js";

const KPC_M = 1e3 * PC_M;

/** The later species' fields of a snapshot in the loaded field's code units. */
function laterFields(snap: Snapshot, field: LoadedField): Float64Array[] {
  const u = field.units;
  const toCode = Math.sqrt(M_SUN_KG / KPC_M ** 3 / (u.massKg / u.lengthM ** 3)); // as loadField converts ψ
  return (snap.speciesPsi ?? []).map((psi) => psi.map((v) => v * toCode));
}

/** Each species' energies and modes, with the totals; undefined for a snapshot of one species. */
export function speciesSummary(snap: Snapshot, field: LoadedField, outDir: string): Record<string, unknown> | undefined {
  const species = snap.meta.species;
  if (!species || species.length < 2) return undefined;
  const { grid, units, scaleFactor: a } = field;
  const ratios = species.slice(1).map((s) => s.particleMassEv / species[0]!.particleMassEv);
  const later = laterFields(snap, field);
  const kinds: FieldKind[] = ratios.map((massRatio) => ({ kind: "species", massRatio }));
  const stepper = new SplitStepper(grid, field.background, field.gravity, "js", 1, kinds);
  let energies;
  try {
    later.forEach((psi, i) => stepper.setField(i + 1, psi));
    stepper.setState(field.psi, 0);
    energies = speciesEnergies(stepper, ratios, a);
  } finally {
    stepper.close();
  }
  const particleMass = units.particleMassKg / units.massKg;
  const fields = [field.psi, ...later].map((psi, i) => ({ psi, massRatio: i === 0 ? 1 : ratios[i - 1]! }));
  const modes = speciesModes(grid, fields, a, particleMass, field.gravity);
  const msun = units.massKg / M_SUN_KG;
  const energy = units.energyJ / (M_SUN_KG * 1e6);
  const perS = 1 / units.timeS;
  const rows = species.map((s, i) => {
    const e = energies[i]!;
    const m = modes.modes[i]!;
    return { name: s.name, particle_mass_eV: s.particleMassEv, mass_Msun: e.mass * msun, kinetic: e.kinetic * energy, potential: e.potential * energy, particles_N: m.particles, omega_per_s: m.omega * perS, chi_per_s: m.chi * perS };
  });
  const sum = (key: "mass_Msun" | "kinetic" | "potential") => rows.reduce((s, r) => s + r[key], 0);
  const header = ["species", "particle_mass_eV", "mass_Msun", "kinetic_Msun_km2_s2", "potential_Msun_km2_s2", "particles_N", "omega_per_s", "chi_per_s"];
  const body = [...rows.map((r) => [r.name, r.particle_mass_eV, r.mass_Msun, r.kinetic, r.potential, r.particles_N, r.omega_per_s, r.chi_per_s]), ["total", "", sum("mass_Msun"), sum("kinetic"), sum("potential"), "", "", ""]];
  writeFileAtomic(path.join(outDir, "species.csv"), csv(header, body));
  return {
    each: rows.map(({ kinetic, potential, ...r }) => ({ ...r, energies_Msun_km2_s2: { kinetic, potential, total: kinetic + potential } })),
    total: { mass_Msun: sum("mass_Msun"), energies_Msun_km2_s2: { kinetic: sum("kinetic"), potential: sum("potential"), total: sum("kinetic") + sum("potential") } },
    cross: modes.cross.map((c) => ({ species: [species[c.i]!.name, species[c.j]!.name], chi_per_s: c.chi * perS, mutual_energy_Msun_km2_s2: c.energy * energy })),
  };
}
