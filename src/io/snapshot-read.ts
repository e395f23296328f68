/**
 * Reading psibox snapshots of every layout version (see snapshot-layout.ts):
 * version 1 (/grid and an interleaved /field/psi) and version 2 (netCDF-4/CF:
 * root attributes and the variables psi_re, psi_im). Both give the same
 * in-memory Snapshot; a checkpoint's exact state is read as stored.
 */
import { InputError } from "../core/errors.js";
import { Dataset, Group, hdf5Reason, openHdf5, type H5File } from "./h5.js";
import { Attributes, hasAttr, numberOf, numbersOf, stringOf, type AttrSource } from "./h5-attrs.js";
import { interleaved } from "./psi-interleave.js";
import { readFloat64, readSlabsTogether } from "./slabs.js";
import { readNative } from "./snapshot-native.js";
import { layoutVersion, readMeta } from "./snapshot-meta.js";
import { PSI_IM, PSI_RE, STATE, V1, speciesVariables } from "./snapshot-layout.js";
import type { CheckpointState, Snapshot, SnapshotMeta } from "./snapshot.js";

function dataset(f: H5File, name: string, file: string, what: string): Dataset {
  const ds = f.get(name);
  if (!(ds instanceof Dataset)) throw new InputError(`${file}: ${what} (no /${name} dataset)`);
  return ds;
}

function checkShape(ds: Dataset, expected: readonly number[], file: string): void {
  const shape = (ds.shape ?? []).join("×");
  if (shape !== expected.join("×")) throw new InputError(`${file}: ${ds.path} has shape ${shape}, expected ${expected.join("×")}`);
}

/** Version 1: ψ interleaved in /field/psi [cells..., 2]. */
function readPsiV1(f: H5File, cells: readonly number[], file: string): Float64Array {
  const ds = dataset(f, V1.psi, file, "the snapshot has no field");
  checkShape(ds, [...cells, 2], file);
  return readFloat64(ds, file);
}

/** Version 2: ψ as psi_re and psi_im (or a later species' pair) over the grid's dimensions, interleaved slab by slab. */
function readPsiV2(f: H5File, cells: readonly number[], file: string, names: readonly string[] = [PSI_RE, PSI_IM], into?: Float64Array): Float64Array {
  const re = dataset(f, names[0]!, file, "the snapshot has no field");
  const im = dataset(f, names[1]!, file, "the snapshot has no field");
  checkShape(re, cells, file);
  checkShape(im, cells, file);
  return interleaved(cells, (take) => readSlabsTogether([re, im], file, take), into);
}

/** The attributes that hold the grid: the root's (version 2) or /grid's (version 1). */
function gridAttributes(h5: H5File, root: Attributes, version: number, file: string): AttrSource {
  if (version !== 1) return root;
  const node = h5.get(V1.grid);
  if (!(node instanceof Group)) throw new InputError(`${file}: not a psibox snapshot (no /${V1.grid} group)`);
  return new Attributes(node);
}

/** The fields of the species after the first. */
function readSpeciesPsi(f: H5File, meta: SnapshotMeta, file: string): { speciesPsi?: Float64Array[] } {
  const later = (meta.species ?? []).slice(1);
  return later.length ? { speciesPsi: later.map((s) => readPsiV2(f, meta.cells, file, speciesVariables(s.name))) } : {};
}

/** The companion fields of a checkpoint's /state group, in order. */
function companionFields(f: H5File, file: string): { fieldsCode?: Float64Array[]; fieldsOwedKickCode?: number[] } {
  const fields: Float64Array[] = [];
  const owed: number[] = [];
  let own = false; // fields with their own gravity carry the kick they owe (tangents owe ψ's)
  for (let i = 1; ; i++) {
    const ds = f.get(`${STATE.group}/${STATE.field(i)}`);
    if (!(ds instanceof Dataset)) break;
    fields.push(readFloat64(ds, file));
    own ||= hasAttr(ds, "owed_kick_code");
    owed.push(hasAttr(ds, "owed_kick_code") ? numberOf(ds, "owed_kick_code", file) : Number.NaN);
  }
  return fields.length ? { fieldsCode: fields, ...(own ? { fieldsOwedKickCode: owed } : {}) } : {};
}

function readState(f: H5File, file: string): CheckpointState {
  const g = f.get(STATE.group);
  const psiCode = f.get(`${STATE.group}/${STATE.psi}`);
  const phiCode = f.get(`${STATE.group}/${STATE.phi}`);
  if (!(g instanceof Group) || !(psiCode instanceof Dataset) || !(phiCode instanceof Dataset)) {
    throw new InputError(`${file}: not a checkpoint (no /${STATE.group} group with ${STATE.psi} and ${STATE.phi})`);
  }
  const a = new Attributes(g);
  const owed = hasAttr(a, "owed_kick_code") ? numberOf(a, "owed_kick_code", file) : 0;
  return {
    psiCode: readFloat64(psiCode, file),
    phiCode: readFloat64(phiCode, file),
    timeCode: numberOf(a, "time_code", file),
    massCode: numberOf(a, "mass_code", file),
    mass0Code: numberOf(a, "mass0_code", file),
    ...(hasAttr(a, STATE.speciesMass0) ? { speciesMass0Code: numbersOf(a, STATE.speciesMass0, file) } : {}),
    steps: numberOf(a, "steps", file),
    wallTimeS: numberOf(a, "wall_time_s", file),
    snapshotsWritten: numberOf(a, "snapshots_written", file),
    ...(owed !== 0 ? { owedKickCode: owed } : {}),
    ...companionFields(f, file),
    ...pluginStates(f, a, file),
  };
}

/** The plug-in states of a checkpoint's /state group (see the layout). */
function pluginStates(f: H5File, g: Attributes, file: string): { plugins?: Record<string, string> } {
  const plugins: Record<string, string> = {};
  const group = f.get(`${STATE.group}/${STATE.plugins}`);
  if (group instanceof Group) {
    const states = new Attributes(group);
    for (const name of states.list()) plugins[name] = stringOf(states, name, file);
  }
  else if (hasAttr(g, "sidecar")) plugins["sidecar"] = `{"version":1,"state":${stringOf(g, "sidecar", file)}}`;
  return Object.keys(plugins).length ? { plugins } : {};
}

/** Open `file`, read what `read` takes from it, close it; HDF5 failures become an InputError naming the file. */
function withFile<T>(file: string, read: (f: H5File, version: number, root: Attributes) => T): T {
  const f = openHdf5(file);
  try {
    const root = new Attributes(f);
    return read(f, layoutVersion(root, file), root);
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${file}: cannot read the snapshot (${hdf5Reason(e)})`);
  } finally {
    f.close();
  }
}

/**
 * Read a psibox snapshot or checkpoint of any layout; `withState` also reads a checkpoint's exact state.
 * `into`: an array of ψ's length that ψ is read into instead of a new one (the caller's, no longer used:
 * reusing memory saves a page fault per 4 KiB of ψ and leaves no grid behind for the garbage collector).
 */
export function readSnapshot(file: string, withState = false, into?: Float64Array): Snapshot {
  return (withState ? undefined : readNative(file, true, into)) ?? readThroughHdf5(file, withState, into);
}

/** readSnapshot through h5wasm alone (what it falls back to: tests and benchmarks compare both). */
export function readThroughHdf5(file: string, withState = false, into?: Float64Array): Snapshot {
  return withFile(file, (f, version, root) => {
    const meta = readMeta(gridAttributes(f, root, version, file), root, file);
    const psi = version === 1 ? readPsiV1(f, meta.cells, file) : readPsiV2(f, meta.cells, file, [PSI_RE, PSI_IM], into);
    const species = version === 1 ? {} : readSpeciesPsi(f, meta, file);
    return withState ? { meta, psi, ...species, state: readState(f, file) } : { meta, psi, ...species };
  });
}

/** A checkpoint's metadata and exact state, without its field for readers (what a resume needs). */
export function readCheckpoint(file: string): { readonly meta: SnapshotMeta; readonly state: CheckpointState } {
  return withFile(file, (f, version, root) => ({ meta: readMeta(gridAttributes(f, root, version, file), root, file), state: readState(f, file) }));
}

/** Only the metadata of a psibox snapshot (the field is not read). */
export function readSnapshotMeta(file: string): SnapshotMeta {
  const native = readNative(file, false);
  if (native) return native.meta;
  return withFile(file, (f, version, root) => readMeta(gridAttributes(f, root, version, file), root, file));
}
