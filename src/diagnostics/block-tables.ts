/**
 * The tables the diagnostics' WebAssembly passes read and write
 * (field-kernels.ts), declared once: one region of the transforms' shared
 * memory (integrators/pooled-transforms.ts, option `tables`) holding the
 * blocks' sums, the Nyquist rows' mirrors of the energy split, the
 * wavenumbers of each axis (as the grid has them, and the derivative's with
 * the Nyquist index's zero), the shells' Σ|k| and mode counts, the density
 * PDF's bin edges, room for the granules' separations and the shell of every
 * mode of the half space (int16, rows
 * of n2/2 + 1; a mode with c > n2/2 has the shell of n2 − c). The shells are
 * filled once per grid shape and extent.
 */
import type { Grid } from "../grid/grid.js";
import { Shells } from "./shells.js";
import { nyquistRows, shellSumsLength } from "./split-passes.js";
import { MAX_BLOCKS } from "./row-blocks.js";
import type { FieldKernels } from "../fields/field-kernels.js";

/** The most bins of a density PDF that the tables hold edges and sums for (more run in JavaScript). */
export const PDF_MAX_BINS = 255;

/** Doubles at the start that say which grid's shells the table holds: shape and extent. */
const HEADER = 6;

/**
 * The tables' layout, declared once: each table taken in turn from the region (at its length, rounded up to
 * an even count), as views of `region` when given; without one, only the length.
 */
function carve(shape: readonly [number, number, number], count: number, region?: Float64Array): { length: number; views: Omit<BlockTables, "kernels" | "count"> | undefined } {
  const [n0, n1, n2] = shape;
  const halfRows = n0 * n1 * (Math.floor(n2 / 2) + 1);
  let top = HEADER;
  const take = (n: number): Float64Array => {
    const at = top;
    top += n + (n & 1);
    return region ? region.subarray(at, at + n) : EMPTY;
  };
  const sums = take(MAX_BLOCKS * Math.max(shellSumsLength(count), 2 * PDF_MAX_BINS));
  const nyquist = take(nyquistRows(shape) * (n2 + 2));
  const k = [take(n0), take(n1), take(n2)] as const;
  const d = [take(n0), take(n1), take(n2)] as const;
  const [ksum, modes] = [take(count), take(count)];
  const edges = take(PDF_MAX_BINS + 1);
  const row = take(Math.floor(n2 / 2) + 1);
  const separations = take(n0 * n1 + n2);
  // the shells of the half space: int16, four to a double
  const binsAt = top;
  take(Math.ceil(halfRows / 4));
  if (!region) return { length: top, views: undefined };
  const bins = new Int16Array(region.buffer, region.byteOffset + 8 * binsAt, halfRows);
  return { length: top, views: { sums, nyquist, k, d, ksum, modes, edges, row, separations, bins } };
}

const EMPTY = new Float64Array(0);

/** Whether the WebAssembly passes take a grid of this shape: every axis even or absent, the last simulated, shells within int16. */
function fits(grid: Grid, count: number): boolean {
  const [n0, n1, n2] = grid.shape;
  return n2 >= 2 && [n0, n1, n2].every((n) => n === 1 || n % 2 === 0) && count < 32767;
}

/** Doubles of the tables region for `grid` (0 when the passes do not take it). */
export function blockTablesLength(grid: Grid): number {
  const count = new Shells(grid, 0).count;
  return fits(grid, count) ? carve(grid.shape, count).length : 0;
}

/** The tables of one grid as views of the region, with the kernels that run on its memory. */
export interface BlockTables {
  readonly kernels: FieldKernels;
  readonly count: number;
  /** Blocks' sums (entries per block as the pass says), zeroed after each pass by addBlockSums. */
  readonly sums: Float64Array;
  readonly nyquist: Float64Array;
  readonly k: readonly [Float64Array, Float64Array, Float64Array];
  /** Derivative wavenumbers (shells.ts derivativeWavenumbers). */
  readonly d: readonly [Float64Array, Float64Array, Float64Array];
  readonly ksum: Float64Array;
  readonly modes: Float64Array;
  readonly edges: Float64Array;
  /** The shell of each mode of the half space (rows of n2/2 + 1). */
  readonly bins: Int16Array;
  /** Room for a distance of each row of the first two axes (n0 n1) and of each cell along the last (n2): the granules' separations. */
  readonly separations: Float64Array;
  /** Scratch of the shells' table: n2/2 + 1 numbers. */
  readonly row: Float64Array;
}

/** Anything that may hold a tables region and the kernels to run on it (integrators/pooled-transforms.ts). */
export interface TableOwner {
  blockTables?(): { region: Float64Array; kernels: FieldKernels } | undefined;
}

/**
 * The tables of `grid` in `owner`'s region, its shells filled for this grid (once per shape and extent) and its
 * wavenumbers written; undefined when `owner` has no region for this grid or one of `fields` lies outside its
 * memory (the passes then run in JavaScript).
 */
export function blockTablesOf(owner: unknown, grid: Grid, ...fields: Float64Array[]): BlockTables | undefined {
  const held = (owner as TableOwner | undefined)?.blockTables?.();
  if (!held || fields.some((f) => f.buffer !== held.region.buffer)) return undefined;
  const count = new Shells(grid, 0).count;
  if (!fits(grid, count)) return undefined;
  const { region, kernels } = held;
  if (region.length < carve(grid.shape, count).length) return undefined;
  const tables: BlockTables = { kernels, count, ...carve(grid.shape, count, region).views! };
  const { k, d } = tables;
  const lengths = grid.shape;
  for (let axis = 0; axis < 3; axis++) {
    const kk = grid.wavenumbers(axis as 0 | 1 | 2);
    k[axis]!.set(kk);
    d[axis]!.set(kk);
    if (lengths[axis]! > 1) d[axis]![lengths[axis]! / 2] = 0;
  }
  const key = [...grid.shape, ...grid.extent];
  if (key.some((v, i) => region[i] !== v)) {
    region[0] = NaN;
    tables.ksum.fill(0);
    tables.modes.fill(0);
    const shells = new Shells(grid, 0);
    kernels.shellTable(tables, grid.shape, shells.kF, tables.row);
    key.forEach((v, i) => (region[i] = v));
  }
  return tables;
}
