/**
 * A raster over two physical axes with arbitrary ranges (the Husimi x–v
 * image, whose velocity axis is centred on zero), drawn like every other
 * density picture (field-image.ts): axes, a titled colour bar, a caption.
 */
import { colourRange, fieldFigure } from "./field-image.js";
import type { Figure } from "./render.js";

/** nx·ny values (x fastest, row 0 at the bottom) over [x0, x1] × [y0, y1]. */
export interface RangedPlane {
  readonly nx: number;
  readonly ny: number;
  readonly values: Float64Array;
  readonly x: readonly [number, number];
  readonly y: readonly [number, number];
}

/** Render the plane with axis titles, a colour bar over [max − decades, max] and a caption. */
export function rangedFigure(plane: RangedPlane, opts: { xTitle: string; yTitle: string; legend: string; caption: string; decades?: number }): Promise<Figure> {
  return fieldFigure(
    { nx: plane.nx, ny: plane.ny, values: plane.values, x0: plane.x[0], y0: plane.y[0], width: plane.x[1] - plane.x[0], height: plane.y[1] - plane.y[0] },
    { xTitle: opts.xTitle, yTitle: opts.yTitle, legend: opts.legend, title: opts.caption, range: colourRange(plane.values, opts.decades ?? Infinity), colourMap: "viridis", size: 380, aspect: 2 / 3 },
  );
}
