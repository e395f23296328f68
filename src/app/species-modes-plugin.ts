/**
 * The species' modes as a run plug-in (runs of several species with the
 * sidecar on): at every time-series row, each species' own condensate mode
 * (its particles N_i, ω_i, χ_i from its own potential plus its own contact
 * part, each part in a column of its own when a species has a contact term) and the cross
 * coefficient χ_ij of every pair (quantum/species-modes.ts), in 1/s; their
 * last values go to summary.json as "species_modes". It keeps no state: a
 * resumed run computes the same rows.
 */
import { makePoissonSolver, type GravityKind, type PoissonKernel, type PoissonSolver } from "../fields/poisson.js";
import type { OutputFacts, RunContext, RunPlugin } from "../simulation/plugin.js";
import { speciesModes, type SpeciesModes } from "../quantum/species-modes.js";
import type { ModeCoefficients } from "../quantum/mode.js";

/** The run's species, the first one's first: name, particle mass ratio μ = m_i/m and own contact coefficient (code units). */
export interface SpeciesOfRun {
  readonly name: string;
  readonly massRatio: number;
  readonly contact?: number;
}

/** Whether any species has a contact term (its modes' χ then get their gravitational and contact parts as columns too). */
const anyContact = (species: readonly SpeciesOfRun[]): boolean => species.some((s) => (s.contact ?? 0) !== 0);

/** The plug-in's time-series columns for these species. */
export function speciesModeColumns(species: readonly SpeciesOfRun[]): string[] {
  const pairs = species.flatMap((a, i) => species.slice(i + 1).map((b) => `chi_${a.name}_${b.name}_per_s`));
  const parts = (name: string) => (anyContact(species) ? [`chi_gravity_${name}_per_s`, `chi_contact_${name}_per_s`] : []);
  return [...species.flatMap((s) => [`particles_N_${s.name}`, `omega_${s.name}_per_s`, `chi_${s.name}_per_s`, ...parts(s.name)]), ...pairs];
}

/** The plug-in, for a run of these species with this gravity. */
export function speciesModesPlugin(species: readonly SpeciesOfRun[], gravity: GravityKind, kernel: PoissonKernel): RunPlugin {
  let context: RunContext | undefined;
  let solver: PoissonSolver | undefined;
  let last: SpeciesModes | undefined;
  const perS = (rate: number) => rate / context!.scales.units.timeS;
  return {
    name: "species_modes",
    measures: ["species"],
    columns: speciesModeColumns(species),
    start(ctx) {
      context = ctx;
      solver = makePoissonSolver(ctx.grid, gravity, kernel);
    },
    output(facts: OutputFacts) {
      if (facts.kind !== "row") return;
      const fields = facts.species!.map((psi, i) => ({ psi, massRatio: species[i]!.massRatio, contact: species[i]!.contact ?? 0 }));
      last = speciesModes(context!.grid, fields, facts.a, context!.particleMass, solver!);
      const parts = (m: ModeCoefficients) => (anyContact(species) ? [perS(m.chi - m.chiContact), perS(m.chiContact)] : []);
      return [...last.modes.flatMap((m) => [m.particles, perS(m.omega), perS(m.chi), ...parts(m)]), ...last.cross.map((c) => perS(c.chi))];
    },
    stop() {
      if (!last) return;
      const parts = (m: ModeCoefficients) => (anyContact(species) ? { chi_gravity_per_s: perS(m.chi - m.chiContact), chi_contact_per_s: perS(m.chiContact) } : {});
      const modes = last.modes.map((m, i) => ({ species: species[i]!.name, particles_N: m.particles, omega_per_s: perS(m.omega), chi_per_s: perS(m.chi), ...parts(m), rate_Nchi_per_s: perS(m.rate) }));
      const cross = last.cross.map((c) => ({ species: [species[c.i]!.name, species[c.j]!.name], chi_per_s: perS(c.chi) }));
      return { species_modes: { modes, cross } };
    },
  };
}
