/**
 * The columns of the halo tables, declared once: name, units, meaning and
 * how each value follows from a halo (code units) and the snapshot's
 * scales. halos.csv and halos.h5 hold them per snapshot; tracks.csv and
 * tracks.h5 hold the same columns per track and snapshot. Positions are
 * comoving kpc in comoving runs (as in every psibox table); radii are
 * proper; densities are physical.
 */
import type { Halo } from "../diagnostics/halo-catalogue.js";
import { CORE_RESOLVED_CELLS, coreRelationDensity, type HaloCore } from "../diagnostics/halo-core.js";
import { schiveCoreMass } from "../physics/cosmology/core-halo.js";
import type { FlatDensities } from "../physics/cosmology/overdensity.js";
import { writeHdf5Atomic } from "../io/h5.js";
import { numberAttr, textAttr } from "../io/h5-attrs.js";

const AXES = ["x", "y", "z"];

/** A halo is called resolved when its radius spans at least this many cells. */
export const RESOLVED_HALO_CELLS = 4;

/** Conversions of one snapshot from code units. */
export interface HaloScales {
  readonly kpc: number;
  readonly msun: number;
  readonly density: number;
  readonly kms: number;
  /** 1/s per 1/code time. */
  readonly perSecond: number;
  readonly a: number;
  /** Redshift (0 in a static box). */
  readonly z: number;
  readonly cosmology: FlatDensities | undefined;
  readonly particleMassEv: number;
  /** The particle mass in code mass units. */
  readonly particleMass: number;
  readonly cell: number;
}

/** A halo with its core (3D runs) and its track (when snapshots are followed). */
export interface HaloRecord {
  readonly halo: Halo;
  readonly core?: HaloCore;
  /** Mass inside the fitted core radius (code units), measured on the grid. */
  readonly coreMass?: number;
  readonly track?: number;
}

export interface HaloColumn {
  readonly name: string;
  readonly units: string;
  readonly meaning: string;
  readonly value: (h: HaloRecord, i: number, s: HaloScales) => number;
}

const fitted = (h: HaloRecord) => (h.core?.status === "fitted" ? h.core : undefined);
const properKpc = (r: number, s: HaloScales) => r * s.kpc * s.a;

/** The core columns of 3D runs: NaN where they do not apply. */
function coreColumns(): HaloColumn[] {
  return [
    { name: "core_resolved", units: "1", meaning: `1 when the core's half-density radius spans at least ${CORE_RESOLVED_CELLS} cells and the core profile was fitted, else 0`, value: (h) => (fitted(h) ? 1 : 0) },
    { name: "core_r_c_kpc", units: "kpc", meaning: "fitted core radius r_c (proper)", value: (h, _i, s) => (fitted(h) ? properKpc(fitted(h)!.rC, s) : NaN) },
    { name: "core_r_c_upper_kpc", units: "kpc", meaning: "unresolved core: upper limit on r_c (proper)", value: (h, _i, s) => (h.core?.status === "unresolved" ? properKpc(h.core.rCUpper, s) : NaN) },
    { name: "core_rho_c_Msun_kpc3", units: "Msun/kpc^3", meaning: "fitted central density (physical)", value: (h, _i, s) => (fitted(h) ? (fitted(h)!.rhoC * s.density) / s.a ** 3 : NaN) },
    {
      name: "core_relation_rho_c_Msun_kpc3",
      units: "Msun/kpc^3",
      meaning: "central density the core relation of Schive, Chiueh & Broadhurst (2014) gives for the fitted r_c (physical)",
      value: (h, _i, s) => (fitted(h) ? coreRelationDensity(properKpc(fitted(h)!.rC, s), s.particleMassEv) : NaN),
    },
    { name: "core_mass_Msun", units: "Msun", meaning: "mass inside the fitted core radius, measured on the grid", value: (h, _i, s) => (fitted(h) && h.coreMass !== undefined ? h.coreMass * s.msun : NaN) },
    {
      name: "core_halo_relation_mass_Msun",
      units: "Msun",
      meaning: "core mass the core-halo relation of Schive et al. (2014) gives for M at this redshift (an overlay, never fitted)",
      value: (h, _i, s) => schiveCoreMass(h.halo.mass * s.msun, s.particleMassEv, s.z, s.cosmology),
    },
  ];
}

/** The mode's rates of a virialised halo (the virial relations of psibox estimate), from M, R and σ. */
function clockColumns(dims: number): HaloColumn[] {
  return [
    { name: "particles_N", units: "1", meaning: "particles in the halo, N = M/m", value: (h, _i, s) => h.halo.mass / s.particleMass },
    {
      name: "rate_Nchi_per_s",
      units: "1/s",
      meaning: `virial estimate of the self-gravity rate N|chi| = 2 m <v^2>/hbar with <v^2> = ${dims} sigma^2 (hbar/m = 1 in code units)`,
      value: (h, _i, s) => 2 * dims * h.halo.dispersion ** 2 * s.perSecond,
    },
    { name: "lambda_per_s", units: "1/s", meaning: "breakdown rate estimate sqrt(4 pi G rho) of the mean density inside R (physical)", value: (h, _i, s) => Math.sqrt(h.halo.mass / ballMeasure(dims, h.halo.radius) / s.a ** 3) * s.perSecond },
  ];
}

function ballMeasure(dims: number, r: number): number {
  return dims === 1 ? 2 * r : dims === 2 ? Math.PI * r * r : (4 / 3) * Math.PI * r ** 3;
}

/** The catalogue's columns, for `dims` simulated axes, with the track column when snapshots are followed. */
export function haloColumns(dims: number, tracked: boolean): HaloColumn[] {
  const axes = AXES.slice(0, dims);
  return [
    { name: "halo", units: "1", meaning: "halo number in its snapshot, densest peak first", value: (_h, i) => i + 1 },
    ...(tracked ? [{ name: "track", units: "1", meaning: "track id (the halo's main progenitors share it; tracks.csv holds its history)", value: (h: HaloRecord) => h.track ?? NaN }] : []),
    ...axes.map((x, ax) => ({ name: `${x}_kpc`, units: "kpc", meaning: `centre, ${x} (comoving in comoving runs)`, value: (h: HaloRecord, _i: number, s: HaloScales) => h.halo.centre[ax]! * s.kpc })),
    { name: "M_Msun", units: "Msun", meaning: "mass inside R", value: (h, _i, s) => h.halo.mass * s.msun },
    { name: "R_kpc", units: "kpc", meaning: "radius where the mean enclosed density falls to the threshold (proper)", value: (h, _i, s) => properKpc(h.halo.radius, s) },
    { name: "R_cells", units: "1", meaning: "radius in cells", value: (h, _i, s) => h.halo.radius / s.cell },
    { name: "peak_density_Msun_kpc3", units: "Msun/kpc^3", meaning: "density of the peak cell (physical)", value: (h, _i, s) => (h.halo.peakDensity * s.density) / s.a ** 3 },
    ...axes.map((x, ax) => ({ name: `v${x}_km_s`, units: "km/s", meaning: `bulk peculiar velocity, ${x}`, value: (h: HaloRecord, _i: number, s: HaloScales) => h.halo.velocity[ax]! * s.kms })),
    { name: "sigma_km_s", units: "km/s", meaning: "one-dimensional velocity dispersion inside R (wave kinetic energy minus bulk flow)", value: (h, _i, s) => h.halo.dispersion * s.kms },
    { name: "resolved", units: "1", meaning: `1 when R spans at least ${RESOLVED_HALO_CELLS} cells, else 0`, value: (h, _i, s) => (h.halo.radius / s.cell >= RESOLVED_HALO_CELLS ? 1 : 0) },
    ...(dims === 3 ? coreColumns() : []),
    ...clockColumns(dims),
  ];
}

/** A column table as HDF5: one dataset per column with `units` and `long_name`, and the given attributes. */
export function writeColumnTable(file: string, title: string, columns: readonly { name: string; units: string; meaning: string }[], rows: readonly (readonly number[])[], attrs: Record<string, string | number>): void {
  writeHdf5Atomic(file, (f) => {
    textAttr(f, "Conventions", "CF-1.10");
    textAttr(f, "title", title);
    for (const [k, v] of Object.entries(attrs)) {
      if (typeof v === "number") numberAttr(f, k, v);
      else textAttr(f, k, v);
    }
    columns.forEach((c, j) => {
      const data = Float64Array.from(rows.map((r) => r[j]!));
      const ds = f.create_dataset({ name: c.name, data, shape: [data.length], dtype: "<d" });
      textAttr(ds, "units", c.units);
      textAttr(ds, "long_name", c.meaning);
    });
  });
}
