/**
 * A psibox snapshot of the current layout read without h5wasm: the root's
 * attributes, its datasets and the pieces of the file their rows lie in, all
 * from the HDF5 file format's own structures (h5-native.ts), then the rows
 * read with one system call per piece and slab. A file with anything that
 * reader does not place (an earlier layout, filters, other chunking,
 * big-endian values, an unusual structure) gives undefined, having returned
 * nothing, and is read through h5wasm with the same values.
 */
import fs from "node:fs";
import { withBlocks } from "./h5-file.js";
import { NativeRoot } from "./h5-native.js";
import { newPsi, readIntoPsi } from "./shared-read.js";
import { layoutVersion, readMeta } from "./snapshot-meta.js";
import { PSI_IM, PSI_RE, speciesVariables } from "./snapshot-layout.js";
import type { Snapshot, SnapshotMeta } from "./snapshot.js";

/** ψ of the variables `names` (real, imaginary), each of the grid's shape, into `into` when it has ψ's length. */
function readPsi(fd: number, root: NativeRoot, meta: SnapshotMeta, file: string, names: readonly string[], into?: Float64Array): Float64Array {
  const parts = names.map((n) => root.dataset(n));
  const cells = meta.cells.join("×");
  if (parts.some((p) => p.shape.join("×") !== cells || p.size !== parts[0]!.size)) throw new RangeError("ψ's parts differ from the grid");
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
    return withBlocks(fd, () => {
      const root = new NativeRoot(fd);
      if (layoutVersion(root.attributes, file) !== 2) return undefined;
      const meta = readMeta(root.attributes, root.attributes, file);
      if (!field) return { meta };
      const psi = readPsi(fd, root, meta, file, [PSI_RE, PSI_IM], into);
      const later = (meta.species ?? []).slice(1);
      return later.length ? { meta, psi, speciesPsi: later.map((s) => readPsi(fd, root, meta, file, speciesVariables(s.name))) } : { meta, psi };
    });
  } catch {
    return undefined;
  } finally {
    fs.closeSync(fd);
  }
}
