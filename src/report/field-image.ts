/**
 * Pictures of a plane of values (log₁₀ density, column density, or a
 * space–time diagram): the raster in a frame with axes in physical units,
 * a colour bar with its own titled axis beside it, and a title (psibox's
 * chart writer, chart/image-area.ts).
 * Values outside the colour range are clipped to its ends; NaN cells (no
 * data) are drawn light grey.
 */
import { blockPng, encodePng } from "./png.js";
import { colourTable, type ColourMap } from "./colormaps.js";
import { rasterise, PNG_SCALE, type Figure } from "./render.js";
import type { ChartSpec } from "./chart/chart.js";
import type { Plane } from "./planes.js";
import { RASTER_MARKER } from "./figure-draw.js";

/** The colour range of a picture: `fixed` if given, else [max − decades, max] (or the data's own range if narrower). */
export function colourRange(values: Float64Array, decades: number, fixed?: readonly [number, number]): [number, number] {
  if (fixed) return [fixed[0], fixed[1]];
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!Number.isFinite(hi)) return [0, 1];
  lo = Math.max(lo, hi - decades);
  return hi > lo ? [lo, hi] : [lo - 0.5, hi + 0.5];
}

/** The colour of a cell without data. */
const GAP = [225, 225, 225] as const;

/** Each cell's RGB, row by row from the top (the largest vertical coordinate), x fastest. */
export function cellColours(plane: Plane, lo: number, hi: number, map: ColourMap): Uint8Array {
  const lut = colourTable(map);
  const out = new Uint8Array(3 * plane.nx * plane.ny);
  for (let y = 0; y < plane.ny; y++) {
    let o = 3 * (plane.ny - 1 - y) * plane.nx;
    for (let x = 0; x < plane.nx; x++, o += 3) {
      const v = plane.values[y * plane.nx + x]!;
      if (Number.isNaN(v)) {
        out.set(GAP, o);
        continue;
      }
      const c = 3 * Math.round(255 * Math.min(1, Math.max(0, (v - lo) / (hi - lo))));
      out[o] = lut[c]!;
      out[o + 1] = lut[c + 1]!;
      out[o + 2] = lut[c + 2]!;
    }
  }
  return out;
}

/** The raster as the SVG embeds it: each cell a block of `zoom` × `zoom` pixels (nearest neighbour), top row = largest vertical coordinate. */
export function planePng(plane: Plane, lo: number, hi: number, map: ColourMap, zoom = 1): Promise<Buffer> {
  return blockPng(cellColours(plane, lo, hi, map), plane.nx, plane.ny, zoom);
}

const bars = new Map<ColourMap, Buffer>();

/** A vertical colour-bar raster (bottom: lowest value), made once per colour map. */
function colourBarPng(map: ColourMap): Buffer {
  const made = bars.get(map);
  if (made) return made;
  const lut = colourTable(map);
  const px = new Uint8Array(3 * 256);
  for (let row = 0; row < 256; row++) px.set(lut.subarray(3 * (255 - row), 3 * (256 - row)), 3 * row);
  const png = encodePng(px, 1, 256, 3);
  bars.set(map, png);
  return png;
}

export interface FieldFigureOptions {
  readonly xTitle: string;
  readonly yTitle: string;
  /** Colour-bar title (what the colours show, with its unit). */
  readonly legend: string;
  readonly title: string;
  readonly subtitle?: string;
  /** Subtitles to make room for besides its own (see ChartSpec). */
  readonly subtitleRoom?: readonly string[];
  readonly range: readonly [number, number];
  readonly colourMap: ColourMap;
  /** Longer side of the image in SVG units (default 250). */
  readonly size?: number;
  /** Aspect of the drawn image; default: the plane's own. */
  readonly aspect?: number;
}

const dataUri = (png: Buffer) => `data:image/png;base64,${png.toString("base64")}`;

/**
 * Render a framed picture of a plane: the figure workers put the cells under the frame and embed them in
 * the SVG as a PNG of whole pixel blocks (figure-draw.ts); the chart drawn here carries a placeholder.
 */
export async function fieldFigure(plane: Plane, opts: FieldFigureOptions): Promise<Figure> {
  const [lo, hi] = opts.range;
  const side = opts.size ?? 250;
  const aspect = opts.aspect ?? plane.height / plane.width;
  const w = aspect <= 1 ? side : Math.max(80, Math.round(side / aspect));
  const h = aspect >= 1 ? side : Math.max(80, Math.round(side * aspect));
  const zoom = Math.max(1, Math.ceil((w * PNG_SCALE) / plane.nx), Math.ceil((h * PNG_SCALE) / plane.ny));
  const chart: ChartSpec = {
    title: opts.title,
    ...(opts.subtitle ? { subtitle: opts.subtitle } : {}),
    ...(opts.subtitleRoom ? { subtitleRoom: opts.subtitleRoom } : {}),
    margin: 6,
    image: {
      width: w,
      height: h,
      x: { title: opts.xTitle, domain: [plane.x0, plane.x0 + plane.width] },
      y: { title: opts.yTitle, domain: [plane.y0, plane.y0 + plane.height] },
      href: RASTER_MARKER,
      bar: { title: opts.legend, domain: [lo, hi], href: dataUri(colourBarPng(opts.colourMap)) },
    },
  };
  const colours = cellColours(plane, lo, hi, opts.colourMap);
  return rasterise({ chart }, PNG_SCALE, { width: w, height: h, nx: plane.nx, ny: plane.ny, colours, zoom: Math.min(zoom, 64) });
}
