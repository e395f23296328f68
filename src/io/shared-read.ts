/**
 * A snapshot's field read on two threads: the main thread and a helper
 * thread (read-worker.ts) take its slabs in turn from one shared counter,
 * each reading its slabs' rows from the file and interleaving them into ψ,
 * which lies in shared memory. The first write to each page of fresh memory
 * is a page fault, which costs more than the copy on some machines (about 3
 * ms per MiB measured on a 2-core virtual machine); two threads take those
 * faults, and the interleaving, in parallel. The helper is started by the
 * first large read and kept (without holding the process open); a slab
 * it fails or never finishes is read on the main thread, so the result is
 * the same whether it helps or not.
 */
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { Piece } from "./h5-layout.js";
import { intoPsi } from "./psi-interleave.js";
import { newWasmPsi, psiMemoryOf, wasmReading, type PsiMemory } from "./psi-wasm.js";
import { inOrder, readPieces, readRowsAtOnce, type ReadBuffers, type SlabClaims, type Take } from "./row-read.js";

/** Fields of at least this many bytes of ψ are read on two threads unless set otherwise (smaller ones are faster alone). */
export const SHARED_READ_BYTES = 8 << 20;
let sharedBytes = SHARED_READ_BYTES;

/** Set the size from which reads are shared (tests share small fields); no argument restores the default. */
export function setSharedReadBytes(bytes: number = SHARED_READ_BYTES): void {
  sharedBytes = bytes;
}
/** A slab's states in the job's control words (word 0 counts the slabs handed out). */
export const PENDING = 0;
export const DONE = 1;
export const FAILED = 2;
/** How long the main thread waits for a slab the helper took before reading it itself. */
const WAIT_MS = 5000;

/** One field read shared with the helper: the file's pieces of each part, and ψ in shared memory. */
export interface ReadJob {
  readonly file: string;
  readonly paths: readonly string[];
  readonly pieces: readonly (readonly Piece[])[];
  readonly shape: readonly number[];
  readonly size: number;
  readonly step: number;
  readonly psi: SharedArrayBuffer;
  readonly psiOffset: number;
  readonly psiLength: number;
  readonly control: SharedArrayBuffer;
  /** The WebAssembly memory ψ lies in, when it does (the helper reads into its own buffers there). */
  readonly wasm?: PsiMemory;
}

/** Slabs of `step` rows handed out from the shared counter of `words` until `slabs` are taken. */
export function sharedClaims(words: Int32Array, step: number, slabs: number): SlabClaims {
  return { step, claim: () => {
    const k = Atomics.add(words, 0, 1);
    return k < slabs ? k : -1;
  } };
}

/** Mark slab `k` of a job's control `words` done or failed. */
export function settle(words: Int32Array, k: number, state: number): void {
  Atomics.store(words, 1 + k, state);
  Atomics.notify(words, 1 + k);
}

let helper: Worker | undefined;
let unavailable = false;

/** The compiled worker script (tests that import the TypeScript sources use the built one). */
function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  return here.endsWith(".ts") ? path.resolve(path.dirname(here), "../../dist/io/read-worker.js") : path.join(path.dirname(here), "read-worker.js");
}

/** Start the helper thread (once; nothing where no worker thread can start: reads then run on the main thread alone). */
export function startReadHelper(): void {
  if (helper || unavailable) return;
  const script = workerScript();
  if (!fs.existsSync(script)) {
    unavailable = true;
    return;
  }
  const w = new Worker(script);
  w.unref();
  // a helper that fails or ends on its own is not started again: reads run on the main thread alone
  const gone = (): void => {
    if (helper !== w) return;
    helper = undefined;
    unavailable = true;
  };
  w.on("error", gone);
  w.on("exit", gone);
  helper = w;
}

/** Stop the helper thread (tests; a later large read starts another). */
export async function stopReadHelper(): Promise<void> {
  const w = helper;
  helper = undefined;
  unavailable = false;
  if (w) await w.terminate();
}

/**
 * New memory for a ψ of `length` values in rows of `rowValues` cells: for a large read, shared memory (the helper
 * started to share the read), in a WebAssembly memory of its own where one can be made (see psi-wasm.ts).
 */
export function newPsi(length: number, rowValues: number): Float64Array {
  if (8 * length < sharedBytes) return new Float64Array(length);
  startReadHelper();
  return newWasmPsi(length, rowValues) ?? (helper ? new Float64Array(new SharedArrayBuffer(8 * length)) : new Float64Array(length));
}

/** What reading thread `slot` reads ψ's rows with: the kernel and buffers of ψ's WebAssembly memory, or the JavaScript loop and the thread's own buffers. */
export function psiReading(psi: Float64Array, at: PsiMemory | undefined, rowValues: number, step: number, size: number, slot: number): { buffers?: ReadBuffers; take: Take } {
  return (at && wasmReading(at, psi, rowValues, step, size, slot)) ?? { take: intoPsi(psi, rowValues) };
}

/**
 * Rows of the parts `pieces` (each of `shape`, values of `size` bytes) interleaved into ψ: shared with the helper
 * when ψ is large and in shared memory and the helper runs (a read into new memory starts it: see newPsi), else
 * on this thread alone.
 */
export function readIntoPsi(fd: number, file: string, paths: readonly string[], pieces: readonly (readonly Piece[])[], shape: readonly number[], size: number, psi: Float64Array): void {
  const rowCells = psi.length / 2 / shape[0]!;
  const step = readRowsAtOnce(shape, size);
  const wasm = psiMemoryOf(psi);
  const { buffers, take } = psiReading(psi, wasm, rowCells, step, size, 0);
  if (!(psi.buffer instanceof SharedArrayBuffer) || psi.byteLength < sharedBytes || !helper) {
    readPieces(fd, file, paths, pieces, shape, size, take, inOrder(step), buffers);
    return;
  }
  const slabs = Math.ceil(shape[0]! / step);
  const words = new Int32Array(new SharedArrayBuffer(4 * (1 + slabs)));
  const job: ReadJob = { file, paths, pieces, shape, size, step, psi: psi.buffer, psiOffset: psi.byteOffset, psiLength: psi.length, control: words.buffer as SharedArrayBuffer, ...(wasm ? { wasm } : {}) };
  helper.postMessage(job);
  const mine = (r0: number, r1: number, s: (Float64Array | Float32Array)[]): void => {
    take(r0, r1, s);
    settle(words, r0 / step, DONE);
  };
  readPieces(fd, file, paths, pieces, shape, size, mine, sharedClaims(words, step, slabs), buffers);
  // the helper's slabs: each waited for; one it failed, or did not finish in time, is read here (the same values)
  for (let k = 0; k < slabs; k++) {
    if (Atomics.load(words, 1 + k) === PENDING) Atomics.wait(words, 1 + k, PENDING, WAIT_MS);
    if (Atomics.load(words, 1 + k) !== DONE) readPieces(fd, file, paths, pieces, shape, size, take, only(k, step), buffers);
  }
}

/** Slab `k` alone. */
function only(k: number, step: number): SlabClaims {
  const all = inOrder(step);
  return { step, claim: () => (all.claim() === 0 ? k : -1) };
}
