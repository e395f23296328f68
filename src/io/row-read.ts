/**
 * Rows of datasets read straight from a file, without h5wasm (so that the
 * reading thread of shared-read.ts loads nothing else): the slab size that
 * datasets are written and chunked by, how many rows are read at once, and
 * the reads of rows from the pieces of the file they lie in (h5-layout.ts)
 * into buffers, handed out by claims that several threads may share.
 */
import fs from "node:fs";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import type { Piece } from "./h5-layout.js";

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
 * `buffers` (default: buffers kept for the next read), the slabs that `claims` hands out (all, in order: inOrder);
 * `paths` name them in errors.
 */
export function readPieces(fd: number, file: string, paths: readonly string[], pieces: readonly (readonly Piece[])[], shape: readonly number[], size: number, take: Take, claims: SlabClaims, buffers?: ReadBuffers): void {
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
