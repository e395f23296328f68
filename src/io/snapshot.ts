/**
 * psibox's snapshot file (HDF5), self-describing: everything needed to
 * rebuild the grid and the field, in physical units, with the resolved
 * config that made it.
 *
 * Layout (format "psibox snapshot", version 1):
 *   /                 attributes: format, format_version, software, kind ("snapshot" | "checkpoint"),
 *                     step, time + time_units, scale_factor, redshift (expanding runs),
 *                     background, hubble [km/s/Mpc], omega_matter, omega_radiation,
 *                     particle_mass + particle_mass_units ("eV"), gravity, mass + mass_units ("Msun"),
 *                     config (TOML text of the resolved config), config_sha256
 *   /grid             attributes: dims, cells, box_size + box_size_units ("kpc", comoving)
 *   /field/psi        float64 or float32, shape [cells..., 2]: real and imaginary parts of ψ with
 *                     |ψ|² the comoving mass density; attributes units ("(Msun/kpc^3)^(1/2)"),
 *                     components ("re,im"); dimensions labelled x, y, z (as many as the grid), part
 *   /state            checkpoints only: psi_code, phi_code (float64, code units, bit-exact state),
 *                     attributes time_code, mass_code, mass0_code, steps, wall_time_s, snapshots_written
 *   /state/plugins    checkpoints of runs with plug-ins that keep state: one attribute per plug-in, named
 *                     by it, holding JSON text {"version": n, "state": …} (the quantum sidecar's is "sidecar";
 *                     checkpoints written before plug-ins held the sidecar's state, unversioned, in an
 *                     attribute "sidecar" of /state, which is read as version 1)
 */
import { InputError } from "../core/errors.js";
import { Dataset, Group, hdf5Reason, openHdf5, writeHdf5Atomic, type H5File } from "./h5.js";

export const SNAPSHOT_FORMAT = "psibox snapshot";
export const SNAPSHOT_VERSION = 1;
/** Units of ψ in a snapshot. */
export const PSI_UNITS = "(Msun/kpc^3)^(1/2)";

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
  /** Each run plug-in's saved state by plug-in name: JSON text {"version": n, "state": …}. */
  readonly plugins?: Readonly<Record<string, string>>;
}

/** A snapshot in memory. `psi` is interleaved (re, im) in √(Msun/kpc³). */
export interface Snapshot {
  readonly meta: SnapshotMeta;
  readonly psi: Float64Array;
  /** Factor applied to psi as it is written, slab by slab (default 1: psi is written as given). */
  readonly psiScale?: number;
  readonly state?: CheckpointState;
}

function numberAttr(node: Group | H5File, name: string, value: number): void {
  node.create_attribute(name, value, [], "<d");
}

function intAttr(node: Group | H5File, name: string, value: number): void {
  node.create_attribute(name, new BigInt64Array([BigInt(value)]), [], "<q");
}

/** Rows along the first axis per chunk, aiming at about 2 MiB per chunk. */
function rowsPerChunk(cells: readonly number[], bytesPerValue: number): number {
  const rowValues = (cells.slice(1).reduce((p, n) => p * n, 1)) * 2;
  return Math.max(1, Math.min(cells[0] as number, Math.floor((2 << 20) / (rowValues * bytesPerValue))));
}

function writePsi(group: Group, name: string, cells: readonly number[], psi: Float64Array, precision: "float64" | "float32", scale = 1): Dataset {
  const shape = [...cells, 2];
  const bytes = precision === "float64" ? 8 : 4;
  const rows = rowsPerChunk(cells, bytes);
  const ds = group.create_dataset({
    name,
    data: precision === "float64" ? new Float64Array(0) : new Float32Array(0),
    shape: [0, ...shape.slice(1)],
    maxshape: shape,
    chunks: [rows, ...shape.slice(1)],
    dtype: precision === "float64" ? "<d" : "<f",
  });
  ds.resize(shape);
  const rowLength = psi.length / (cells[0] as number);
  for (let r0 = 0; r0 < (cells[0] as number); r0 += rows) {
    const r1 = Math.min(cells[0] as number, r0 + rows);
    const part = psi.subarray(r0 * rowLength, r1 * rowLength);
    const slab = scale === 1 ? part : part.map((v) => v * scale);
    ds.write_slice([[r0, r1], ...shape.slice(1).map(() => [] as [])], precision === "float64" ? slab : Float32Array.from(slab));
  }
  return ds;
}

/** Write a snapshot (or checkpoint) atomically. Call loadHdf5() first. */
export function writeSnapshot(file: string, snap: Snapshot, precision: "float64" | "float32" = "float64"): void {
  const m = snap.meta;
  writeHdf5Atomic(file, (f) => {
    f.create_attribute("format", SNAPSHOT_FORMAT);
    intAttr(f, "format_version", SNAPSHOT_VERSION);
    f.create_attribute("software", m.software);
    f.create_attribute("kind", m.kind);
    intAttr(f, "step", m.step);
    numberAttr(f, "time", m.time);
    f.create_attribute("time_units", m.timeUnit);
    numberAttr(f, "scale_factor", m.scaleFactor);
    if (m.redshift !== null) numberAttr(f, "redshift", m.redshift);
    f.create_attribute("background", m.background.kind);
    if (m.background.kind === "lcdm") {
      numberAttr(f, "hubble", m.background.hubbleKmSMpc);
      f.create_attribute("hubble_units", "km/s/Mpc");
      numberAttr(f, "omega_matter", m.background.omegaMatter);
      numberAttr(f, "omega_radiation", m.background.omegaRadiation);
    }
    numberAttr(f, "particle_mass", m.particleMassEv);
    f.create_attribute("particle_mass_units", "eV");
    f.create_attribute("gravity", m.gravity);
    numberAttr(f, "mass", m.massMsun);
    f.create_attribute("mass_units", "Msun");
    f.create_attribute("config", m.config);
    f.create_attribute("config_sha256", m.configSha256);

    const grid = f.create_group("grid");
    intAttr(grid, "dims", m.cells.length);
    grid.create_attribute("cells", new BigInt64Array(m.cells.map((n) => BigInt(n))), [m.cells.length], "<q");
    grid.create_attribute("box_size", Float64Array.from(m.boxSizeKpc), [m.boxSizeKpc.length], "<d");
    grid.create_attribute("box_size_units", "kpc");

    const field = f.create_group("field");
    const ds = writePsi(field, "psi", m.cells, snap.psi, precision, snap.psiScale);
    ds.create_attribute("units", PSI_UNITS);
    ds.create_attribute("components", "re,im");
    const labels = ["x", "y", "z"].slice(0, m.cells.length);
    labels.forEach((l, i) => ds.set_dimension_label(i, l));
    ds.set_dimension_label(m.cells.length, "part");

    if (snap.state) {
      const st = snap.state;
      const g = f.create_group("state");
      g.create_dataset({ name: "psi_code", data: st.psiCode, shape: [st.psiCode.length], dtype: "<d" });
      g.create_dataset({ name: "phi_code", data: st.phiCode, shape: [st.phiCode.length], dtype: "<d" });
      numberAttr(g, "time_code", st.timeCode);
      numberAttr(g, "mass_code", st.massCode);
      numberAttr(g, "mass0_code", st.mass0Code);
      intAttr(g, "steps", st.steps);
      numberAttr(g, "wall_time_s", st.wallTimeS);
      intAttr(g, "snapshots_written", st.snapshotsWritten);
      if (st.plugins && Object.keys(st.plugins).length) {
        const states = g.create_group("plugins");
        for (const [name, text] of Object.entries(st.plugins)) states.create_attribute(name, text);
      }
    }
  });
}

function attr(node: Group | H5File, name: string, file: string): unknown {
  const a = node.attrs[name];
  if (!a) throw new InputError(`${file}: not a psibox snapshot (attribute "${name}" is missing)`);
  const v = a.value;
  return typeof v === "bigint" ? Number(v) : v;
}

function numberOf(node: Group | H5File, name: string, file: string): number {
  const v = attr(node, name, file);
  const n = typeof v === "number" ? v : ArrayBuffer.isView(v) ? Number((v as unknown as ArrayLike<number | bigint>)[0]) : NaN;
  if (!Number.isFinite(n)) throw new InputError(`${file}: attribute "${name}" is not a number`);
  return n;
}

function stringOf(node: Group | H5File, name: string, file: string): string {
  const v = attr(node, name, file);
  if (typeof v !== "string") throw new InputError(`${file}: attribute "${name}" is not text`);
  return v;
}

function numbersOf(node: Group | H5File, name: string, file: string): number[] {
  const v = attr(node, name, file);
  if (typeof v === "number") return [v];
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number | bigint>, (x) => Number(x));
  throw new InputError(`${file}: attribute "${name}" is not a list of numbers`);
}

function readFloat64(ds: Dataset): Float64Array {
  const v = ds.value;
  if (v instanceof Float64Array) return v;
  if (v instanceof Float32Array) return Float64Array.from(v);
  throw new InputError(`dataset ${ds.path} is not floating point`);
}

/** Read a psibox snapshot or checkpoint; `withState` also reads a checkpoint's exact state. */
export function readSnapshot(file: string, withState = false): Snapshot {
  const f = openHdf5(file);
  try {
    const format = f.attrs["format"]?.value;
    if (format !== SNAPSHOT_FORMAT) throw new InputError(`${file}: not a psibox snapshot (no "format" attribute "${SNAPSHOT_FORMAT}")`);
    const version = numberOf(f, "format_version", file);
    if (version > SNAPSHOT_VERSION) throw new InputError(`${file}: snapshot format version ${version} is newer than this psibox reads (${SNAPSHOT_VERSION})`);
    const grid = f.get("grid");
    if (!(grid instanceof Group)) throw new InputError(`${file}: not a psibox snapshot (no /grid group)`);
    const cells = numbersOf(grid, "cells", file);
    const boxSizeKpc = numbersOf(grid, "box_size", file);
    const bgKind = stringOf(f, "background", file);
    const background: SnapshotBackground =
      bgKind === "lcdm"
        ? { kind: "lcdm", hubbleKmSMpc: numberOf(f, "hubble", file), omegaMatter: numberOf(f, "omega_matter", file), omegaRadiation: numberOf(f, "omega_radiation", file) }
        : { kind: "static" };
    const kind = stringOf(f, "kind", file);
    const meta: SnapshotMeta = {
      kind: kind === "checkpoint" ? "checkpoint" : "snapshot",
      software: stringOf(f, "software", file),
      step: numberOf(f, "step", file),
      time: numberOf(f, "time", file),
      timeUnit: stringOf(f, "time_units", file),
      scaleFactor: numberOf(f, "scale_factor", file),
      redshift: f.attrs["redshift"] ? numberOf(f, "redshift", file) : null,
      cells,
      boxSizeKpc,
      particleMassEv: numberOf(f, "particle_mass", file),
      gravity: stringOf(f, "gravity", file),
      background,
      massMsun: numberOf(f, "mass", file),
      config: stringOf(f, "config", file),
      configSha256: stringOf(f, "config_sha256", file),
    };
    const ds = f.get("field/psi");
    if (!(ds instanceof Dataset)) throw new InputError(`${file}: the snapshot has no /field/psi dataset`);
    const expected = [...cells, 2].join("×");
    if ((ds.shape ?? []).join("×") !== expected) {
      throw new InputError(`${file}: /field/psi has shape ${(ds.shape ?? []).join("×")}, expected ${expected}`);
    }
    const psi = readFloat64(ds);
    let state: CheckpointState | undefined;
    if (withState) {
      const g = f.get("state");
      const psiCode = f.get("state/psi_code");
      const phiCode = f.get("state/phi_code");
      if (!(g instanceof Group) || !(psiCode instanceof Dataset) || !(phiCode instanceof Dataset)) {
        throw new InputError(`${file}: not a checkpoint (no /state group with psi_code and phi_code)`);
      }
      state = {
        psiCode: readFloat64(psiCode),
        phiCode: readFloat64(phiCode),
        timeCode: numberOf(g, "time_code", file),
        massCode: numberOf(g, "mass_code", file),
        mass0Code: numberOf(g, "mass0_code", file),
        steps: numberOf(g, "steps", file),
        wallTimeS: numberOf(g, "wall_time_s", file),
        snapshotsWritten: numberOf(g, "snapshots_written", file),
        ...pluginStates(f, g, file),
      };
    }
    return state ? { meta, psi, state } : { meta, psi };
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${file}: cannot read the snapshot (${hdf5Reason(e)})`);
  } finally {
    f.close();
  }
}

/** The plug-in states of a checkpoint's /state group (see the layout above). */
function pluginStates(f: H5File, g: Group, file: string): { plugins?: Record<string, string> } {
  const plugins: Record<string, string> = {};
  const group = f.get("state/plugins");
  if (group instanceof Group) for (const name of Object.keys(group.attrs)) plugins[name] = stringOf(group, name, file);
  else if (g.attrs["sidecar"]) plugins["sidecar"] = `{"version":1,"state":${stringOf(g, "sidecar", file)}}`;
  return Object.keys(plugins).length ? { plugins } : {};
}
