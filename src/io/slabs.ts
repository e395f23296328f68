/**
 * Datasets read and written slab by slab along their first axis, so that no
 * single h5wasm call, and no allocation in its heap (which cannot grow past
 * 2 GiB and never shrinks), holds a whole grid: a 512³ complex field is 2 GiB.
 * A slab is a whole number of rows (all of the other axes) of about
 * `slabBytes()`, and the datasets psibox writes are chunked by the same rows,
 * so each call touches whole chunks.
 */
import fs from "node:fs";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { h5Module, type Dataset, type Group, type H5File } from "./h5.js";
import { placeRows, type Piece } from "./h5-layout.js";
import { inOrder, readPieces, readRowsAtOnce, slabRows, type Take } from "./row-read.js";

/** The hyperslab of rows [r0, r1) of a dataset of `rank` axes. */
function rows(r0: number, r1: number, rank: number): [number, number][] {
  return [[r0, r1], ...Array.from({ length: rank - 1 }, () => [] as unknown as [number, number])];
}

/** An empty chunked float dataset of `shape`, chunked by slab rows, to be filled with writeSlabs. */
export function chunkedDataset(node: H5File | Group, name: string, shape: readonly number[], precision: "float64" | "float32" = "float64"): Dataset {
  const chunkRows = slabRows(shape, precision === "float64" ? 8 : 4);
  const ds = node.create_dataset({
    name,
    data: precision === "float64" ? new Float64Array(0) : new Float32Array(0),
    shape: [0, ...shape.slice(1)],
    maxshape: [...shape],
    chunks: [chunkRows, ...shape.slice(1)],
    dtype: precision === "float64" ? "<d" : "<f",
  });
  ds.resize([...shape]);
  return ds;
}

/**
 * Fill a dataset of `shape` slab by slab: `fill(r0, r1, out)` writes rows [r0, r1)
 * into `out` (a reused buffer of the dataset's precision, exactly that long).
 */
export function writeSlabs(ds: Dataset, shape: readonly number[], precision: "float64" | "float32", fill: (r0: number, r1: number, out: Float64Array | Float32Array) => void): void {
  const step = slabRows(shape, precision === "float64" ? 8 : 4);
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  const buffer = precision === "float64" ? new Float64Array(step * rowValues) : new Float32Array(step * rowValues);
  for (let r0 = 0; r0 < (shape[0] as number); r0 += step) {
    const r1 = Math.min(shape[0] as number, r0 + step);
    const out = buffer.subarray(0, (r1 - r0) * rowValues);
    fill(r0, r1, out);
    ds.write_slice(rows(r0, r1, shape.length), out);
  }
}

/** A whole float64 array written as a chunked one-dimensional dataset, slab by slab. */
export function writeVector(node: H5File | Group, name: string, values: Float64Array): Dataset {
  const ds = chunkedDataset(node, name, [values.length]);
  writeSlabs(ds, [values.length], "float64", (r0, r1, out) => out.set(values.subarray(r0, r1)));
  return ds;
}

/** The datasets' slabs read straight from the file (see h5-layout.ts); false, having read nothing, where a layout is not simple. */
function readDirect(datasets: readonly Dataset[], file: string, shape: readonly number[], size: number, take: Take): boolean {
  const fd = fs.openSync(file, "r");
  try {
    const placed = datasets.map((ds) => (ds.metadata.littleEndian ? placeRows(fd, objectAddress(ds), shape, size) : undefined));
    if (placed.some((p) => p === undefined)) return false;
    readPieces(fd, file, datasets.map((d) => d.path), placed as Piece[][], shape, size, take, inOrder(readRowsAtOnce(shape, size)));
    return true;
  } finally {
    fs.closeSync(fd);
  }
}

/** The file address of a dataset's object header: its HDF5 object reference. */
function objectAddress(ds: Dataset): number {
  const ref = Buffer.from(Array.from(ds.create_reference().ref_data as ArrayLike<number>));
  return ref.length === 8 ? Number(ref.readBigUInt64LE(0)) : -1;
}

/** The datasets' slabs read through h5wasm, each into a buffer of its heap. */
function readHeap(datasets: readonly Dataset[], file: string, shape: readonly number[], size: number, take: Take): void {
  const step = slabRows(shape, size);
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  const heap = h5Module();
  const at: number[] = [];
  try {
    for (const ds of datasets) {
      at.push(heap._malloc(step * rowValues * size));
      if (at.at(-1) === 0) throw new InputError(`${fileName(file)}: no memory in the HDF5 heap for a slab of ${ds.path}`);
    }
    const rest = shape.slice(1).map(BigInt);
    const strides = shape.map(() => 1n);
    for (let r0 = 0; r0 < shape[0]!; r0 += step) {
      const r1 = Math.min(shape[0]!, r0 + step);
      const values = (r1 - r0) * rowValues;
      datasets.forEach((ds, i) => heap.get_dataset_data(ds.file_id, ds.path, [BigInt(r1 - r0), ...rest], [BigInt(r0), ...rest.map(() => 0n)], strides, BigInt(at[i]!)));
      take(r0, r1, at.map((a) => (size === 8 ? new Float64Array(heap.HEAPU8.buffer, a, values) : new Float32Array(heap.HEAPU8.buffer, a, values))));
    }
  } finally {
    for (const a of at) if (a !== 0) heap._free(a);
  }
}

/**
 * Read float datasets of one shape and type together, slab by slab: `take(r0,
 * r1, slabs)` receives rows [r0, r1) of each (float64 or float32 as stored).
 * Anything else is an InputError naming the file. Contiguous and unfiltered
 * datasets chunked by rows are read straight from the file into buffers kept
 * for the next read; others through h5wasm into buffers of its heap. Either
 * way the slabs are valid only inside `take`, which must not call h5wasm.
 */
export function readSlabsTogether(datasets: readonly Dataset[], file: string, take: Take): void {
  const shape = datasets[0]?.shape ?? [];
  const type = datasets[0]!.metadata;
  for (const ds of datasets) {
    const t = ds.metadata;
    if (t.type !== 1 || (t.size !== 8 && t.size !== 4)) throw new InputError(`${fileName(file)}: dataset ${ds.path} is not floating point`);
    if (t.size !== type.size || (ds.shape ?? []).join() !== shape.join()) throw new InputError(`${fileName(file)}: datasets ${datasets.map((d) => d.path).join(", ")} differ in shape or type`);
    if (shape.length === 0) throw new InputError(`${fileName(file)}: dataset ${ds.path} is a scalar, not an array`);
  }
  if (!readDirect(datasets, file, shape, type.size, take)) readHeap(datasets, file, shape, type.size, take);
}

/** Read one float dataset slab by slab: `take(r0, r1, slab)` receives rows [r0, r1) (float64 or float32 as stored); see readSlabsTogether. */
export function readSlabs(ds: Dataset, file: string, take: (r0: number, r1: number, slab: Float64Array | Float32Array) => void): void {
  readSlabsTogether([ds], file, (r0, r1, [slab]) => take(r0, r1, slab!));
}

/** A whole float dataset as float64, read slab by slab. */
export function readFloat64(ds: Dataset, file: string): Float64Array {
  const shape = ds.shape ?? [];
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  const out = new Float64Array(shape.reduce((p, n) => p * n, 1));
  readSlabs(ds, file, (r0, _r1, slab) => out.set(slab, r0 * rowValues));
  return out;
}
