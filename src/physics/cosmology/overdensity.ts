/**
 * Spherical-overdensity halo definitions: the mean density inside a halo's
 * radius R_Δ equals Δ times a reference density.
 * - "200c" (any Δ followed by c): Δ times the critical density 3H(z)²/(8πG);
 * - "200m" (any Δ followed by m): Δ times the mean matter density
 *   Ω_m ρ_crit,0 (1+z)³; in a static box, Δ times the box's mean density
 *   (there is no cosmology);
 * - "vir": the virial overdensity of Bryan & Norman (1998, their eq. 6) for
 *   a flat universe with a cosmological constant, relative to the critical
 *   density: Δ_c = 18π² + 82x − 39x², x = Ω_m(z) − 1, with
 *   Ω_m(z) = Ω_m (1+z)³ / E(z)², E² = Ω_m(1+z)³ + Ω_r(1+z)⁴ + Ω_Λ.
 */
import { InputError } from "../../core/errors.js";

/** A definition: Δ and its reference ("c" critical, "m" mean matter), or "vir" (Bryan & Norman). */
export type OverdensityDefinition = `${number}c` | `${number}m` | "vir";

/** A flat background's density parameters today. */
export interface FlatDensities {
  readonly omegaMatter: number;
  readonly omegaRadiation: number;
}

/** Ω_m(z) of a flat universe with matter, radiation and a cosmological constant. */
export function omegaMatterAt(z: number, c: FlatDensities): number {
  const m = c.omegaMatter * (1 + z) ** 3;
  const e2 = m + c.omegaRadiation * (1 + z) ** 4 + (1 - c.omegaMatter - c.omegaRadiation);
  return m / e2;
}

/** Bryan & Norman's virial overdensity Δ_c (relative to the critical density) at redshift z, flat ΛCDM. */
export function bryanNormanDelta(z: number, c: FlatDensities): number {
  const x = omegaMatterAt(z, c) - 1;
  return 18 * Math.PI ** 2 + 82 * x - 39 * x * x;
}

/** The threshold a halo's mean enclosed density must reach, as Δ and the reference it multiplies. */
export interface OverdensityThreshold {
  readonly definition: OverdensityDefinition;
  readonly delta: number;
  readonly reference: "critical" | "mean matter" | "box mean";
  /** Δ × reference density, physical, in the caller's density unit. */
  readonly density: number;
}

/**
 * The threshold density of a definition.
 * @param critical the critical density 3H(z)²/(8πG) at the snapshot (physical), or undefined in a static box
 * @param boxMean the box's mean density (physical), used by "200m" in a static box
 * @param cosmology the density parameters (undefined in a static box)
 * @param file names the snapshot in errors
 */
export function overdensityThreshold(
  definition: OverdensityDefinition,
  z: number,
  critical: number | undefined,
  boxMean: number,
  cosmology: FlatDensities | undefined,
  file: string,
): OverdensityThreshold {
  const given = Number(definition.slice(0, -1));
  if (!cosmology || critical === undefined) {
    if (!definition.endsWith("m")) {
      throw new InputError(`--overdensity: "${definition}" needs a cosmology, and ${file} is a static box; use e.g. 200m (200 times the box's mean density)`);
    }
    return { definition, delta: given, reference: "box mean", density: given * boxMean };
  }
  if (definition === "vir") {
    const delta = bryanNormanDelta(z, cosmology);
    return { definition, delta, reference: "critical", density: delta * critical };
  }
  if (definition.endsWith("c")) return { definition, delta: given, reference: "critical", density: given * critical };
  return { definition, delta: given, reference: "mean matter", density: given * omegaMatterAt(z, cosmology) * critical };
}

/** Parse `--overdensity`. */
export function parseOverdensity(text: string): OverdensityDefinition {
  const t = text.trim();
  const m = /^(\d+(?:\.\d*)?)([cm])$/.exec(t);
  if (t !== "vir" && !(m && Number(m[1]) >= 1)) {
    throw new InputError(`--overdensity: "${t.slice(0, 60)}" is not a definition; valid: Δ ≥ 1 followed by c (critical density) or m (mean matter density), e.g. 200c or 200m (the default), or vir (Bryan & Norman 1998)`);
  }
  return t as OverdensityDefinition;
}
