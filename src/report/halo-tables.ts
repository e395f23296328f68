/**
 * The halo catalogue of one snapshot (diagnostics/halo-catalogue.ts), in
 * physical units: halos.csv and halos.h5, with the columns declared in
 * halo-columns.ts. When a run's snapshots are followed (RunTracks), each
 * halo gets its track id and its row goes into the track table too.
 */
import path from "node:path";
import type { Snapshot } from "../io/snapshot.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { ballMass, ballVolume, findHalos, type Halo } from "../diagnostics/halo-catalogue.js";
import { haloCore } from "../diagnostics/halo-core.js";
import { overdensityThreshold, type OverdensityDefinition, type OverdensityThreshold } from "../physics/cosmology/overdensity.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { csvTable } from "./csv-table.js";
import { haloColumns, RESOLVED_HALO_CELLS, writeColumnTable, type HaloRecord, type HaloScales } from "./halo-columns.js";
import type { RunTracks } from "./halo-track-table.js";

export { RESOLVED_HALO_CELLS } from "./halo-columns.js";

const KPC = 1e3 * PC_M;

/** What the user chose for the catalogue. */
export interface HaloRequest {
  readonly definition: OverdensityDefinition;
  /** Smallest halo mass [Msun]; undefined: the mass of a halo of radius 2 cells at the threshold. */
  readonly minMassMsun?: number;
}

/** The conversions of a snapshot's code units. */
function scalesOf(snap: Snapshot, field: LoadedField): HaloScales {
  const { grid, units, scaleFactor: a } = field;
  const bg = snap.meta.background;
  return {
    kpc: units.lengthM / KPC,
    msun: units.massKg / M_SUN_KG,
    density: units.massKg / units.lengthM ** 3 / (M_SUN_KG / KPC ** 3),
    kms: units.lengthM / units.timeS / 1e3,
    perSecond: 1 / units.timeS,
    a,
    z: bg.kind === "lcdm" ? 1 / a - 1 : 0,
    cosmology: bg.kind === "lcdm" ? { omegaMatter: bg.omegaMatter, omegaRadiation: bg.omegaRadiation } : undefined,
    particleMassEv: snap.meta.particleMassEv,
    particleMass: units.particleMassKg / units.massKg,
    cell: Math.max(...grid.lengths.map((l, i) => l / grid.cells[i]!)),
  };
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

/** A halo's core (3D runs), measured around its centre out to a radius of at least 6 cells, and the mass inside a fitted core. */
function withCore(field: LoadedField, h: Halo, cell: number): HaloRecord {
  const { grid, psi } = field;
  if (grid.dims !== 3) return { halo: h };
  const core = haloCore(grid, psi, h.centre, Math.min(Math.max(h.radius, 6 * cell), Math.min(...grid.lengths) / 4));
  return core.status === "fitted" ? { halo: h, core, coreMass: ballMass(grid, psi, h.centre, core.rC) } : { halo: h, core };
}

/**
 * Find the halos of a snapshot and write halos.csv and halos.h5 into `outDir` (with track ids when `tracks` follows
 * the run); returns the catalogue's part of summary.json. `scratch`: a grid of at least one number per cell it may overwrite.
 */
export function haloTables(file: string, snap: Snapshot, field: LoadedField, outDir: string, request: HaloRequest, tracks?: RunTracks, scratch?: Float64Array): Record<string, unknown> {
  const { grid, psi, scaleFactor: a } = field;
  const s = scalesOf(snap, field);
  const { code, physical } = threshold(snap, field, request.definition, file);
  const minMass = request.minMassMsun !== undefined ? request.minMassMsun / s.msun : code * ballVolume(grid.dims, 2 * s.cell);
  const found = findHalos(grid, psi, { threshold: code, minMass, a }, scratch);
  const ids = tracks?.assign(file, snap, field, found);
  const records = found.map((h, i) => ({ ...withCore(field, h, s.cell), ...(ids ? { track: ids[i]! } : {}) }));
  const cols = haloColumns(grid.dims, ids !== undefined);
  const rows = records.map((h, i) => cols.map((c) => c.value(h, i, s)));
  writeFileAtomic(path.join(outDir, "halos.csv"), csvTable(cols.map((c) => c.name), rows));
  const thresholdMsunKpc3 = physical.density * s.density;
  writeColumnTable(path.join(outDir, "halos.h5"), `psibox halo catalogue of ${path.basename(file)}`, cols, rows, {
    overdensity_definition: `${physical.definition}: mean density inside R = ${physical.delta.toPrecision(6)} x the ${physical.reference} density`,
    overdensity: physical.delta,
    threshold_density_Msun_kpc3: thresholdMsunKpc3,
    scale_factor: a,
  });
  tracks?.add(cols, rows, physical.definition);
  return {
    definition: physical.definition,
    overdensity: physical.delta,
    reference: physical.reference,
    threshold_density_Msun_kpc3: thresholdMsunKpc3,
    min_mass_Msun: minMass * s.msun,
    count: found.length,
    resolved: found.filter((h) => h.radius / s.cell >= RESOLVED_HALO_CELLS).length,
    ...(grid.dims === 3 ? { cores_fitted: records.filter((h) => h.core?.status === "fitted").length } : {}),
  };
}
