/**
 * psibox's snapshot file: HDF5 that is also a netCDF-4 file following the
 * CF conventions, self-describing (units, coordinates, constants, the
 * resolved config), so xarray, ncdump and h5py open it without psibox. The
 * layout is declared in snapshot-layout.ts; this module writes the current
 * version and snapshot-read.ts reads every version.
 */
import { InputError } from "../core/errors.js";
import { unitInSI } from "../physics/units.js";
import { writeHdf5Atomic, type Dataset, type Group, type H5File } from "./h5.js";
import { intAttr, intsAttr, numberAttr, numbersAttr, textAttr } from "./h5-attrs.js";
import { chunkedDataset, writeSlabs, writeVector } from "./slabs.js";
import {
  AXIS_NAMES,
  CF_CONVENTIONS,
  EQUATIONS,
  LAYOUT_COMMENT,
  LENGTH_UNITS,
  PSI_IM,
  PSI_RE,
  PSI_UNITS,
  SNAPSHOT_FORMAT,
  SNAPSHOT_VERSION,
  SPECIES_ATTRS,
  STATE,
  UNIT_SYSTEM,
  snapshotConstants,
  speciesVariables,
} from "./snapshot-layout.js";

export { SNAPSHOT_FORMAT, SNAPSHOT_VERSION, PSI_UNITS } from "./snapshot-layout.js";
export { readCheckpoint, readSnapshot, readSnapshotMeta } from "./snapshot-read.js";

/** Background as written in a snapshot. */
export type SnapshotBackground =
  | { readonly kind: "static" }
  | { readonly kind: "lcdm"; readonly hubbleKmSMpc: number; readonly omegaMatter: number; readonly omegaRadiation: number };

/** Metadata of a snapshot, in physical units. */
export interface SnapshotMeta {
  readonly kind: "snapshot" | "checkpoint";
  readonly software: string;
  readonly step: number;
  readonly time: number;
  readonly timeUnit: string;
  readonly scaleFactor: number;
  readonly redshift: number | null;
  readonly cells: readonly number[];
  readonly boxSizeKpc: readonly number[];
  readonly particleMassEv: number;
  readonly gravity: string;
  readonly background: SnapshotBackground;
  readonly massMsun: number;
  readonly config: string;
  readonly configSha256: string;
  /** The first field's contact interaction: its scattering length a_s [m] (0: none); undefined when read from a file written before it was recorded. */
  readonly scatteringLengthM?: number;
  /** Several species: each one's name, particle mass [eV], mass [Msun] and scattering length [m], the first one's field in `psi`. */
  readonly species?: readonly SpeciesMeta[];
}

/** A species of a file of several. */
export interface SpeciesMeta {
  readonly name: string;
  readonly particleMassEv: number;
  readonly massMsun: number;
  /** Its own contact interaction's scattering length a_s [m] (0: none); undefined when read from a file written before it was recorded. */
  readonly scatteringLengthM?: number;
}

/** The exact code-unit state a checkpoint carries for a bit-exact resume. */
export interface CheckpointState {
  readonly psiCode: Float64Array;
  readonly phiCode: Float64Array;
  readonly timeCode: number;
  readonly massCode: number;
  readonly mass0Code: number;
  readonly steps: number;
  readonly wallTimeS: number;
  readonly snapshotsWritten: number;
  /** The closing kick ψ still owes (psiCode is then ψ before it; 0 when ψ is current). */
  readonly owedKickCode?: number;
  /** The companion fields advanced beside ψ (code units, as stored, owing ψ's kick). */
  readonly fieldsCode?: readonly Float64Array[];
  /** Each run plug-in's saved state by plug-in name: JSON text {"version": n, "state": …}. */
  readonly plugins?: Readonly<Record<string, string>>;
  /** The kick each companion field owes, when it is not ψ's (fields with their own gravity); absent: ψ's. */
  readonly fieldsOwedKickCode?: readonly number[];
  /** The later species' masses at the start of the run (code units, in order), which the mass guard compares with; absent before it was recorded. */
  readonly speciesMass0Code?: readonly number[];
}

/** A snapshot in memory. `psi` is interleaved (re, im) in √(Msun/kpc³). */
export interface Snapshot {
  readonly meta: SnapshotMeta;
  readonly psi: Float64Array;
  /** Factor applied to psi as it is written, slab by slab (default 1: psi is written as given). */
  readonly psiScale?: number;
  /** Several species: the fields of the species after the first (meta.species[1 …]), like `psi`. */
  readonly speciesPsi?: readonly Float64Array[];
  readonly state?: CheckpointState;
}


/** An empty chunked variable of the grid's shape, attached to the coordinate variables. */
function gridVariable(f: H5File, name: string, cells: readonly number[], precision: "float64" | "float32"): Dataset {
  const ds = chunkedDataset(f, name, cells, precision);
  cells.forEach((_, axis) => ds.attach_scale(axis, AXIS_NAMES[axis] as string));
  return ds;
}

/** Write ψ (interleaved, times `scale`) as the two real variables, slab by slab along the first axis; `species` names its species. */
function writePsi(f: H5File, cells: readonly number[], psi: Float64Array, precision: "float64" | "float32", scale: number, species?: SpeciesMeta, names = [PSI_RE, PSI_IM]): void {
  const re = gridVariable(f, names[0]!, cells, precision);
  const im = gridVariable(f, names[1]!, cells, precision);
  for (const [ds, part] of [[re, "real"], [im, "imaginary"]] as const) {
    const whose = species ? ` of the species ${species.name}` : "";
    textAttr(ds, "long_name", `${part} part of the wave function psi${whose} (|psi|^2 is the comoving mass density)`);
    textAttr(ds, "units", PSI_UNITS);
    if (species) {
      textAttr(ds, "species", species.name);
      numberAttr(ds, "particle_mass", species.particleMassEv);
      textAttr(ds, "particle_mass_units", "eV");
    }
    const offset = part === "real" ? 0 : 1;
    const rowCells = psi.length / 2 / (cells[0] as number);
    writeSlabs(ds, cells, precision, (r0, _r1, out) => {
      const base = 2 * r0 * rowCells + offset;
      for (let i = 0; i < out.length; i++) out[i] = psi[base + 2 * i]! * scale;
    });
  }
}

/** The coordinate variables: comoving cell centres i·dx in kpc. */
function writeCoordinates(f: H5File, cells: readonly number[], boxKpc: readonly number[]): void {
  cells.forEach((n, axis) => {
    const name = AXIS_NAMES[axis] as string;
    const dx = (boxKpc[axis] as number) / n;
    const ds = f.create_dataset({ name, data: Float64Array.from({ length: n }, (_, i) => i * dx), shape: [n], dtype: "<d" });
    ds.make_scale(name);
    textAttr(ds, "long_name", `comoving ${name} (cell centres)`);
    textAttr(ds, "units", LENGTH_UNITS);
    textAttr(ds, "axis", name.toUpperCase());
    textAttr(ds, "comment", `periodic: the box spans [-dx/2, ${n} dx - dx/2) with dx = ${dx} kpc`);
  });
}

/** A netCDF dimension without a coordinate variable (netCDF-4's own form), in a group. */
function bareDimension(g: Group, name: string, length: number): void {
  const ds = g.create_dataset({ name, data: new Float32Array(0), shape: [0], maxshape: [length], chunks: [Math.min(length, 1024)], dtype: "<f" });
  ds.resize([length]);
  ds.make_scale(`This is a netCDF dimension but not a netCDF variable.${String(length).padStart(10)}`);
}

function writeState(f: H5File, st: CheckpointState): void {
  const g = f.create_group(STATE.group);
  bareDimension(g, STATE.psiDim, st.psiCode.length);
  bareDimension(g, STATE.phiDim, st.phiCode.length);
  const psi = writeVector(g, STATE.psi, st.psiCode);
  psi.attach_scale(0, `${STATE.group}/${STATE.psiDim}`);
  textAttr(psi, "long_name", "exact state: psi in code units, interleaved (re, im)");
  const phi = writeVector(g, STATE.phi, st.phiCode);
  phi.attach_scale(0, `${STATE.group}/${STATE.phiDim}`);
  textAttr(phi, "long_name", "exact state: the potential phi in code units");
  (st.fieldsCode ?? []).forEach((field, i) => {
    const ds = writeVector(g, STATE.field(i + 1), field);
    ds.attach_scale(0, `${STATE.group}/${STATE.psiDim}`);
    textAttr(ds, "long_name", `exact state: companion field ${i + 1} in code units, interleaved (re, im)`);
    const owed = st.fieldsOwedKickCode?.[i];
    if (owed !== undefined) numberAttr(ds, "owed_kick_code", owed);
  });
  numberAttr(g, "time_code", st.timeCode);
  numberAttr(g, "mass_code", st.massCode);
  numberAttr(g, "mass0_code", st.mass0Code);
  if (st.speciesMass0Code?.length) numbersAttr(g, STATE.speciesMass0, st.speciesMass0Code);
  numberAttr(g, "owed_kick_code", st.owedKickCode ?? 0);
  intAttr(g, "steps", st.steps);
  numberAttr(g, "wall_time_s", st.wallTimeS);
  intAttr(g, "snapshots_written", st.snapshotsWritten);
  if (st.plugins && Object.keys(st.plugins).length) {
    const states = g.create_group(STATE.plugins);
    for (const [name, text] of Object.entries(st.plugins)) textAttr(states, name, text);
  }
}

/** The global attributes: what, when, in which units, with which constants. */
function writeGlobals(f: H5File, m: SnapshotMeta): void {
  textAttr(f, "Conventions", CF_CONVENTIONS);
  textAttr(f, "title", `psibox ${m.kind} at step ${m.step}`);
  textAttr(f, "source", m.software);
  textAttr(f, "format", SNAPSHOT_FORMAT);
  intAttr(f, "format_version", SNAPSHOT_VERSION);
  textAttr(f, "software", m.software);
  textAttr(f, "kind", m.kind);
  intAttr(f, "step", m.step);
  numberAttr(f, "time", m.time);
  textAttr(f, "time_units", m.timeUnit);
  textAttr(f, "time_origin", m.background.kind === "lcdm" ? "the big bang (cosmic time)" : "the start of the run");
  numberAttr(f, "scale_factor", m.scaleFactor);
  if (m.redshift !== null) numberAttr(f, "redshift", m.redshift);
  textAttr(f, "background", m.background.kind);
  if (m.background.kind === "lcdm") {
    const bg = m.background;
    textAttr(f, "cosmology", "flat LCDM (comoving box)");
    numberAttr(f, "hubble", bg.hubbleKmSMpc);
    textAttr(f, "hubble_units", "km/s/Mpc");
    numberAttr(f, "omega_matter", bg.omegaMatter);
    numberAttr(f, "omega_radiation", bg.omegaRadiation);
    numberAttr(f, "omega_lambda", 1 - bg.omegaMatter - bg.omegaRadiation);
  } else {
    textAttr(f, "cosmology", "static (no expansion, scale factor 1)");
  }
  numberAttr(f, "particle_mass", m.particleMassEv);
  textAttr(f, "particle_mass_units", "eV");
  textAttr(f, "gravity", m.gravity);
  if (m.scatteringLengthM !== undefined) {
    numberAttr(f, "scattering_length", m.scatteringLengthM);
    textAttr(f, "scattering_length_units", "m");
  }
  numberAttr(f, "mass", m.massMsun);
  textAttr(f, "mass_units", "Msun");
  intsAttr(f, "cells", m.cells);
  numbersAttr(f, "box_size", m.boxSizeKpc);
  textAttr(f, "box_size_units", LENGTH_UNITS);
  textAttr(f, "unit_system", UNIT_SYSTEM);
  for (const c of snapshotConstants(m.timeUnit, timeUnitSeconds(m.timeUnit))) {
    numberAttr(f, c.name, c.value);
    textAttr(f, `${c.name}_units`, c.units);
  }
  textAttr(f, "equations", EQUATIONS);
  textAttr(f, "comment", LAYOUT_COMMENT);
  textAttr(f, "config", m.config);
  textAttr(f, "config_sha256", m.configSha256);
  if (m.species) {
    textAttr(f, SPECIES_ATTRS.names, m.species.map((s) => s.name).join(" "));
    numbersAttr(f, SPECIES_ATTRS.particleMass, m.species.map((s) => s.particleMassEv));
    numbersAttr(f, SPECIES_ATTRS.mass, m.species.map((s) => s.massMsun));
    numbersAttr(f, SPECIES_ATTRS.scatteringLength, m.species.map((s) => s.scatteringLengthM ?? 0));
    textAttr(f, `${SPECIES_ATTRS.scatteringLength}_units`, "m");
  }
}

/** The fields of the species after the first, each in its own pair of variables. */
function writeSpecies(f: H5File, snap: Snapshot, precision: "float64" | "float32"): void {
  const species = snap.meta.species ?? [];
  const fields = snap.speciesPsi ?? [];
  if (fields.length !== Math.max(0, species.length - 1)) throw new RangeError(`a snapshot of ${species.length} species needs ${Math.max(0, species.length - 1)} more fields, got ${fields.length}`);
  fields.forEach((psi, i) => {
    const sp = species[i + 1]!;
    writePsi(f, snap.meta.cells, psi, precision, snap.psiScale ?? 1, sp, [...speciesVariables(sp.name)]);
  });
}

function timeUnitSeconds(unit: string): number {
  try {
    return unitInSI(unit);
  } catch {
    throw new InputError(`snapshot time unit "${unit}" is not a time unit psibox knows (e.g. Myr, Gyr, s)`);
  }
}

/** Write a snapshot (or checkpoint) atomically in the current layout. Call loadHdf5() first. */
export function writeSnapshot(file: string, snap: Snapshot, precision: "float64" | "float32" = "float64"): void {
  const m = snap.meta;
  writeHdf5Atomic(
    file,
    (f) => {
      writeGlobals(f, m);
      writeCoordinates(f, m.cells, m.boxSizeKpc);
      writePsi(f, m.cells, snap.psi, precision, snap.psiScale ?? 1, m.species?.[0]);
      writeSpecies(f, snap, precision);
      if (snap.state) writeState(f, snap.state);
    },
    { track_order: true },
  );
}
