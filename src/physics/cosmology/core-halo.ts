/**
 * The core–halo mass relation of Schive et al. (2014, PRL 113, 261302),
 * found in their cosmological wave dark matter simulations (the formula
 * from memory; its scaling M_c ∝ a^{−1/2} M_h^{1/3} is their abstract's):
 *
 *   M_c = ¼ a^{−1/2} (ζ(z)/ζ(0))^{1/6} (M_h / M_min,0)^{1/3} M_min,0,
 *   M_min,0 = 4.4 × 10⁷ m₂₂^{−3/2} Msun,   m₂₂ = m / 10⁻²² eV,
 *   ζ(z) = [18π² + 82 (Ω_m(z) − 1) − 39 (Ω_m(z) − 1)²] / Ω_m(z),
 *
 * M_h the halo's virial mass, M_c the mass inside the core radius r_c. ζ is
 * the virial overdensity of Bryan & Norman (1998) relative to the mean
 * matter density (their Δ_c over Ω_m(z)). Overall M_c ∝ a^{−1/2} M_h^{1/3}
 * m₂₂^{−1}; at M_h = 10¹² Msun, z = 0 it gives 3.12 × 10⁸ m₂₂⁻¹ Msun. At
 * z = 0 (a = 1, and a static box, which has no redshift) the ζ ratio is 1.
 * The relation is contested (later simulations find other slopes and a
 * large scatter): psibox draws it beside the measured cores, never fits it.
 */
import { bryanNormanDelta, omegaMatterAt, type FlatDensities } from "./overdensity.js";

/** M_min,0 of the relation for m₂₂ = 1 [Msun]. */
export const CORE_HALO_MASS_SCALE_MSUN = 4.4e7;

/** ζ(z) = Δ_c(z)/Ω_m(z): Bryan & Norman's virial overdensity relative to the mean matter density. */
export function virialOverdensityOfMean(z: number, cosmology: FlatDensities): number {
  return bryanNormanDelta(z, cosmology) / omegaMatterAt(z, cosmology);
}

/**
 * The core mass the relation of Schive et al. (2014) gives for a halo.
 * @param haloMassMsun the halo's (virial) mass [Msun]
 * @param particleMassEv m [eV]
 * @param z redshift (0 in a static box)
 * @param cosmology the flat background (undefined in a static box: z must then be 0)
 * @returns M_c [Msun]
 */
export function schiveCoreMass(haloMassMsun: number, particleMassEv: number, z: number, cosmology: FlatDensities | undefined): number {
  const m22 = particleMassEv / 1e-22;
  const scale = CORE_HALO_MASS_SCALE_MSUN * m22 ** -1.5;
  const zeta = cosmology ? (virialOverdensityOfMean(z, cosmology) / virialOverdensityOfMean(0, cosmology)) ** (1 / 6) : 1;
  return 0.25 * (1 + z) ** 0.5 * zeta * Math.cbrt(haloMassMsun / scale) * scale;
}
