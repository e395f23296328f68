/**
 * A psibox snapshot of the current layout read without h5wasm: the root's
 * attributes, its datasets and the pieces of the file their rows lie in, all
 * from the HDF5 file format's own structures (h5-native.ts; kept while the
 * bytes they were read from are unchanged: h5-memo.ts), then the rows read
 * with one system call per piece and slab. A file with anything that reader
 * does not place (an earlier layout, filters, other chunking, big-endian
 * values, an unusual structure) gives undefined, having returned nothing, and
 * is read through h5wasm with the same values.
 */
import fs from "node:fs";
import { parsedOnce } from "./h5-memo.js";
import { NativeRoot, type PlacedDataset } from "./h5-native.js";
import { newPsi, readIntoPsi } from "./shared-read.js";
import { layoutVersion, readMeta } from "./snapshot-meta.js";
import { PSI_IM, PSI_RE, speciesVariables } from "./snapshot-layout.js";
import type { Snapshot, SnapshotMeta } from "./snapshot.js";

/** The metadata of the snapshot open as `fd`; undefined for an earlier layout. */
function placeMeta(fd: number, file: string): SnapshotMeta | undefined {
  const root = new NativeRoot(fd);
  return layoutVersion(root.attributes, file) === 2 ? readMeta(root.attributes, root.attributes, file) : undefined;
}

/** The placed parts (real, imaginary) of each species' ψ in the snapshot open as `fd`, of metadata `meta`. */
function placeFields(fd: number, meta: SnapshotMeta): PlacedDataset[][] {
  const root = new NativeRoot(fd);
  const names = [[PSI_RE, PSI_IM], ...(meta.species ?? []).slice(1).map((s) => speciesVariables(s.name))];
  const cells = meta.cells.join("×");
  return names.map((pair) => {
    const parts = pair.map((n) => root.dataset(n));
    if (parts.some((p) => p.shape.join("×") !== cells || p.size !== parts[0]!.size)) throw new RangeError("ψ's parts differ from the grid");
    return parts;
  });
}

/** ψ from its placed `parts` (real, imaginary), each of the grid's shape, into `into` when it has ψ's length. */
function readPsi(fd: number, meta: SnapshotMeta, file: string, parts: readonly PlacedDataset[], into?: Float64Array): Float64Array {
  const length = 2 * meta.cells.reduce((p, n) => p * n, 1);
  const psi = into?.length === length ? into : newPsi(length, length / 2 / meta.cells[0]!);
  readIntoPsi(fd, file, parts.map((p) => p.path), parts.map((p) => p.pieces), parts[0]!.shape, parts[0]!.size, psi);
  return psi;
}

/**
 * The snapshot `file` read without h5wasm: its metadata, and with `field` its fields (ψ into `into` when it has ψ's
 * length); undefined when the file is not one this reader places (a checkpoint's state is never read here).
 */
export function readNative(file: string, field: false): { meta: SnapshotMeta } | undefined;
export function readNative(file: string, field: true, into?: Float64Array): Snapshot | undefined;
export function readNative(file: string, field: boolean, into?: Float64Array): Snapshot | { meta: SnapshotMeta } | undefined {
  let fd: number;
  try {
    fd = fs.openSync(file, "r");
  } catch {
    return undefined;
  }
  try {
    // the structures' parse is kept (h5-memo.ts): each caller gets its own copy of the metadata
    const kept = parsedOnce(fd, `meta ${file}`, () => placeMeta(fd, file));
    if (!kept) return undefined;
    const meta = structuredClone(kept);
    if (!field) return { meta };
    const [first, ...later] = parsedOnce(fd, `fields ${file}`, () => placeFields(fd, kept));
    const psi = readPsi(fd, meta, file, first!, into);
    return later.length ? { meta, psi, speciesPsi: later.map((parts) => readPsi(fd, meta, file, parts)) } : { meta, psi };
  } catch {
    return undefined;
  } finally {
    fs.closeSync(fd);
  }
}
