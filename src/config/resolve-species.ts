/**
 * The [[species]] section: more species of particle beside the run's first
 * one ([particle] and [initial], the reference field ψ of code units
 * ħ/m = 1), all sharing one gravitational potential sourced by their summed
 * density. Each species i has its particle mass m_i = μ_i m and an initial
 * field of any [initial] kind, resolved in the species' own code units
 * (ħ/m_i = 1, the same 4πG = 1 and ℓ): its field is built there as for a run
 * of its own and converted with ψ = ψ_own / μ_i (densities scale as 1/μ²,
 * times as μ, since the code time unit is m ℓ²/ħ). A field read from a
 * snapshot is already physical and is converted in the run's own units.
 */
import { ConfigError } from "../core/errors.js";
import { CodeUnits, type UnitContext } from "../physics/units.js";
import type { BackgroundSpec } from "../physics/cosmology/background.js";
import type { CheckedConfig } from "./schema.js";
import { positive, read } from "./values.js";
import { resolveInitial, type ResolvedInitial } from "./resolve-initial.js";
import { resolveBackgroundAndSpan } from "./resolve-span.js";
import { resolveContact, type ResolvedContact } from "./resolve-contact.js";
import { checkExpandingRelaxation, checkRelaxedMasses } from "./contact-limits.js";

/** The first species' name when [particle] gives none. */
export const FIRST_SPECIES_NAME = "main";
const NAME = /^[A-Za-z][A-Za-z0-9_]{0,31}$/;

/** One species in the run's code units, its initial field in its own (see above). */
export interface ResolvedSpecies {
  readonly name: string;
  readonly particleMassKg: number;
  /** μ = m_i / m, the particle mass over the first species'. */
  readonly massRatio: number;
  /** Its initial field, in the species' own code units (ħ/m_i = 1), except a snapshot's (the run's units). */
  readonly initial: ResolvedInitial;
  /** The background and the start time in the species' own code units (what its field is built with). */
  readonly background: BackgroundSpec;
  readonly startTime: number;
  /** Its own contact self-interaction (species[i].scattering_length or decay_constant), if any: it acts on its own density only. */
  readonly contact?: ResolvedContact;
}

/** The first species' name ([particle] name, or "main"), checked. */
export function firstSpeciesName(config: CheckedConfig): string {
  const name = config.particle.name ?? FIRST_SPECIES_NAME;
  if (!NAME.test(name)) throw new ConfigError("particle.name", nameRule(name));
  return name;
}

function nameRule(name: string): string {
  return `"${name.slice(0, 40)}" is not a species name: a letter, then letters, digits or "_", at most 32 characters`;
}

/** Rewrite an error about [initial] as one about species[i].initial. */
function underSpecies<T>(i: number, resolve: () => T): T {
  try {
    return resolve();
  } catch (e) {
    if (!(e instanceof ConfigError) || !e.key.startsWith("initial")) throw e;
    throw new ConfigError(`species[${i}].${e.key}`, e.message.slice(e.key.length + 2));
  }
}

/** Refuse what cannot run beside species. */
function checkCompanions(config: CheckedConfig): void {
  if (config.breakdown.tangent || config.breakdown.probes > 0) {
    const key = config.breakdown.tangent ? "breakdown.tangent" : "breakdown.probes";
    throw new ConfigError(key, "cannot run beside [[species]]: the tangent-linear fields follow one field's gravity; turn it off or remove the species");
  }
}

/**
 * Resolve [[species]] (none: an empty list).
 * @param units the run's code units (of the first species)
 */
export function resolveSpecies(config: CheckedConfig, dims: number, lengths: readonly number[], units: CodeUnits, ctx: UnitContext, hubbleSI: number): ResolvedSpecies[] {
  const list = config.species ?? [];
  if (list.length === 0) return [];
  checkCompanions(config);
  const seen = new Map<string, string>([[firstSpeciesName(config), "particle.name"]]);
  return list.map((sp, i) => {
    const key = `species[${i}]`;
    if (!NAME.test(sp.name)) throw new ConfigError(`${key}.name`, nameRule(sp.name));
    const before = seen.get(sp.name);
    if (before !== undefined) throw new ConfigError(`${key}.name`, `"${sp.name}" is already the name of ${before}; each species needs its own name`);
    seen.set(sp.name, `${key}.name`);
    if (sp.initial === undefined) throw new ConfigError(`${key}.initial`, 'missing; each species needs its own initial field, a table of any [initial] kind, e.g. kind = "gaussian-packet"');
    const particleMassKg = positive(`${key}.particle_mass`, read(`${key}.particle_mass`, sp.particle_mass, "mass", ctx));
    const massRatio = particleMassKg / units.particleMassKg;
    const fromFile = sp.initial.kind === "snapshot";
    const own = fromFile ? units : new CodeUnits(particleMassKg, units.lengthM);
    const contact = resolveContact(sp, key, particleMassKg);
    const scoped: CheckedConfig = { ...config, initial: sp.initial };
    return underSpecies(i, () => {
      const { background, startTime } = resolveBackgroundAndSpan({ ...scoped, initial: config.initial }, own, ctx, hubbleSI);
      const initial = resolveInitial(scoped, dims, lengths, own, ctx, background);
      // a ground state above its own largest stable mass has nothing to relax to (species[i].initial.mass)
      checkRelaxedMasses(initial, dims, own, contact, particleMassKg, key);
      // a relaxation solves the static equations (species[i].initial.kind in an expanding box)
      checkExpandingRelaxation(initial, background.kind, contact);
      return { name: sp.name, particleMassKg, massRatio, initial, background, startTime, ...(contact ? { contact } : {}) };
    });
  });
}
