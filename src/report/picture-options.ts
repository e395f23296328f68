/**
 * How density pictures are drawn, and the checks of the command-line
 * values that choose it: the colour map, the colour range (fixed, or a
 * stated number of decades below the maximum), and the slice or
 * projection axis and the slice's cell.
 */
import { InputError } from "../core/errors.js";
import { COLOUR_MAPS, colourMap, type ColourMap } from "./colormaps.js";
import { AXIS_NAMES } from "./planes.js";

export interface PictureOptions {
  readonly colourMap: ColourMap;
  /** Default colour range: this many decades below the maximum. */
  readonly decades: number;
  /** Fixed colour range of slices and movie frames, log₁₀ of ρ [Msun/kpc³]. */
  readonly densityRange?: readonly [number, number];
  /** Fixed colour range of projections, log₁₀ of Σ [Msun/kpc²]. */
  readonly columnRange?: readonly [number, number];
  /** 3D: the axis normal to slices and along which projections sum (0, 1, 2 for x, y, z). */
  readonly normal: number;
  /** 3D: the slice's cell along the normal; default through the densest cell. */
  readonly sliceIndex?: number;
}

export const DEFAULT_DECADES = 5;
export const DEFAULT_PICTURES: PictureOptions = { colourMap: "viridis", decades: DEFAULT_DECADES, normal: 2 };

/** The command-line values as given (strings), before checking. */
export interface PictureFlags {
  colormap?: string;
  decades?: string;
  range?: string;
  columnRange?: string;
  sliceAxis?: string;
  sliceIndex?: string;
}

function range(option: string, text: string): [number, number] {
  const parts = text.split(",").map((s) => s.trim());
  const [lo, hi] = parts.map(Number);
  if (parts.length !== 2 || !Number.isFinite(lo) || !Number.isFinite(hi)) throw new InputError(`${option}: give two numbers LO,HI (log₁₀ of the value), e.g. ${option} 3,8; got "${text}"`);
  if (!(lo! < hi!)) throw new InputError(`${option}: LO must be below HI, got ${lo} ≥ ${hi}`);
  return [lo!, hi!];
}

/** Check the picture flags; returns the options (cell indices are checked against each grid later, by `checkSliceIndex`). */
export function pictureOptions(flags: PictureFlags): PictureOptions {
  const map = flags.colormap === undefined ? DEFAULT_PICTURES.colourMap : colourMap(flags.colormap);
  let decades = DEFAULT_DECADES;
  if (flags.decades !== undefined) {
    decades = Number(flags.decades);
    if (!(decades > 0 && decades <= 300)) throw new InputError(`--decades: give a positive number of decades (e.g. 4), got "${flags.decades}"`);
  }
  let normal = DEFAULT_PICTURES.normal;
  if (flags.sliceAxis !== undefined) {
    normal = (AXIS_NAMES as readonly string[]).indexOf(flags.sliceAxis);
    if (normal < 0) throw new InputError(`--slice-axis: must be x, y or z, got "${flags.sliceAxis}"`);
  }
  let sliceIndex: number | undefined;
  if (flags.sliceIndex !== undefined) {
    sliceIndex = Number(flags.sliceIndex);
    if (!Number.isInteger(sliceIndex) || sliceIndex < 0) throw new InputError(`--slice-index: give a cell index 0, 1, 2, …; got "${flags.sliceIndex}"`);
  }
  return {
    colourMap: map,
    decades,
    normal,
    ...(flags.range !== undefined ? { densityRange: range("--range", flags.range) } : {}),
    ...(flags.columnRange !== undefined ? { columnRange: range("--column-range", flags.columnRange) } : {}),
    ...(sliceIndex !== undefined ? { sliceIndex } : {}),
  };
}

/** A slice index must lie on the grid's normal axis (3D only). */
export function checkSliceIndex(options: PictureOptions, cells: readonly number[], file: string): void {
  if (options.sliceIndex === undefined) return;
  if (cells.length !== 3) throw new InputError(`--slice-index: ${file} is ${cells.length}D; slices are chosen in 3D fields only`);
  const n = cells[options.normal]!;
  if (options.sliceIndex >= n) throw new InputError(`--slice-index: ${options.sliceIndex} is outside the grid of ${file} (${AXIS_NAMES[options.normal]} has cells 0 … ${n - 1})`);
}

export { COLOUR_MAPS };
