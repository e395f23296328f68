/**
 * The collapse guard of an attractive contact interaction, for every field
 * that has one (the first species' ψ and each later species with its own
 * coefficient). A soliton above the largest stable mass has no ground state:
 * it collapses, its density grows without bound and the split-step goes on
 * producing a field that means nothing once the collapse is smaller than a
 * cell. The guard stops the run (exit code 3, the last good state kept) when
 * the attractive term's length, ħ/√(2m_i|g_i|n), falls below a cell's Δx/π
 * (both physical: n = ρ/(m_i a³), Δx·a), i.e. in code units
 * μ²|g| ρ_max/a > (π/Δx)²/2 for a species of mass ratio μ: a resolved stable
 * soliton stays far from that (its interaction and kinetic energies balance
 * at its own radius, several cells).
 *
 * What the message says depends on the dimension:
 * - 3D: the mass within twice the critical soliton's r₉₉ (11 R_a,
 *   R_a = √(|a_s|ħ²/(G m³))) of the densest cell against the critical mass
 *   M_max = 1.0125 ħ/√(G m |a_s|), and what to change.
 * - 2D: the same region's mass per unit depth against the Townes threshold
 *   Λ_c = 1.8623 m/(4|a_s|) of the contact term alone (Weinstein 1983; gravity
 *   lowers it).
 * - 1D: the attractive cubic term alone does not collapse a 1D field (its
 *   bright soliton is stable at every mass), so the guard firing means the
 *   densest part is a soliton narrower than the grid resolves: its width
 *   w = ħ/√(m|g|n_max) and the cells it needs, no critical mass.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import type { ResolvedContact } from "../config/resolve-contact.js";
import { criticalMassText, stabilityAdvice, townesVerdict } from "../config/contact-limits.js";
import { brightSolitonWidthM, criticalMassKg } from "../physics/contact.js";
import { formatNumber } from "../core/format.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { maxDensity } from "../diagnostics/energies.js";
import type { OutputScales } from "./scales.js";

/** The radius of the collapsing object, in R_a = √(|a_s|ħ²/(Gm³)): twice the critical soliton's r₉₉ = 5.5 R_a (Chavanis 2011). */
const OBJECT_RADIUS = 11;

/** What the guard needs of a run: the first species' particle and interaction, and the later species'. */
export interface GuardedRun {
  readonly contact: ResolvedContact | undefined;
  readonly particleMassKg: number;
  readonly firstSpecies?: string;
  readonly species: readonly { readonly name: string; readonly particleMassKg: number; readonly contact?: ResolvedContact | undefined }[];
}

/** One field with an attractive contact term. */
interface GuardedField {
  /** The species' name (with several species only). */
  readonly name: string | undefined;
  /** The config table of its interaction: "particle", or a later species' "species[i]". */
  readonly table: string;
  /** g (code units, negative) and μ = m_i/m. */
  readonly g: number;
  readonly massRatio: number;
  readonly contact: ResolvedContact;
  readonly particleMassKg: number;
  /** Its stored field (only |·|² is used). */
  readonly field: Float64Array;
}

/** The stepper's fields with an attractive contact term, matched with their species (extra fields 1 … S are the later species). */
function guardedFields(stepper: SplitStepper, run: GuardedRun): GuardedField[] {
  const several = run.species.length > 0;
  return stepper.contactFields().flatMap((f): GuardedField[] => {
    if (!(f.contact < 0)) return [];
    const sp = f.index === 0 ? undefined : run.species[f.index - 1];
    if (f.index > 0 && !sp) return []; // a plug-in's companion of ψ: ψ's own guard covers it
    const contact = sp ? sp.contact : run.contact;
    if (!contact) return [];
    const name = several ? (sp ? sp.name : run.firstSpecies) : undefined;
    const table = f.index === 0 ? "particle" : `species[${f.index - 1}]`;
    return [{ name, table, g: f.contact, massRatio: f.massRatio, contact, particleMassKg: sp ? sp.particleMassKg : run.particleMassKg, field: f.field }];
  });
}

/** The finest spacing of the simulated axes (code lengths). */
function finestSpacing(stepper: SplitStepper): number {
  let h = Infinity;
  for (let ax = 0; ax < 3; ax++) if (stepper.grid.shape[ax]! > 1) h = Math.min(h, stepper.grid.spacing[ax]!);
  return h;
}

/** Whether a field's attractive contact term has outrun the grid: μ²|g| ρ_max/a > (π/Δx)²/2 (code units). */
function collapsingField(stepper: SplitStepper, f: GuardedField, maxRho: number): boolean {
  const a = stepper.background.scaleFactor(stepper.time);
  return (f.massRatio * f.massRatio * -f.g * maxRho) / a > 0.5 * (Math.PI / finestSpacing(stepper)) ** 2;
}

/** Whether ψ's (the first species') attractive contact term has outrun the grid. */
export function collapsing(stepper: SplitStepper): boolean {
  if (!(stepper.contact < 0)) return false;
  const f = { name: undefined, table: "particle", g: stepper.contact, massRatio: 1, contact: { scatteringLengthM: -1 }, particleMassKg: 1, field: stepper.rawPsi };
  return collapsingField(stepper, f, stepper.moments().maxRho);
}

/** Σ|ψ|² ΔV of `psi` within `radius` (code lengths, nearest periodic image) of its densest cell. */
function massAroundPeak(stepper: SplitStepper, psi: Float64Array, radius: number): number {
  const { grid } = stepper;
  let peak = 0;
  for (let p = 1; p < grid.size; p++) if (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2 > psi[2 * peak]! ** 2 + psi[2 * peak + 1]! ** 2) peak = p;
  const [, n1, n2] = grid.shape;
  const index = (p: number): number[] => [Math.floor(p / (n1 * n2)), Math.floor(p / n2) % n1, p % n2];
  const at = index(peak);
  let sum = 0;
  for (let p = 0; p < grid.size; p++) {
    const ijk = index(p);
    let r2 = 0;
    for (let ax = 0; ax < 3; ax++) {
      const n = grid.shape[ax]!;
      const d = Math.abs(ijk[ax]! - at[ax]!);
      r2 += (Math.min(d, n - d) * grid.spacing[ax]!) ** 2;
    }
    if (r2 <= radius * radius) sum += psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
  }
  return sum * grid.cellVolume;
}

/**
 * A collapsing (or relaxing) mass against the limit of its dimension, and what to change: 3D, the
 * critical soliton mass (above it, less mass or a weaker interaction; below it, finer cells); 2D, the
 * Townes mass per unit depth over `depthM` [m, physical], the first box side; 1D, no critical mass.
 * `table` names the config table of the interaction (a species' "species[0]"; "particle" by default).
 */
export function collapseVerdict(massKg: number, dims: number, contact: ResolvedContact, particleMassKg: number, table?: string, depthM = Number.NaN): string {
  const mass = `${formatNumber(massKg / M_SUN_KG)} Msun`;
  if (dims === 2 && depthM > 0) return `${mass} over the depth ${kpc(depthM)}, ${townesVerdict(massKg / depthM, contact, particleMassKg, table)}`;
  if (dims === 1) {
    return `${mass} over the depth; in 1D the attractive contact term alone does not collapse a field (its bright soliton, of width m/(2π|a_s|Σ) for a mass per area Σ, is stable at every mass), so the soliton became narrower than a cell: use more grid.cells or a smaller grid.box`;
  }
  const limit = criticalMassText(contact, particleMassKg);
  if (massKg > criticalMassKg(contact.scatteringLengthM, particleMassKg)) {
    return `${mass}, above the largest stable soliton, ${limit}; ${stabilityAdvice(massKg, contact, particleMassKg, table)}`;
  }
  return `${mass}, below the largest stable soliton, ${limit}, so the cells are too coarse for it: use more grid.cells or a smaller grid.box, or less mass`;
}

/** "0.193 kpc". */
function kpc(m: number): string {
  return `${formatNumber(m / (1e3 * PC_M))} kpc`;
}

/** The 1D message: the densest part's bright-soliton width against the cells, and the cells it needs. */
function narrowSoliton(stepper: SplitStepper, scales: OutputScales, f: GuardedField, maxRho: number): string {
  const a = stepper.background.scaleFactor(stepper.time);
  const nPeak = scales.units.toSI(maxRho, "density") / (a * a * a) / f.particleMassKg;
  const w = brightSolitonWidthM(f.contact.scatteringLengthM, f.particleMassKg, nPeak);
  const h = a * scales.units.toSI(finestSpacing(stepper), "length");
  const side = a * scales.units.toSI(stepper.grid.lengths[0]!, "length");
  const cells = 2 ** Math.ceil(Math.log2((2 * side) / w)); // Δx ≤ w/2
  return `the densest part is a bright soliton ρ₀ sech²(x/w) of width w = ħ/√(m|g|n_max) = ${kpc(w)}, narrower than the cells resolve (Δx = ${kpc(h)}); in 1D the attractive contact term alone does not collapse a field (its bright soliton is stable at every mass, w = m/(2π|a_s|Σ) for a mass per area Σ), so no mass is too large: use finer cells, grid.cells of at least ${cells} (Δx ≤ w/2), or a smaller grid.box`;
}

/** Why the run must stop for a collapse of any field (undefined while none is under way). */
export function collapseProblem(stepper: SplitStepper, scales: OutputScales, run: GuardedRun): string | undefined {
  for (const f of guardedFields(stepper, run)) {
    const maxRho = f.field === stepper.rawPsi ? stepper.moments().maxRho : maxDensity(f.field);
    if (!collapsingField(stepper, f, maxRho)) continue;
    const who = f.name !== undefined ? `species ${f.name}: ` : "";
    const cause = `${who}the field collapses under its attractive self-interaction faster than the grid resolves (the interaction length fell below a cell)`;
    if (stepper.grid.dims === 1) return `${cause}: ${narrowSoliton(stepper, scales, f, maxRho)}`;
    // R_a = √(|a_s|ħ²/(G m_i³)) is √|g_i| in code units (g_i = 4πa_s/(μ³m), ħ/m = 1, 4πG = 1); comoving R_a/a
    const a = stepper.background.scaleFactor(stepper.time);
    const radius = (OBJECT_RADIUS * Math.sqrt(-f.g)) / a;
    const objectKg = scales.massMsun(massAroundPeak(stepper, f.field, radius)) * M_SUN_KG;
    const depth = a * scales.units.toSI(stepper.grid.lengths[0]!, "length");
    const verdict = collapseVerdict(objectKg, stepper.grid.dims, f.contact, f.particleMassKg, f.table, depth);
    return `${cause}: the ${kpc(a * scales.units.toSI(radius, "length"))} around the densest cell (twice the critical soliton's r₉₉) hold ${verdict}`;
  }
  return undefined;
}
