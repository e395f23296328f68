/**
 * The one declaration of the snapshot layout: the names of the objects and
 * attributes psibox writes, their units, and the constants a reader needs to
 * recompute anything from the file alone.
 *
 * Version 2 (current) is a netCDF-4 file following the CF conventions:
 *   /  global attributes   Conventions, title, source, format, format_version, software, kind,
 *                          step, time + time_units + time_origin, scale_factor, redshift (expanding),
 *                          background and cosmology, hubble + hubble_units, omega_matter, omega_radiation,
 *                          omega_lambda (expanding), particle_mass + particle_mass_units, gravity,
 *                          scattering_length + scattering_length_units (the contact interaction's a_s [m],
 *                          0 for none; files written before it lack it),
 *                          mass + mass_units, cells, box_size + box_size_units, unit_system,
 *                          the constants (constant_* and unit_*, each with *_units), equations,
 *                          comment, config (the resolved config, TOML), config_sha256
 *   /x, /y, /z             coordinate variables (dimension scales): comoving cell centres i·dx [kpc]
 *   /psi_re, /psi_im       float64 or float32 over (x[, y[, z]]): ψ in (Msun/kpc³)^(1/2),
 *                          |ψ|² the comoving mass density (of the first species in a run of several)
 *   several species        (optional; a file without them holds one species) global attributes
 *                          species (the names, space-separated, the first one's field in psi_re/psi_im),
 *                          species_particle_mass [eV], species_mass [Msun] and species_scattering_length
 *                          [m] (each species' own contact interaction, 0 for none; with
 *                          species_scattering_length_units = "m"; files written before it lack it), one per name; mass is then
 *                          their total and particle_mass the first species'; psi_re and psi_im carry an
 *                          attribute species = the first name, and each later species NAME has its own
 *                          /psi_re_NAME, /psi_im_NAME (same form and units) with attributes species,
 *                          particle_mass, particle_mass_units
 *   /state                 checkpoints only: psi_code, phi_code (float64, code units, the exact
 *                          state) over the dimensions n_psi_code and n_phi_code, attributes
 *                          time_code, mass_code, mass0_code, owed_kick_code, steps, wall_time_s,
 *                          snapshots_written, with several species species_mass0_code (the later
 *                          species' masses at the start, in order; the mass guard's reference); field_1_code, field_2_code, …: the companion fields a run
 *                          advances beside ψ (tangent-linear fields), as stored, owing ψ's kick, over
 *                          n_psi_code (several species: the later species first, in order, then the
 *                          plug-ins' fields); /state/plugins: one text attribute per run plug-in that
 *                          keeps state, JSON {"version": n, "state": …} (the quantum sidecar's is "sidecar")
 * Version 1 (read only): the same root attributes up to config_sha256, /grid (dims, cells,
 * box_size), /field/psi of shape [cells..., 2] (re, im), and /state as above (checkpoints written before
 * plug-ins held the sidecar's state, unversioned, in an attribute "sidecar" of /state: read as version 1).
 */
import { G_SI, GM_SUN_SI, HBAR_J_S, C_M_PER_S, KG_PER_EV, M_SUN_KG, PC_M } from "../physics/constants.js";

export const SNAPSHOT_FORMAT = "psibox snapshot";
/** The layout version written now. */
export const SNAPSHOT_VERSION = 2;
export const CF_CONVENTIONS = "CF-1.10";
/** Units of ψ (the real and imaginary parts). */
export const PSI_UNITS = "(Msun/kpc^3)^(1/2)";
/** Units of lengths (coordinates and box size; comoving in expanding runs). */
export const LENGTH_UNITS = "kpc";
/** Names of the coordinate variables, one per grid axis in order. */
export const AXIS_NAMES = ["x", "y", "z"] as const;
/** The field's data variables. */
export const PSI_RE = "psi_re";
export const PSI_IM = "psi_im";
/** The variables of a later species' field (several species; the first one's are PSI_RE and PSI_IM). */
export const speciesVariables = (name: string): readonly [string, string] => [`${PSI_RE}_${name}`, `${PSI_IM}_${name}`];
/** Global attributes of a file of several species. */
export const SPECIES_ATTRS = { names: "species", particleMass: "species_particle_mass", mass: "species_mass", scatteringLength: "species_scattering_length" } as const;

/** Names inside the checkpoint's /state group. */
export const STATE = {
  group: "state",
  psi: "psi_code",
  phi: "phi_code",
  psiDim: "n_psi_code",
  phiDim: "n_phi_code",
  plugins: "plugins",
  /** Attribute of the group: the later species' masses at the start of the run, code units, in order. */
  speciesMass0: "species_mass0_code",
  /** Companion field i (1, 2, …). */
  field: (i: number) => `field_${i}_code`,
} as const;

/** Version-1 names (read only). */
export const V1 = { grid: "grid", psi: "field/psi" } as const;

/** A constant or unit written as a global attribute pair (value, value_units). */
export interface NamedConstant {
  readonly name: string;
  readonly value: number;
  readonly units: string;
}

/** The constants and unit definitions psibox computes with, as written into every snapshot. */
export function snapshotConstants(timeUnit: string, timeUnitS: number): NamedConstant[] {
  return [
    { name: "constant_hbar", value: HBAR_J_S, units: "J s" },
    { name: "constant_G", value: G_SI, units: "m3 kg-1 s-2" },
    { name: "constant_GM_sun", value: GM_SUN_SI, units: "m3 s-2" },
    { name: "constant_c", value: C_M_PER_S, units: "m s-1" },
    { name: "unit_Msun", value: M_SUN_KG, units: "kg" },
    { name: "unit_kpc", value: 1e3 * PC_M, units: "m" },
    { name: "unit_eV", value: KG_PER_EV, units: "kg" },
    { name: `unit_${timeUnit}`, value: timeUnitS, units: "s" },
  ];
}

export const UNIT_SYSTEM =
  "lengths in kpc (comoving), masses in Msun (Msun = constant_GM_sun / constant_G, see unit_Msun), " +
  "densities in Msun/kpc^3, particle mass in eV (eV/c^2), time in time_units, energies derived with constant_hbar and constant_G";

export const EQUATIONS =
  "i hbar dpsi/dt = -hbar^2/(2 m a^2) laplacian(psi) + m Phi psi + g/(m a^3) |psi|^2 psi, laplacian(Phi) = (4 pi G / a)(|psi|^2 - mean |psi|^2) " +
  "(periodic) or 4 pi G |psi|^2 (isolated, a = 1), g = 4 pi hbar^2 a_s / m with a_s = scattering_length (0: no contact term); " +
  "x comoving, t cosmic time; K = hbar^2/(2 m^2 a^2) integral |grad psi|^2, W = 1/2 integral (rho - mean rho) Phi, " +
  "U = g/(2 m^2 a^3) integral |psi|^4";

export const LAYOUT_COMMENT =
  "psi = psi_re + i psi_im sampled at the cell centres x_i = i dx of a periodic box of side cells*dx; " +
  "|psi|^2 is the comoving mass density; a 1D or 2D field is uniform along the missing axes and its totals " +
  "(mass, energies) are taken over a depth equal to the first box side along each missing axis";
