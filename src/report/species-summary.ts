/**
 * psibox analyze on a snapshot of several species: each species' mass,
 * kinetic energy, share of the potential energy in the shared potential and
 * own contact energy (as the run's time series has them), their totals, and
 * each species' condensate mode (with its contact part) and the cross
 * coefficients between modes (quantum/species-modes.ts), in physical units;
 * written as species.csv and returned for summary.json's "species".
 */
import path from "node:path";
import type { Snapshot, SpeciesMeta } from "../io/snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { SplitStepper } from "../integrators/split-step.js";
import type { FieldKind } from "../integrators/extra-fields.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import { speciesEnergies, type SpeciesEnergy } from "../simulation/species-energies.js";
import { speciesModes, type SpeciesModes } from "../quantum/species-modes.js";
import { contactCode } from "../physics/contact.js";
import type { CodeUnits } from "../physics/units.js";
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
  // each species' own contact coefficient: the first's from the run's config, the later ones' from the file's scattering lengths
  const contacts = [field.contact, ...species.slice(1).map((s, i) => (s.scatteringLengthM ? contactCode(s.scatteringLengthM, units, ratios[i]!) : 0))];
  const kinds: FieldKind[] = ratios.map((massRatio, i) => ({ kind: "species", massRatio, contact: contacts[i + 1]! }));
  const stepper = new SplitStepper(grid, field.background, field.gravity, "js", 1, kinds, field.contact);
  let energies;
  try {
    later.forEach((psi, i) => stepper.setField(i + 1, psi));
    stepper.setState(field.psi, 0);
    energies = speciesEnergies(stepper, ratios, a, contacts);
  } finally {
    stepper.close();
  }
  const particleMass = units.particleMassKg / units.massKg;
  const fields = [field.psi, ...later].map((psi, i) => ({ psi, massRatio: i === 0 ? 1 : ratios[i - 1]!, contact: contacts[i]! }));
  const modes = speciesModes(grid, fields, a, particleMass, field.gravity);
  return speciesTables(species, energies, modes, units, contacts.some((g) => g !== 0), outDir);
}

/** species.csv and summary.json's "species" in physical units (contact columns and keys only when a species has a contact term). */
function speciesTables(species: readonly SpeciesMeta[], energies: readonly SpeciesEnergy[], modes: SpeciesModes, units: CodeUnits, withContact: boolean, outDir: string): Record<string, unknown> {
  const msun = units.massKg / M_SUN_KG;
  const energy = units.energyJ / (M_SUN_KG * 1e6);
  const perS = 1 / units.timeS;
  const rows = species.map((s, i) => {
    const e = energies[i]!;
    const m = modes.modes[i]!;
    const chi = { chi_per_s: m.chi * perS, chi_contact_per_s: m.chiContact * perS };
    return { name: s.name, particle_mass_eV: s.particleMassEv, mass_Msun: e.mass * msun, kinetic: e.kinetic * energy, potential: e.potential * energy, contact: e.contact * energy, particles_N: m.particles, omega_per_s: m.omega * perS, ...chi };
  });
  const sum = (key: "mass_Msun" | "kinetic" | "potential" | "contact") => rows.reduce((s, r) => s + r[key], 0);
  const c = <T>(values: T[]): T[] => (withContact ? values : []);
  const header = ["species", "particle_mass_eV", "mass_Msun", "kinetic_Msun_km2_s2", "potential_Msun_km2_s2", ...c(["contact_Msun_km2_s2"]), "particles_N", "omega_per_s", "chi_per_s", ...c(["chi_contact_per_s"])];
  const body = [
    ...rows.map((r) => [r.name, r.particle_mass_eV, r.mass_Msun, r.kinetic, r.potential, ...c([r.contact]), r.particles_N, r.omega_per_s, r.chi_per_s, ...c([r.chi_contact_per_s])]),
    ["total", "", sum("mass_Msun"), sum("kinetic"), sum("potential"), ...c([sum("contact")]), "", "", "", ...c([""])],
  ];
  writeFileAtomic(path.join(outDir, "species.csv"), csv(header, body));
  const energiesOf = (k: number, w: number, u: number) => ({ kinetic: k, potential: w, ...(withContact ? { contact: u } : {}), total: k + w + u });
  return {
    each: rows.map(({ kinetic, potential, contact, chi_contact_per_s, ...r }) => ({ ...r, ...(withContact ? { chi_contact_per_s } : {}), energies_Msun_km2_s2: energiesOf(kinetic, potential, contact) })),
    total: { mass_Msun: sum("mass_Msun"), energies_Msun_km2_s2: energiesOf(sum("kinetic"), sum("potential"), sum("contact")) },
    cross: modes.cross.map((x) => ({ species: [species[x.i]!.name, species[x.j]!.name], chi_per_s: x.chi * perS, mutual_energy_Msun_km2_s2: x.energy * energy })),
  };
}
