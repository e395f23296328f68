/**
 * The density pictures of one snapshot: in 2D the field itself (x across,
 * y up); in 3D a slice (through the densest cell unless told otherwise) and
 * the projected column density Σ = ∫ρ dl, both normal to one axis (z by
 * default); in 1D log density along the box. Axes in kpc (Mpc for boxes of
 * a megaparsec and more), colour ranges clipped to a stated number of
 * decades below the maximum unless fixed.
 */
import type { Snapshot } from "../io/snapshot.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import { formatNumber } from "../core/format.js";
import { AXIS_NAMES, cellIndices, columnDensity, densityPlane, type DensityPlane } from "./planes.js";
import { colourRange, fieldFigure } from "./field-image.js";
import { densityLinePlot } from "./plots.js";
import type { PictureOptions } from "./picture-options.js";
import type { Figure } from "./render.js";

/** The length unit of a box's axes: kpc, or Mpc from a megaparsec up. */
export function axisUnit(boxKpc: number): { name: "kpc" | "Mpc"; perKpc: number } {
  return boxKpc >= 1000 ? { name: "Mpc", perKpc: 1e-3 } : { name: "kpc", perKpc: 1 };
}

/** "t = 75 Myr" or "z = 3, t = 2.14 Gyr", with the step. */
export function timeCaption(snap: Snapshot): string {
  const m = snap.meta;
  // "redshift" in words: x, y and z name the axes
  const z = m.redshift !== null ? `redshift ${formatNumber(m.redshift, 4)}, ` : "";
  return `${z}t = ${formatNumber(m.time, 4)} ${m.timeUnit} (step ${m.step})`;
}

function log10Values(values: Float64Array): Float64Array {
  return values.map((v) => (v > 0 ? Math.log10(v) : -Infinity));
}

/** The subtitle line that says how the colours were chosen. */
function rangeNote(values: Float64Array, range: readonly [number, number], decades: number, fixed: boolean): string {
  if (fixed) return `colours fixed to 10^${formatNumber(range[0])} … 10^${formatNumber(range[1])}`;
  const lowest = values.reduce((m, v) => (Number.isFinite(v) && v < m ? v : m), Infinity);
  return lowest < range[0] - 1e-12 ? `colours span ${formatNumber(decades)} decades below the maximum` : "colours span the full range";
}

export interface SnapshotPictures {
  readonly slice: Figure;
  readonly projection?: Figure;
  /** The planes behind the pictures (ρ [Msun/kpc³], Σ [Msun/kpc²]), for movie frames on a common colour range. */
  readonly slicePlane?: DensityPlane;
  readonly projectionPlane?: DensityPlane;
}

/** Draw a snapshot's density pictures. `densityUnit` converts |ψ|² in code units to Msun/kpc³, `kpcPerCode` code lengths to kpc. */
export async function snapshotPictures(snap: Snapshot, field: LoadedField, kpcPerCode: number, densityUnit: number, options: PictureOptions): Promise<SnapshotPictures> {
  const { grid, psi } = field;
  const rho = (p: number) => (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2) * densityUnit;
  const when = timeCaption(snap);
  const comoving = snap.meta.redshift !== null ? "comoving " : "";
  if (grid.dims === 1) {
    const rows = Array.from({ length: grid.cells[0]! }, (_, i) => ({ x: grid.coordinate(2, i) * kpcPerCode, rho: rho(i) }));
    return { slice: await densityLinePlot(rows, `${comoving}x [kpc]`, "ρ [Msun/kpc³]", "density", when) };
  }
  const unit = axisUnit(Math.max(...grid.lengths) * kpcPerCode);
  const lengthUnit = kpcPerCode * unit.perKpc;
  const normal = grid.dims === 3 ? options.normal : null;
  // 3D: the column density first, in one pass over ψ that finds the densest cell too (the slice's, unless told)
  const projected = normal === null ? undefined : columnDensity(grid, psi, densityUnit, normal, lengthUnit);
  const index = normal === null ? null : (options.sliceIndex ?? cellIndices(grid, projected!.densest)[normal]!);
  const slicePlane = densityPlane(grid, rho, "slice", { normal, index }, lengthUnit);
  const title = (p: DensityPlane, what: string) =>
    p.normal === null ? what : `${what}, ${p.index !== null ? `${AXIS_NAMES[p.normal]} = ${formatNumber(p.index * (grid.lengths[p.normal]! / grid.cells[p.normal]!) * lengthUnit)} ${unit.name}` : `along ${AXIS_NAMES[p.normal]}`}`;
  const axisTitle = (a: number) => `${comoving}${AXIS_NAMES[a]} [${unit.name}]`;
  const draw = async (plane: DensityPlane, what: string, legend: string, fixed: readonly [number, number] | undefined) => {
    const values = log10Values(plane.values);
    const range = colourRange(values, options.decades, fixed);
    return fieldFigure(
      { ...plane, values },
      { xTitle: axisTitle(plane.across), yTitle: axisTitle(plane.up), legend, title: `${title(plane, what)} · ${when}`, subtitle: rangeNote(values, range, options.decades, fixed !== undefined), range, colourMap: options.colourMap },
    );
  };
  const slice = draw(slicePlane, grid.dims === 3 ? "density slice" : "density", "log₁₀ ρ [Msun/kpc³]", options.densityRange);
  if (!projected) return { slice: await slice, slicePlane };
  // column density in Msun/kpc² whatever the axis unit
  const projPlane = projected.plane;
  const kpcPerAxis = 1 / unit.perKpc;
  const column = { ...projPlane, values: projPlane.values.map((v) => v * kpcPerAxis) };
  // drawn together: the two rasterise at once
  const [sliceFigure, projection] = await Promise.all([slice, draw(column, "column density", "log₁₀ Σ [Msun/kpc²]", options.columnRange)]);
  return { slice: sliceFigure, projection, slicePlane, projectionPlane: column };
}
