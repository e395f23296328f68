/**
 * Physical constants in SI units, each with its source.
 * CODATA 2018 (exact SI 2019 values where marked), IAU 2015 resolutions.
 */

/** Reduced Planck constant ħ [J s]. CODATA 2018 (exact: h = 6.62607015e-34 J s / 2π). */
export const HBAR_J_S = 6.62607015e-34 / (2 * Math.PI);
/** Speed of light c [m/s]. SI definition (exact). */
export const C_M_PER_S = 299_792_458;
/** Elementary charge, i.e. joules per electronvolt [J/eV]. SI 2019 (exact). */
export const J_PER_EV = 1.602176634e-19;
/** Mass of 1 eV/c² [kg]. Derived from the exact J_PER_EV and c. */
export const KG_PER_EV = J_PER_EV / (C_M_PER_S * C_M_PER_S);
/** Newtonian constant of gravitation G [m³ kg⁻¹ s⁻²]. CODATA 2018. */
export const G_SI = 6.6743e-11;
/** Nominal solar mass parameter GM☉ [m³ s⁻²]. IAU 2015 Resolution B3. */
export const GM_SUN_SI = 1.3271244e20;
/** Solar mass [kg] = GM☉ / G (IAU 2015 B3 with CODATA 2018 G). */
export const M_SUN_KG = GM_SUN_SI / G_SI;
/** Astronomical unit [m]. IAU 2012 Resolution B2 (exact). */
export const AU_M = 149_597_870_700;
/** Parsec [m] = (648000/π) au, IAU 2015 Resolution B2 (exact). */
export const PC_M = (648_000 / Math.PI) * AU_M;
/** Julian year [s] (IAU: 365.25 days of 86400 s). */
export const YEAR_S = 365.25 * 86_400;
/** Megaparsec [m]. */
export const MPC_M = 1e6 * PC_M;
