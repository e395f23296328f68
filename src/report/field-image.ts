/**
 * Pictures of a plane of values (log₁₀ density, column density, or a
 * space–time diagram): the raster in a Vega frame with axes in physical
 * units, a colour bar with its own titled axis beside it, and a title.
 * Values outside the colour range are clipped to its ends; NaN cells (no
 * data) are drawn light grey.
 */
import type * as vega from "vega";
import { encodePng } from "./png.js";
import { colourTable, type ColourMap } from "./colormaps.js";
import { renderVega, STYLE, PNG_SCALE, type Figure } from "./render.js";
import type { Plane } from "./planes.js";

const GAP = [225, 225, 225];

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

/** The raster: each cell a block of `zoom` × `zoom` pixels (nearest neighbour), top row = largest vertical coordinate. */
export async function planePng(plane: Plane, lo: number, hi: number, map: ColourMap, zoom = 1): Promise<Buffer> {
  const lut = colourTable(map);
  const W = plane.nx * zoom;
  const H = plane.ny * zoom;
  const px = new Uint8Array(3 * W * H);
  for (let y = 0; y < plane.ny; y++) {
    // the first pixel row of plane row y, then copied to the block's other rows
    const top = 3 * (plane.ny - 1 - y) * zoom * W;
    for (let x = 0; x < plane.nx; x++) {
      const v = plane.values[y * plane.nx + x]!;
      const c = Number.isNaN(v) ? -1 : Math.round(255 * Math.min(1, Math.max(0, (v - lo) / (hi - lo))));
      const [r, g, b] = c < 0 ? GAP : [lut[3 * c]!, lut[3 * c + 1]!, lut[3 * c + 2]!];
      for (let o = top + 3 * x * zoom, end = o + 3 * zoom; o < end; o += 3) {
        px[o] = r!;
        px[o + 1] = g!;
        px[o + 2] = b!;
      }
    }
    for (let r = 1; r < zoom; r++) px.copyWithin(top + 3 * r * W, top, top + 3 * W);
  }
  return encodePng(px, W, H, 3);
}

/** A vertical colour-bar raster (bottom: lowest value). */
function colourBarPng(map: ColourMap): Promise<Buffer> {
  const lut = colourTable(map);
  const px = new Uint8Array(3 * 256);
  for (let row = 0; row < 256; row++) px.set(lut.subarray(3 * (255 - row), 3 * (256 - row)), 3 * row);
  return encodePng(px, 1, 256, 3);
}

export interface FieldFigureOptions {
  readonly xTitle: string;
  readonly yTitle: string;
  /** Colour-bar title (what the colours show, with its unit). */
  readonly legend: string;
  readonly title: string;
  readonly subtitle?: string;
  readonly range: readonly [number, number];
  readonly colourMap: ColourMap;
  /** Longer side of the image in SVG units (default 250). */
  readonly size?: number;
  /** Aspect of the drawn image; default: the plane's own. */
  readonly aspect?: number;
}

/** Vega axes: about five ticks, labelled by psibox's formatter, overlapping labels dropped. */
const TICKS = { tickCount: 5, labelOverlap: true, encode: { labels: { update: { text: { signal: "psiboxTick(datum.value)" } } } } } as const;

const dataUri = (png: Buffer) => `data:image/png;base64,${png.toString("base64")}`;

/** Render a framed picture of a plane. */
export async function fieldFigure(plane: Plane, opts: FieldFigureOptions): Promise<Figure> {
  const [lo, hi] = opts.range;
  const side = opts.size ?? 250;
  const aspect = opts.aspect ?? plane.height / plane.width;
  const w = aspect <= 1 ? side : Math.max(80, Math.round(side / aspect));
  const h = aspect >= 1 ? side : Math.max(80, Math.round(side * aspect));
  const zoom = Math.max(1, Math.ceil((w * PNG_SCALE) / plane.nx), Math.ceil((h * PNG_SCALE) / plane.ny));
  const [raster, bar] = await Promise.all([planePng(plane, lo, hi, opts.colourMap, Math.min(zoom, 64)), colourBarPng(opts.colourMap)]);
  const image = (url: string, width: vega.SignalRef | number, height: number): vega.Mark => ({
    type: "image",
    encode: { enter: { x: { value: 0 }, y: { value: 0 }, width: typeof width === "number" ? { value: width } : width, height: { value: height }, url: { value: url }, aspect: { value: false }, smooth: { value: false } } },
  });
  const spec: vega.Spec = {
    width: w,
    height: h,
    padding: 6,
    autosize: "pad",
    background: "white",
    config: { ...STYLE, axis: { ...STYLE.axis }, title: { ...STYLE.title } } as vega.Config,
    title: { text: opts.title, ...(opts.subtitle ? { subtitle: opts.subtitle } : {}) },
    scales: [
      { name: "x", type: "linear", domain: [plane.x0, plane.x0 + plane.width], range: "width", zero: false, nice: false },
      { name: "y", type: "linear", domain: [plane.y0, plane.y0 + plane.height], range: "height", zero: false, nice: false },
    ],
    axes: [
      { orient: "bottom", scale: "x", title: opts.xTitle, ...TICKS },
      { orient: "left", scale: "y", title: opts.yTitle, ...TICKS },
    ],
    marks: [
      image(dataUri(raster), w, h),
      { type: "rect", encode: { enter: { x: { value: 0 }, y: { value: 0 }, width: { value: w }, height: { value: h }, fill: { value: "transparent" }, stroke: { value: "#333" } } } },
      {
        type: "group",
        encode: { enter: { x: { value: w + 14 }, y: { value: 0 }, width: { value: 12 }, height: { value: h } } },
        scales: [{ name: "bar", type: "linear", domain: [lo, hi], range: [h, 0], zero: false, nice: false }],
        axes: [{ orient: "right", scale: "bar", title: opts.legend, titleAngle: 90, titleBaseline: "bottom", titlePadding: 8, ...TICKS }],
        marks: [image(dataUri(bar), 12, h)],
      },
    ],
  };
  return renderVega(spec);
}
