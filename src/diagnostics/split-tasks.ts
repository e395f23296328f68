/**
 * The energy split's passes as plain tasks over blocks of rows
 * (row-blocks.ts), so that the step's thread pool can run them
 * (block-tasks.ts) as well as this thread. The typed arrays of a task are on
 * shared memory where it goes to another thread (a message shares them; the
 * small wavenumber tables are copied). A task marked `wasm` has every array
 * in the transforms' WebAssembly memory (block-tables.ts): its passes run
 * there (fields/field-kernels.ts), with the same bits as in JavaScript.
 */
import { axisRow, compressibleRow, nyquistRow, packRow, shellSumsLength, type ShellData } from "./split-passes.js";
import { derivativeRow } from "./shells.js";
import { blockRows, type RowBlocks } from "./row-blocks.js";
import type { FieldKernels } from "../fields/field-kernels.js";

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

/** Whether a task's arrays are all in the transforms' WebAssembly memory (set where it is made). */
export type OnMemory = { readonly wasm?: boolean };

/** Run a split task over blocks [lo, hi): by `kernels` (the passes on this thread's instance of the memory) when the task is marked for them. */
export function runSplitTask(t: SplitTask & OnMemory, lo: number, hi: number, kernels?: FieldKernels): void {
  const k = t.wasm ? kernels : undefined;
  for (let u = lo; u < hi; u++) {
    const [first, end] = blockRows(t.at, u);
    const row = 2 * t.at.n2;
    if (t.kind === "copy") t.to.set(t.from.subarray(first * row, end * row), first * row);
    else if (t.kind === "pack") {
      if (k) k.packCells(t.psi, t.z, first * t.at.n2, end * t.at.n2, t.sums, 2 * u);
      else for (let r = first; r < end; r++) packRow(t.psi, t.z, r * row, (r + 1) * row, t.sums, 2 * u);
    } else if (t.kind === "ik") {
      if (k) k.ikRows(t.z, t.k, t.kz, t.n1, t.at.n2, t.axis, first, end);
      else ikRows(t, first, end);
    } else if (t.kind === "shells") {
      if (k) k.shellRows(t.data, t.z, t.axis, t.first, t.sums, u * shellSumsLength(t.data.count), first, end);
      else shellRows(t, first, end, u * shellSumsLength(t.data.count));
    } else if (k) k.compressibleRows(t.data, t.sums, u * shellSumsLength(t.data.count), first, end);
    else compressibleRows(t.data, first, end, t.sums, u * shellSumsLength(t.data.count));
  }
}

function ikRows(t: Extract<SplitTask, { kind: "ik" }>, first: number, end: number): void {
  // along the last axis the factor is k[c]; along the others one factor per row (the scale 0 · k[c] adds nothing)
  const zScale = t.axis === 2 ? 1 : 0;
  for (let r = first; r < end; r++) {
    const a = Math.floor(r / t.n1);
    const b = r % t.n1;
    derivativeRow(t.z, t.z, 2 * r * t.at.n2, t.axis === 0 ? t.k[a]! : t.axis === 1 ? t.k[b]! : 0, zScale, t.kz);
  }
}

function shellRows(t: Extract<SplitTask, { kind: "shells" }>, first: number, end: number, at: number): void {
  const d = t.data;
  const n0 = d.shape[0];
  const n1 = d.shape[1];
  const n2 = d.shape[2];
  const zScale = t.axis === 2 ? 1 : 0;
  for (let r = first; r < end; r++) {
    const a = Math.floor(r / n1);
    const b = r % n1;
    const ma = a === 0 ? 0 : n0 - a;
    const mb = b === 0 ? 0 : n1 - b;
    const kRow = t.axis === 0 ? d.k0[a]! : t.axis === 1 ? d.k1[b]! : 0;
    const kMirror = t.axis === 0 ? d.k0[ma]! : t.axis === 1 ? d.k1[mb]! : 0;
    axisRow(d, t.z, r, 2 * (ma * n1 + mb) * n2, kRow, kMirror, zScale, nyquistRow(d, a, b), t.first, t.sums, at);
  }
}

function compressibleRows(d: ShellData, first: number, end: number, sums: Float64Array, at: number): void {
  const n1 = d.shape[1];
  for (let r = first; r < end; r++) {
    const a = Math.floor(r / n1);
    const b = r % n1;
    compressibleRow(d, r, d.k0[a]! * d.k0[a]! + d.k1[b]! * d.k1[b]!, nyquistRow(d, a, b), sums, at);
  }
}
