/**
 * Datasets read and written slab by slab along their first axis, so that no
 * single h5wasm call, and no allocation in its heap (which cannot grow past
 * 2 GiB and never shrinks), holds a whole grid: a 512³ complex field is 2 GiB.
 * A slab is a whole number of rows (all of the other axes) of about
 * `slabBytes()`, and the datasets psibox writes are chunked by the same rows,
 * so each call touches whole chunks.
 */
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { h5Module, type Dataset, type Group, type H5File } from "./h5.js";

/** Bytes of one slab (and chunk) unless set otherwise: 2 MiB, a few rows of a large grid. */
export const DEFAULT_SLAB_BYTES = 2 << 20;
let slab = DEFAULT_SLAB_BYTES;

/** The slab size in bytes. */
export function slabBytes(): number {
  return slab;
}

/** Set the slab size (tests force small slabs so that a modest grid takes many); no argument restores the default. */
export function setSlabBytes(bytes: number = DEFAULT_SLAB_BYTES): void {
  if (!(Number.isInteger(bytes) && bytes >= 8)) throw new RangeError(`slab size must be a whole number of bytes ≥ 8, got ${bytes}`);
  slab = bytes;
}

/** Rows along the first axis per slab for a dataset of `shape` with values of `bytesPerValue`. */
export function slabRows(shape: readonly number[], bytesPerValue: number): number {
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  return Math.max(1, Math.min(shape[0] as number, Math.floor(slab / (rowValues * bytesPerValue))));
}

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

/**
 * Read a float dataset slab by slab: `take(r0, r1, slab)` receives rows [r0, r1)
 * (float64 or float32 as stored). Anything else is an InputError naming the file.
 * HDF5 reads every slab into one buffer of its heap, and `slab` is a view of
 * that buffer (no copy): it is valid only inside `take`, which must not call
 * h5wasm (its heap may move).
 */
export function readSlabs(ds: Dataset, file: string, take: (r0: number, r1: number, slab: Float64Array | Float32Array) => void): void {
  const shape = ds.shape ?? [];
  const type = ds.metadata;
  if (type.type !== 1 || (type.size !== 8 && type.size !== 4)) throw new InputError(`${fileName(file)}: dataset ${ds.path} is not floating point`);
  if (shape.length === 0) throw new InputError(`${fileName(file)}: dataset ${ds.path} is a scalar, not an array`);
  const step = slabRows(shape, type.size);
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  const heap = h5Module();
  const at = heap._malloc(step * rowValues * type.size);
  if (at === 0) throw new InputError(`${fileName(file)}: no memory in the HDF5 heap for a slab of ${ds.path}`);
  try {
    const rest = shape.slice(1).map(BigInt);
    const strides = shape.map(() => 1n);
    for (let r0 = 0; r0 < (shape[0] as number); r0 += step) {
      const r1 = Math.min(shape[0] as number, r0 + step);
      const values = (r1 - r0) * rowValues;
      heap.get_dataset_data(ds.file_id, ds.path, [BigInt(r1 - r0), ...rest], [BigInt(r0), ...rest.map(() => 0n)], strides, BigInt(at));
      take(r0, r1, type.size === 8 ? new Float64Array(heap.HEAPU8.buffer, at, values) : new Float32Array(heap.HEAPU8.buffer, at, values));
    }
  } finally {
    heap._free(at);
  }
}

/** A whole float dataset as float64, read slab by slab. */
export function readFloat64(ds: Dataset, file: string): Float64Array {
  const shape = ds.shape ?? [];
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  const out = new Float64Array(shape.reduce((p, n) => p * n, 1));
  readSlabs(ds, file, (r0, _r1, slab) => out.set(slab, r0 * rowValues));
  return out;
}
