/**
 * The energy split's passes as plain tasks over blocks of rows, so that the
 * step's thread pool can run them (integrators/step-task.ts, op "split") as
 * well as this thread. A grid's rows (n0 n1 rows of the last axis) fall into
 * a fixed number of blocks whatever the thread count; each block sums into
 * its own slots of a shared array, and the caller adds the blocks' sums in
 * block order: the result is the same bit for bit on any number of threads.
 * The typed arrays of a task are on shared memory where it goes to another
 * thread (a message shares them; the small wavenumber tables are copied).
 */
import { axisRow, compressibleRow, nyquistRow, packRow, shellSumsLength, type ShellData } from "./split-passes.js";
import { derivativeRow } from "./shells.js";

/** Rows of the last axis and how many blocks they fall into (the same on any number of threads). */
export interface RowBlocks {
  readonly rows: number;
  readonly blocks: number;
  /** Length of the last axis. */
  readonly n2: number;
}

/** The blocks of a shape's rows: at most 64, so that the sums stay small and two threads share the work evenly. */
export function rowBlocks(shape: readonly [number, number, number]): RowBlocks {
  const rows = shape[0] * shape[1];
  return { rows, blocks: Math.min(rows, 64), n2: shape[2] };
}

/** One pass of the split over blocks [lo, hi). */
export type SplitTask =
  /** to ← from (complex grids). */
  | { readonly kind: "copy"; readonly at: RowBlocks; readonly from: Float64Array; readonly to: Float64Array }
  /** z ← i k_axis z (derivative wavenumbers: the Nyquist index's zero; `k` along the axis, `kz` along the last). */
  | { readonly kind: "ik"; readonly at: RowBlocks; readonly z: Float64Array; readonly n1: number; readonly axis: number; readonly k: Float64Array; readonly kz: Float64Array }
  /** packRow over the rows; Σ j²/ρ and Σ j of block u into sums[2u], sums[2u + 1]. */
  | { readonly kind: "pack"; readonly at: RowBlocks; readonly psi: Float64Array; readonly z: Float64Array; readonly sums: Float64Array }
  /** axisRow over the rows of one axis's packed transform z; block u's sums from u·shellSumsLength. */
  | { readonly kind: "shells"; readonly at: RowBlocks; readonly data: ShellData; readonly z: Float64Array; readonly axis: number; readonly first: boolean; readonly sums: Float64Array }
  /** compressibleRow over the rows; block u's sums as for "shells". */
  | { readonly kind: "compressible"; readonly at: RowBlocks; readonly data: ShellData; readonly sums: Float64Array };

/** The rows [first, end) of block u. */
function blockRows(at: RowBlocks, u: number): [number, number] {
  return [Math.floor((u * at.rows) / at.blocks), Math.floor(((u + 1) * at.rows) / at.blocks)];
}

/** Run a task over blocks [lo, hi). */
export function runSplitTask(t: SplitTask, lo: number, hi: number): void {
  for (let u = lo; u < hi; u++) {
    const [first, end] = blockRows(t.at, u);
    const row = 2 * t.at.n2;
    if (t.kind === "copy") t.to.set(t.from.subarray(first * row, end * row), first * row);
    else if (t.kind === "pack") for (let r = first; r < end; r++) packRow(t.psi, t.z, r * row, (r + 1) * row, t.sums, 2 * u);
    else if (t.kind === "ik") ikRows(t, first, end);
    else if (t.kind === "shells") shellRows(t, first, end, u * shellSumsLength(t.data.count));
    else compressibleRows(t.data, first, end, t.sums, u * shellSumsLength(t.data.count));
  }
}

function ikRows(t: Extract<SplitTask, { kind: "ik" }>, first: number, end: number): void {
  // along the last axis the factor is k[c]; along the others one factor per row (the scale 0 · k[c] adds nothing)
  const zScale = t.axis === 2 ? 1 : 0;
  for (let r = first; r < end; r++) {
    const [a, b] = [Math.floor(r / t.n1), r % t.n1];
    derivativeRow(t.z, t.z, 2 * r * t.at.n2, t.axis === 0 ? t.k[a]! : t.axis === 1 ? t.k[b]! : 0, zScale, t.kz);
  }
}

function shellRows(t: Extract<SplitTask, { kind: "shells" }>, first: number, end: number, at: number): void {
  const d = t.data;
  const [n0, n1, n2] = d.shape;
  const zScale = t.axis === 2 ? 1 : 0;
  for (let r = first; r < end; r++) {
    const [a, b] = [Math.floor(r / n1), r % n1];
    const [ma, mb] = [a === 0 ? 0 : n0 - a, b === 0 ? 0 : n1 - b];
    const kRow = t.axis === 0 ? d.k0[a]! : t.axis === 1 ? d.k1[b]! : 0;
    const kMirror = t.axis === 0 ? d.k0[ma]! : t.axis === 1 ? d.k1[mb]! : 0;
    axisRow(d, t.z, r, 2 * (ma * n1 + mb) * n2, [kRow, kMirror, zScale], nyquistRow(d, a, b), t.first, t.sums, at);
  }
}

function compressibleRows(d: ShellData, first: number, end: number, sums: Float64Array, at: number): void {
  const n1 = d.shape[1];
  for (let r = first; r < end; r++) {
    const [a, b] = [Math.floor(r / n1), r % n1];
    compressibleRow(d, r, d.k0[a]! * d.k0[a]! + d.k1[b]! * d.k1[b]!, nyquistRow(d, a, b), sums, at);
  }
}

/** Add the blocks' sums (`length` entries each) into `total`, block by block in order; `sums` is zeroed for the next pass. */
export function addBlockSums(sums: Float64Array, blocks: number, length: number, total: Float64Array): void {
  for (let u = 0; u < blocks; u++) for (let i = 0; i < length; i++) total[i] = total[i]! + sums[u * length + i]!;
  sums.fill(0);
}

/** A zeroed Float64Array on shared memory (other threads can write it). */
export function sharedFloats(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(8 * length));
}

/** Runs a split task over all of a grid's blocks: on the step's threads, or here. */
export type SplitRunner = (blocks: number, task: SplitTask) => void;

/** The runner of this thread alone. */
export const runHere: SplitRunner = (blocks, task) => runSplitTask(task, 0, blocks);
