/**
 * The largest stable mass of an attractive contact interaction, in words:
 * what a message about a collapsing or impossible soliton says (the mass,
 * the critical mass M_max = 1.0125 ħ/√(G m |a_s|) for this particle and
 * interaction, and what to change), and the check of a config whose
 * relaxed soliton would be above it (no ground state exists then).
 */
import { ConfigError } from "../core/errors.js";
import { formatNumber } from "../core/format.js";
import { J_PER_EV, KG_PER_EV, M_SUN_KG, PC_M } from "../physics/constants.js";
import { TOWNES_MOMENT, criticalMassKg, criticalScatteringLengthM, decayConstantOf, townesLineMassKgPerM } from "../physics/contact.js";
import type { CodeUnits } from "../physics/units.js";
import type { ResolvedContact } from "./resolve-contact.js";
import type { ResolvedInitial } from "./resolve-initial.js";

/** "1.5 × 10⁹ Msun". */
function msun(kg: number): string {
  return `${formatNumber(kg / M_SUN_KG)} Msun`;
}

/** The particle and its interaction, as the user gave them. */
function particleText(contact: ResolvedContact, particleMassKg: number): string {
  const m = `m = ${formatNumber(particleMassKg / KG_PER_EV)} eV`;
  const a = `a_s = ${formatNumber(contact.scatteringLengthM)} m`;
  return contact.decayConstantJ !== undefined ? `${m} and f = ${formatNumber(contact.decayConstantJ / J_PER_EV / 1e9)} GeV (${a})` : `${m} and ${a}`;
}

/** The largest stable mass for this particle and interaction, named with its formula. */
export function criticalMassText(contact: ResolvedContact, particleMassKg: number): string {
  return `${msun(criticalMassKg(contact.scatteringLengthM, particleMassKg))} (M_max = 1.0125 ħ/√(G m |a_s|) for ${particleText(contact, particleMassKg)})`;
}

/**
 * What to change so that a mass `massKg` is stable: less mass, or a weaker interaction (a larger decay constant), or a repulsive one.
 * @param table the config table holding the interaction ("particle", or a species' "species[0]")
 */
export function stabilityAdvice(massKg: number, contact: ResolvedContact, particleMassKg: number, table = "particle"): string {
  const limit = criticalMassKg(contact.scatteringLengthM, particleMassKg);
  const a = criticalScatteringLengthM(massKg, particleMassKg);
  return `use less mass (below ${msun(limit)}), a weaker interaction (${weakerText(a, contact, particleMassKg, table)}) or a repulsive one`;
}

/** What a key of `table` holds the weaker interaction at: |a_s| below `a`, or the decay constant that gives it. */
function weakerText(a: number, contact: ResolvedContact, particleMassKg: number, table = "particle"): string {
  return contact.decayConstantJ !== undefined
    ? `${table}.decay_constant above ${formatNumber(decayConstantOf(a, particleMassKg) / J_PER_EV / 1e9)} GeV`
    : `|${table}.scattering_length| below ${formatNumber(a)} m`;
}

/** "1.5 × 10⁹ Msun/kpc": a mass per unit depth [kg/m]. */
function perKpc(kgPerM: number): string {
  return `${formatNumber((kgPerM * 1e3 * PC_M) / M_SUN_KG)} Msun/kpc`;
}

/**
 * The 2D collapse threshold in words: a line mass `lineKgPerM` [kg/m] against the Townes mass per unit
 * depth Λ_c = 1.8623 m/(4|a_s|) (Weinstein 1983), and what to change.
 */
export function townesVerdict(lineKgPerM: number, contact: ResolvedContact, particleMassKg: number, table = "particle"): string {
  const limit = townesLineMassKgPerM(contact.scatteringLengthM, particleMassKg);
  const threshold = `the contact term alone collapses a 2D field above the Townes mass per unit depth, ${perKpc(limit)} (Λ_c = 1.8623 m/(4|a_s|), Weinstein 1983, for ${particleText(contact, particleMassKg)}; self-gravity lowers it further)`;
  const held = `${perKpc(lineKgPerM)} (mass per unit depth)`;
  if (lineKgPerM > limit) {
    const a = (TOWNES_MOMENT * particleMassKg) / (4 * lineKgPerM); // the |a_s| whose Λ_c is this line mass
    return `${held}, above it: ${threshold}; use less mass (below ${perKpc(limit)}), a weaker interaction (${weakerText(a, contact, particleMassKg, table)}) or a repulsive one`;
  }
  return `${held}, below it: ${threshold}, so self-gravity drives the collapse, or the cells are too coarse: use more grid.cells or a smaller grid.box, or less mass`;
}

/** The masses [code] and config keys of the solitons a config relaxes by imaginary time (3D only); `at` prefixes the keys. */
function relaxedMasses(initial: ResolvedInitial, dims: number, at: string): { key: string; mass: number }[] {
  if (dims !== 3) return [];
  if (initial.kind === "ground-state") return [{ key: `${at}initial.mass`, mass: initial.mass }];
  if (initial.kind === "solitons" && initial.profile === "relaxed") return initial.solitons.map((s, i) => ({ key: `${at}initial.soliton[${i}].mass`, mass: s.mass }));
  return [];
}

/**
 * Refuse a 3D config that relaxes a soliton above the largest stable mass of an attractive
 * interaction: no ground state exists, imaginary time would only collapse it.
 * @param species a later species' table ("species[0]"), whose keys the message names; the first species' by default
 */
export function checkRelaxedMasses(initial: ResolvedInitial, dims: number, units: CodeUnits, contact: ResolvedContact | undefined, particleMassKg: number, species?: string): void {
  if (!contact || contact.scatteringLengthM >= 0) return;
  const limit = criticalMassKg(contact.scatteringLengthM, particleMassKg);
  for (const { key, mass } of relaxedMasses(initial, dims, species ? `${species}.` : "")) {
    const kg = units.toSI(mass, "mass");
    if (kg > limit) {
      throw new ConfigError(key, `${msun(kg)} is above the largest stable soliton, ${criticalMassText(contact, particleMassKg)}: no ground state exists to relax to; ${stabilityAdvice(kg, contact, particleMassKg, species)}`);
    }
  }
}

/**
 * Refuse a relaxed soliton or ground state with a contact interaction in an expanding box: the
 * relaxation solves the static equations, where the contact term's weight against gravity's
 * (g/a³ against φ/a) would be that of a = 1.
 */
export function checkExpandingRelaxation(initial: ResolvedInitial, background: "static" | "lcdm", contact: ResolvedContact | undefined): void {
  if (!contact || background === "static") return;
  if (initial.kind === "ground-state" || (initial.kind === "solitons" && initial.profile === "relaxed")) {
    throw new ConfigError("initial.kind", `a relaxed ${initial.kind === "ground-state" ? "ground state" : "soliton"} with a contact interaction is made in static boxes only (background.kind = "static"); in an expanding box start from another kind, or from "solitons" with initial.profile = "core-fit"`);
  }
}
