/**
 * The contact interaction of one particle (the run's, or a species'): read
 * from a table's `scattering_length` (a length, negative for an attractive
 * interaction) or `decay_constant` (an energy, for an axion-like field,
 * whose attractive scattering length follows), never both. The keys'
 * schema is `contactKeys` in config/schema.ts.
 */
import { parse as parseToml } from "smol-toml";
import { ConfigError } from "../core/errors.js";
import { scatteringLengthFromDecayConstant } from "../physics/contact.js";
import { read } from "./values.js";

/** A contact interaction in SI. */
export interface ResolvedContact {
  /** Scattering length a_s [m]: positive repulsive, negative attractive. */
  readonly scatteringLengthM: number;
  /** The decay constant f [J] it was derived from, if one was given. */
  readonly decayConstantJ?: number;
}

/** The part of a table this reads. */
export interface ContactTable {
  readonly scattering_length?: string | undefined;
  readonly decay_constant?: string | undefined;
}

/**
 * The contact interaction a table describes, or undefined when it has none
 * (no key, or a scattering length of zero).
 * @param table the raw table (e.g. config.particle, or one species' table)
 * @param keyPath its dotted path for messages ("particle", "species.heavy")
 * @param particleMassKg the particle mass of the field it acts on [kg]
 */
export function resolveContact(table: ContactTable, keyPath: string, particleMassKg: number): ResolvedContact | undefined {
  const lengthKey = `${keyPath}.scattering_length`;
  const decayKey = `${keyPath}.decay_constant`;
  if (table.scattering_length !== undefined && table.decay_constant !== undefined) {
    throw new ConfigError(decayKey, `give either ${lengthKey} or ${decayKey}, not both (a decay constant fixes the scattering length)`);
  }
  if (table.decay_constant !== undefined) {
    const f = read(decayKey, table.decay_constant, "energy", {});
    if (!(f > 0) || !Number.isFinite(f)) throw new ConfigError(decayKey, "must be a positive energy, e.g. \"1e17 GeV\"");
    return { scatteringLengthM: scatteringLengthFromDecayConstant(f, particleMassKg), decayConstantJ: f };
  }
  if (table.scattering_length === undefined) return undefined;
  const a = read(lengthKey, table.scattering_length, "length", {});
  if (!Number.isFinite(a)) throw new ConfigError(lengthKey, "must be a finite length, e.g. \"1e-80 m\" (negative: attractive)");
  return a === 0 ? undefined : { scatteringLengthM: a };
}

/**
 * The contact interaction recorded in a snapshot's config text (its [particle] table), or undefined when the
 * text holds none or is not a psibox config (a field imported from another program).
 */
export function contactOfConfigText(text: string, particleMassKg: number): ResolvedContact | undefined {
  let particle: unknown;
  try {
    particle = (parseToml(text) as { particle?: unknown }).particle;
  } catch {
    return undefined;
  }
  if (typeof particle !== "object" || particle === null) return undefined;
  const { scattering_length, decay_constant } = particle as Record<string, unknown>;
  const table: ContactTable = {
    ...(typeof scattering_length === "string" ? { scattering_length } : {}),
    ...(typeof decay_constant === "string" ? { decay_constant } : {}),
  };
  return resolveContact(table, "particle", particleMassKg);
}
