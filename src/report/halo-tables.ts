/**
 * The halo catalogue of one snapshot (diagnostics/halo-catalogue.ts), in
 * physical units: halos.csv and halos.h5, declared once by the column table
 * below (name, units, meaning, value). Positions are comoving kpc in
 * comoving runs (as in every psibox table); the radius is given both
 * proper (`R_kpc`) and in cells; densities are physical.
 */
import path from "node:path";
import type { Snapshot } from "../io/snapshot.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { writeHdf5Atomic } from "../io/h5.js";
import { numberAttr, textAttr } from "../io/h5-attrs.js";
import { ballVolume, findHalos, type Halo } from "../diagnostics/halo-catalogue.js";
import { CORE_RESOLVED_CELLS, coreRelationDensity, haloCore, type HaloCore } from "../diagnostics/halo-core.js";
import { overdensityThreshold, type OverdensityDefinition, type OverdensityThreshold } from "../physics/cosmology/overdensity.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { csvTable } from "./csv-table.js";

const KPC = 1e3 * PC_M;
const AXES = ["x", "y", "z"];

/** A halo is called resolved when its radius spans at least this many cells. */
export const RESOLVED_HALO_CELLS = 4;

/** What the user chose for the catalogue. */
export interface HaloRequest {
  readonly definition: OverdensityDefinition;
  /** Smallest halo mass [Msun]; undefined: the mass of a halo of radius 2 cells at the threshold. */
  readonly minMassMsun?: number;
}

interface Scales {
  readonly kpc: number;
  readonly msun: number;
  readonly density: number;
  readonly kms: number;
  readonly a: number;
  readonly cell: number;
}

/** A halo with its core (3D runs). */
type CatalogueHalo = Halo & { readonly core?: HaloCore };

interface Column {
  readonly name: string;
  readonly units: string;
  readonly meaning: string;
  readonly value: (h: CatalogueHalo, i: number, s: Scales) => number | string;
}

/** The core columns of 3D runs: NaN where they do not apply. */
function coreColumns(particleMassEv: number): Column[] {
  const fitted = (h: CatalogueHalo) => (h.core?.status === "fitted" ? h.core : undefined);
  const properKpc = (r: number, s: Scales) => r * s.kpc * s.a;
  return [
    { name: "core_resolved", units: "1", meaning: `1 when the core's half-density radius spans at least ${CORE_RESOLVED_CELLS} cells and the core profile was fitted, else 0`, value: (h) => (fitted(h) ? 1 : 0) },
    { name: "core_r_c_kpc", units: "kpc", meaning: "fitted core radius r_c (proper)", value: (h, _i, s) => (fitted(h) ? properKpc(fitted(h)!.rC, s) : NaN) },
    { name: "core_r_c_upper_kpc", units: "kpc", meaning: "unresolved core: upper limit on r_c (proper)", value: (h, _i, s) => (h.core?.status === "unresolved" ? properKpc(h.core.rCUpper, s) : NaN) },
    { name: "core_rho_c_Msun_kpc3", units: "Msun/kpc^3", meaning: "fitted central density (physical)", value: (h, _i, s) => (fitted(h) ? (fitted(h)!.rhoC * s.density) / s.a ** 3 : NaN) },
    {
      name: "core_relation_rho_c_Msun_kpc3",
      units: "Msun/kpc^3",
      meaning: "central density the core relation of Schive, Chiueh & Broadhurst (2014) gives for the fitted r_c (physical)",
      value: (h, _i, s) => (fitted(h) ? coreRelationDensity(properKpc(fitted(h)!.rC, s), particleMassEv) : NaN),
    },
  ];
}

/** The catalogue's columns, for `dims` simulated axes (one declaration for the CSV and the HDF5 file). */
function columns(dims: number, particleMassEv: number): Column[] {
  const axes = AXES.slice(0, dims);
  return [
    { name: "halo", units: "1", meaning: "halo number, densest peak first", value: (_h, i) => i + 1 },
    ...axes.map((x, ax) => ({ name: `${x}_kpc`, units: "kpc", meaning: `centre, ${x} (comoving in comoving runs)`, value: (h: Halo, _i: number, s: Scales) => h.centre[ax]! * s.kpc })),
    { name: "M_Msun", units: "Msun", meaning: "mass inside R", value: (h, _i, s) => h.mass * s.msun },
    { name: "R_kpc", units: "kpc", meaning: "radius where the mean enclosed density falls to the threshold (proper)", value: (h, _i, s) => h.radius * s.kpc * s.a },
    { name: "R_cells", units: "1", meaning: "radius in cells", value: (h, _i, s) => h.radius / s.cell },
    { name: "peak_density_Msun_kpc3", units: "Msun/kpc^3", meaning: "density of the peak cell (physical)", value: (h, _i, s) => (h.peakDensity * s.density) / s.a ** 3 },
    ...axes.map((x, ax) => ({ name: `v${x}_km_s`, units: "km/s", meaning: `bulk peculiar velocity, ${x}`, value: (h: Halo, _i: number, s: Scales) => h.velocity[ax]! * s.kms })),
    { name: "sigma_km_s", units: "km/s", meaning: "one-dimensional velocity dispersion inside R (wave kinetic energy minus bulk flow)", value: (h, _i, s) => h.dispersion * s.kms },
    { name: "resolved", units: "1", meaning: `1 when R spans at least ${RESOLVED_HALO_CELLS} cells, else 0`, value: (h, _i, s) => (h.radius / s.cell >= RESOLVED_HALO_CELLS ? 1 : 0) },
    ...(dims === 3 ? coreColumns(particleMassEv) : []),
  ];
}

/** The threshold of the chosen definition for this snapshot, in code units (comoving density) and physical. */
function threshold(snap: Snapshot, field: LoadedField, definition: OverdensityDefinition, file: string): { code: number; physical: OverdensityThreshold } {
  const { background, scaleFactor: a, psi, grid } = field;
  let mean = 0;
  for (let p = 0; p < grid.size; p++) mean += psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
  mean /= grid.size;
  const bg = snap.meta.background;
  const cosmology = bg.kind === "lcdm" ? { omegaMatter: bg.omegaMatter, omegaRadiation: bg.omegaRadiation } : undefined;
  // critical density 3H²/(8πG) = 1.5 H² in code units (4πG = 1), physical
  const critical = cosmology ? 1.5 * background.hubble(a) ** 2 : undefined;
  const physical = overdensityThreshold(definition, 1 / a - 1, critical, mean / a ** 3, cosmology, file);
  return { code: physical.density * a ** 3, physical };
}

/** Refuse, before anything is written, a definition the snapshot cannot use (one that needs a cosmology, in a static box). */
export function checkHaloRequest(request: HaloRequest, snap: Snapshot, file: string): void {
  if (snap.meta.background.kind === "static") overdensityThreshold(request.definition, 0, undefined, 1, undefined, file);
}

/** Find the halos of a snapshot and write halos.csv and halos.h5 into `outDir`; returns the catalogue's part of summary.json. */
export function haloTables(file: string, snap: Snapshot, field: LoadedField, outDir: string, request: HaloRequest): Record<string, unknown> {
  const { grid, units, psi, scaleFactor: a } = field;
  const s: Scales = {
    kpc: units.lengthM / KPC,
    msun: units.massKg / M_SUN_KG,
    density: units.massKg / units.lengthM ** 3 / (M_SUN_KG / KPC ** 3),
    kms: units.lengthM / units.timeS / 1e3,
    a,
    cell: Math.max(...grid.lengths.map((l, i) => l / grid.cells[i]!)),
  };
  const { code, physical } = threshold(snap, field, request.definition, file);
  const minMass = request.minMassMsun !== undefined ? request.minMassMsun / s.msun : code * ballVolume(grid.dims, 2 * s.cell);
  const found = findHalos(grid, psi, { threshold: code, minMass, a });
  const rMax = (h: Halo) => Math.min(Math.max(h.radius, 6 * s.cell), Math.min(...grid.lengths) / 4);
  const halos: CatalogueHalo[] = grid.dims === 3 ? found.map((h) => ({ ...h, core: haloCore(grid, psi, h.centre, rMax(h)) })) : found;
  const cols = columns(grid.dims, snap.meta.particleMassEv);
  const rows = halos.map((h, i) => cols.map((c) => c.value(h, i, s)));
  writeFileAtomic(path.join(outDir, "halos.csv"), csvTable(cols.map((c) => c.name), rows));
  const thresholdMsunKpc3 = physical.density * s.density;
  writeHdf5Atomic(path.join(outDir, "halos.h5"), (f) => {
    textAttr(f, "Conventions", "CF-1.10");
    textAttr(f, "title", `psibox halo catalogue of ${path.basename(file)}`);
    textAttr(f, "overdensity_definition", `${physical.definition}: mean density inside R = ${physical.delta.toPrecision(6)} x the ${physical.reference} density`);
    numberAttr(f, "overdensity", physical.delta);
    numberAttr(f, "threshold_density_Msun_kpc3", thresholdMsunKpc3);
    numberAttr(f, "scale_factor", a);
    cols.forEach((c, j) => {
      const data = Float64Array.from(rows.map((r) => Number(r[j])));
      const ds = f.create_dataset({ name: c.name, data, shape: [data.length], dtype: "<d" });
      textAttr(ds, "units", c.units);
      textAttr(ds, "long_name", c.meaning);
    });
  });
  return {
    definition: physical.definition,
    overdensity: physical.delta,
    reference: physical.reference,
    threshold_density_Msun_kpc3: thresholdMsunKpc3,
    min_mass_Msun: minMass * s.msun,
    count: halos.length,
    resolved: halos.filter((h) => h.radius / s.cell >= RESOLVED_HALO_CELLS).length,
    ...(grid.dims === 3 ? { cores_fitted: halos.filter((h) => h.core?.status === "fitted").length } : {}),
  };
}
