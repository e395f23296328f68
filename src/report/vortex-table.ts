/**
 * The vortex census of a snapshot as the report keeps it: vortices.csv's
 * bytes and the census's totals and projection (the points themselves only in
 * 2D, where the picture marks them; a 3D census's many thousand piercings
 * live in the CSV only). Computed on this thread, or from a `VortexJob` on
 * the analysis's helper thread (analysis-helper.ts) while this thread
 * computes the other diagnostics: it reads ψ where it is, in shared memory,
 * and hands back the bytes and the totals.
 */
import { Grid } from "../grid/grid.js";
import { scanVortices, type VortexCensus, type VortexPoint } from "../diagnostics/vortices.js";
import { simulatedAxes } from "../diagnostics/shells.js";
import { CsvBytes } from "./csv-table.js";

/** A census without its points (3D) or with them (2D), and how many there are. */
export type VortexReport = Omit<VortexCensus, "points"> & { readonly points: readonly VortexPoint[]; readonly piercings: number };

/** vortices.csv's bytes (the text as csvTable writes it) and the census it was written from. */
export interface VortexTable {
  readonly report: VortexReport;
  readonly csv: Uint8Array;
}

/** The census of ψ and its table, positions and lengths in kpc (`kpc`: kpc per code length). */
export function vortexTable(grid: Grid, psi: Float64Array, kpc: number): VortexTable {
  const three = grid.dims === 3;
  const table = new CsvBytes(three ? ["x_kpc", "y_kpc", "z_kpc", "normal_axis", "charge", "length_kpc"] : ["x_kpc", "y_kpc", "charge"]);
  const axes = simulatedAxes(grid);
  // one row per point; the points are kept in 2D only (a 3D census has many thousands)
  const points: VortexPoint[] = [];
  const census = scanVortices(grid, psi, (pos, charge, normal, length) => {
    if (three) {
      for (let ax = 0; ax < 3; ax++) table.value(pos[ax]! * kpc);
      table.value(normal + 1);
      table.value(charge);
      table.value(length * kpc);
    } else {
      const position = axes.map((ax) => pos[ax]!);
      for (const x of position) table.value(x * kpc);
      table.value(charge);
      points.push({ position, charge, normal, length });
    }
    table.endRow();
  });
  return { report: { ...census, points, piercings: table.rows }, csv: table.finish() };
}

/** What the worker is given: the grid, where ψ lies, and kpc per code length. */
export interface VortexJob {
  readonly cells: readonly number[];
  readonly lengths: readonly number[];
  readonly buffer: SharedArrayBuffer;
  readonly byteOffset: number;
  readonly length: number;
  readonly kpc: number;
}

/** The job of ψ for another thread, or undefined when ψ is not in shared memory (only this thread can read it). */
export function vortexJobOf(grid: Grid, psi: Float64Array, kpc: number): VortexJob | undefined {
  if (!(psi.buffer instanceof SharedArrayBuffer)) return undefined;
  return { cells: grid.cells, lengths: grid.lengths, buffer: psi.buffer, byteOffset: psi.byteOffset, length: psi.length, kpc };
}

/** vortexTable of a job (on the thread that was handed it). */
export function vortexTableOf(job: VortexJob): VortexTable {
  return vortexTable(new Grid(job.cells, job.lengths), new Float64Array(job.buffer, job.byteOffset, job.length), job.kpc);
}
