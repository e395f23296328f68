/**
 * Density planes of a field, oriented the way their axes are labelled: a
 * slice through the box or a projection along one axis, as an image whose
 * horizontal axis is the lower-numbered remaining axis (x before y before z)
 * and whose first row is the smallest coordinate of the vertical axis.
 *
 * Axes are the user's axes (x, y, z: the order of `grid.cells`). A 2D field
 * is its own slice (x across, y up). Slices show the density ρ; projections
 * the column density Σ = ∫ρ dl along the line of sight (mass per area).
 * Pure functions of the field: no I/O, no rendering.
 */
import type { Grid } from "../grid/grid.js";

export const AXIS_NAMES = ["x", "y", "z"] as const;

/** A 2D image of values, x fastest, row 0 at the bottom (smallest vertical coordinate). */
export interface Plane {
  readonly nx: number;
  readonly ny: number;
  readonly values: Float64Array;
  /** Coordinates of the image's lower-left corner and its extent, in the axis unit. */
  readonly x0: number;
  readonly y0: number;
  readonly width: number;
  readonly height: number;
}

/** A density plane and what it shows. */
export interface DensityPlane extends Plane {
  /** User axes across and up, and the normal (line of sight) in 3D. */
  readonly across: number;
  readonly up: number;
  readonly normal: number | null;
  /** Cell index of a slice along its normal (3D), else null. */
  readonly index: number | null;
}

/** Which plane to take: the normal axis (3D; null in 2D) and, for a 3D slice, the cell along it. */
export interface PlaneChoice {
  readonly normal: number | null;
  readonly index: number | null;
}

function strides(grid: Grid): number[] {
  const [, n1, n2] = grid.shape;
  const internal = [n1 * n2, n2, 1];
  const pad = 3 - grid.dims;
  return Array.from({ length: grid.dims }, (_, a) => internal[pad + a]!);
}

/** The two in-plane user axes for a normal axis (3D) or the field's own axes (2D). */
export function planeAxes(dims: number, normal: number | null): { across: number; up: number } {
  if (dims === 2 || normal === null) return { across: 0, up: 1 };
  const [across, up] = [0, 1, 2].filter((a) => a !== normal);
  return { across: across!, up: up! };
}

/**
 * Build a plane of `rho(cell)` values (a slice at `index`, or the sum over
 * the normal axis times the cell depth for a projection). `lengthUnit`
 * converts code lengths to the axis unit; cell i is centred at i·dx, so
 * the image spans −dx/2 … L − dx/2 and each pixel sits on its cell.
 */
export function densityPlane(grid: Grid, rho: (cell: number) => number, kind: "slice" | "projection", choice: PlaneChoice, lengthUnit: number): DensityPlane {
  if (grid.dims < 2) throw new Error("densityPlane needs a 2D or 3D grid");
  const { across, up } = planeAxes(grid.dims, choice.normal);
  const st = strides(grid);
  const nx = grid.cells[across]!;
  const ny = grid.cells[up]!;
  const dx = grid.lengths[across]! / nx;
  const dy = grid.lengths[up]! / ny;
  const values = new Float64Array(nx * ny);
  const normal = grid.dims === 3 ? choice.normal : null;
  const depthCells = normal === null ? 1 : grid.cells[normal]!;
  const dz = normal === null ? 0 : (grid.lengths[normal]! / depthCells) * lengthUnit;
  for (let j = 0; j < ny; j++)
    for (let i = 0; i < nx; i++) {
      const base = i * st[across]! + j * st[up]!;
      if (normal === null) values[j * nx + i] = rho(base);
      else if (kind === "slice") values[j * nx + i] = rho(base + choice.index! * st[normal]!);
      else {
        let s = 0;
        for (let k = 0; k < depthCells; k++) s += rho(base + k * st[normal]!);
        values[j * nx + i] = s * dz;
      }
    }
  return {
    nx,
    ny,
    values,
    x0: -0.5 * dx * lengthUnit,
    y0: -0.5 * dy * lengthUnit,
    width: grid.lengths[across]! * lengthUnit,
    height: grid.lengths[up]! * lengthUnit,
    across,
    up,
    normal,
    index: normal !== null && kind === "slice" ? choice.index : null,
  };
}

/** The user-axis cell indices of a storage index. */
export function cellIndices(grid: Grid, cell: number): number[] {
  const st = strides(grid);
  return st.map((s, a) => Math.floor(cell / s) % grid.cells[a]!);
}

/** One storage row of ψ (n cells from complex index p) added into the plane at o, o + step, …: each cell's |ψ|²·unit; `top` keeps the largest |ψ|² seen and its cell (the first, in storage order, of equals). */
function addRow(psi: Float64Array, p: number, n: number, values: Float64Array, o: number, step: number, unit: number, top: Float64Array): void {
  for (let c = 0; c < n; c++, o += step) {
    const r = psi[2 * (p + c)]! ** 2 + psi[2 * (p + c) + 1]! ** 2;
    values[o] = values[o]! + r * unit;
    if (r > top[0]!) {
      top[0] = r;
      top[1] = p + c;
    }
  }
}

/**
 * The projection of a 3D field's density |ψ|²·`unit` along `normal`, the same plane as `densityPlane` makes of it
 * (each column summed in the same order, bit for bit), in one pass over ψ in storage order; and the densest cell
 * (its storage index, the first of equals), found on the way.
 */
export function columnDensity(grid: Grid, psi: Float64Array, unit: number, normal: number, lengthUnit: number): { plane: DensityPlane; densest: number } {
  if (grid.dims !== 3) throw new Error("columnDensity needs a 3D grid");
  const [n0, n1, n2] = grid.cells as [number, number, number];
  const { across, up } = planeAxes(3, normal);
  const nx = grid.cells[across]!;
  const values = new Float64Array(nx * grid.cells[up]!);
  const top = Float64Array.of(-Infinity, 0);
  // the third storage axis runs along the columns (normal 2) or up the plane
  const step = normal === 2 ? 0 : nx;
  for (let a0 = 0; a0 < n0; a0++)
    for (let a1 = 0; a1 < n1; a1++) addRow(psi, (a0 * n1 + a1) * n2, n2, values, normal === 2 ? a0 + nx * a1 : normal === 1 ? a0 : a1, step, unit, top);
  const dz = (grid.lengths[normal]! / grid.cells[normal]!) * lengthUnit;
  for (let i = 0; i < values.length; i++) values[i] = values[i]! * dz;
  const dx = grid.lengths[across]! / nx;
  const dy = grid.lengths[up]! / grid.cells[up]!;
  const plane = { nx, ny: grid.cells[up]!, values, x0: -0.5 * dx * lengthUnit, y0: -0.5 * dy * lengthUnit, width: grid.lengths[across]! * lengthUnit, height: grid.lengths[up]! * lengthUnit, across, up, normal, index: null };
  return { plane, densest: top[1]! };
}
