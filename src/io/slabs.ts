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

/**
 * Bytes of each dataset's rows read at once straight from a file (at most a slab): the buffers stay in a core's
 * second-level cache until they are copied into ψ, two reading threads share a field in many small turns, and the
 * buffers in ψ's WebAssembly memory (psi-wasm.ts) are little fresh memory. A 128³ read on one thread took the same
 * time with 256 KiB as with 2 MiB, and longer with 64 KiB (more system calls; measured on a shared machine).
 */
export const READ_BYTES = 256 << 10;

/** Rows along the first axis read at once from a file (see READ_BYTES), for a dataset of `shape` with values of `bytesPerValue`. */
export function readRowsAtOnce(shape: readonly number[], bytesPerValue: number): number {
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  return Math.max(1, Math.min(shape[0] as number, Math.floor(Math.min(slab, READ_BYTES) / (rowValues * bytesPerValue))));
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

/** Rows [r0, r1) of rows of `rowBytes` from the file's `pieces` into `into`. */
function readRows(fd: number, pieces: readonly Piece[], r0: number, r1: number, rowBytes: number, into: Uint8Array): void {
  for (const p of pieces) {
    const from = Math.max(r0, p.row);
    const to = Math.min(r1, p.row + p.rows);
    for (let done = 0, bytes = (to - from) * rowBytes; done < bytes; ) {
      const n = fs.readSync(fd, into, (from - r0) * rowBytes + done, bytes - done, p.at + (from - p.row) * rowBytes + done);
      if (n === 0) throw new RangeError("the file ends inside a dataset");
      done += n;
    }
  }
}

/** Buffers for slabs read straight from files, kept for the next read (fresh memory costs a page fault per 4 KiB). */
const scratch: ArrayBuffer[] = [];
function scratchBuffer(i: number, bytes: number): ArrayBuffer {
  if ((scratch[i]?.byteLength ?? -1) < bytes) scratch[i] = new ArrayBuffer(bytes);
  return scratch[i]!;
}

export type Take = (r0: number, r1: number, slabs: (Float64Array | Float32Array)[]) => void;

/** Which slabs a reader takes: slabs of `step` rows, the next one's index from `claim` (−1: none left); several threads may share them. */
export interface SlabClaims {
  readonly step: number;
  readonly claim: () => number;
}

/** Slabs of `step` rows one after another (a reader alone). */
export function inOrder(step: number): SlabClaims {
  let next = 0;
  return { step, claim: () => next++ };
}

/** Where each dataset's rows are read to: a buffer and the byte offset in it (room for a claim's rows of each). */
export type ReadBuffers = readonly { readonly buffer: ArrayBufferLike; readonly byteOffset: number }[];

/**
 * Datasets of one shape and value size read slab by slab from the file's `pieces` (one list per dataset) into
 * `buffers` (default: buffers kept for the next read), the slabs that `claims` hands out (default: all, in order);
 * `paths` name them in errors.
 */
export function readPieces(fd: number, file: string, paths: readonly string[], pieces: readonly (readonly Piece[])[], shape: readonly number[], size: number, take: Take, claims = inOrder(readRowsAtOnce(shape, size)), buffers?: ReadBuffers): void {
  const step = claims.step;
  const rowValues = shape.slice(1).reduce((p, n) => p * n, 1);
  const to = buffers ?? pieces.map((_, i) => ({ buffer: scratchBuffer(i, step * rowValues * size), byteOffset: 0 }));
  for (let k = claims.claim(); k >= 0 && k * step < shape[0]!; k = claims.claim()) {
    const r0 = k * step;
    const r1 = Math.min(shape[0]!, r0 + step);
    const values = (r1 - r0) * rowValues;
    try {
      pieces.forEach((p, i) => readRows(fd, p, r0, r1, rowValues * size, new Uint8Array(to[i]!.buffer, to[i]!.byteOffset, values * size)));
    } catch (e) {
      throw new InputError(`${fileName(file)}: cannot read ${paths.join(", ")} (${(e as Error).message})`);
    }
    take(r0, r1, to.map((b) => (size === 8 ? new Float64Array(b.buffer, b.byteOffset, values) : new Float32Array(b.buffer, b.byteOffset, values))));
  }
}

/** The datasets' slabs read straight from the file (see h5-layout.ts); false, having read nothing, where a layout is not simple. */
function readDirect(datasets: readonly Dataset[], file: string, shape: readonly number[], size: number, take: Take): boolean {
  const fd = fs.openSync(file, "r");
  try {
    const placed = datasets.map((ds) => (ds.metadata.littleEndian ? placeRows(fd, objectAddress(ds), shape, size) : undefined));
    if (placed.some((p) => p === undefined)) return false;
    readPieces(fd, file, datasets.map((d) => d.path), placed as Piece[][], shape, size, take);
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
