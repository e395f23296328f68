/**
 * Pictures of a field: a slice or projection of log₁₀ density as a PNG raster
 * (viridis), framed by a Vega figure with axes in physical units, a
 * labelled colour bar and a caption with time and redshift.
 */
import * as vega from "vega";
import { PNG } from "pngjs";
import { Resvg } from "@resvg/resvg-js";
import { viridis, type Figure } from "./render.js";

/** A 2D image of values, row 0 at the bottom (smallest y). */
export interface Plane {
  readonly nx: number;
  readonly ny: number;
  /** nx·ny values, x fastest. */
  readonly values: Float64Array;
  /** Extent in the axis unit. */
  readonly width: number;
  readonly height: number;
}

/** Encode a plane as a PNG (top row = largest y) with the colour map over [lo, hi]. */
export function planePng(plane: Plane, lo: number, hi: number): Buffer {
  const lut = viridis();
  const png = new PNG({ width: plane.nx, height: plane.ny });
  for (let row = 0; row < plane.ny; row++) {
    const y = plane.ny - 1 - row;
    for (let x = 0; x < plane.nx; x++) {
      const v = plane.values[y * plane.nx + x]!;
      const t = hi > lo ? Math.min(1, Math.max(0, (v - lo) / (hi - lo))) : 0.5;
      const c = Math.round(t * 255);
      const o = 4 * (row * plane.nx + x);
      png.data[o] = lut[3 * c]!;
      png.data[o + 1] = lut[3 * c + 1]!;
      png.data[o + 2] = lut[3 * c + 2]!;
      png.data[o + 3] = 255;
    }
  }
  return PNG.sync.write(png);
}

/** Render a framed density image: axes [unit], a colour bar titled `legend`, and a caption. */
export async function fieldFigure(plane: Plane, opts: { xTitle: string; yTitle: string; legend: string; caption: string }): Promise<Figure> {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of plane.values) {
    if (!Number.isFinite(v)) continue;
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  const raster = planePng(plane, lo, hi);
  const side = 360;
  const w = plane.width >= plane.height ? side : Math.max(60, Math.round((side * plane.width) / plane.height));
  const h = plane.height >= plane.width ? side : Math.max(60, Math.round((side * plane.height) / plane.width));
  const spec: vega.Spec = {
    width: w,
    height: h,
    padding: 8,
    autosize: "pad",
    title: { text: opts.caption, fontSize: 12 },
    scales: [
      { name: "x", type: "linear", domain: [0, plane.width], range: "width", zero: false, nice: false },
      { name: "y", type: "linear", domain: [0, plane.height], range: "height", zero: false, nice: false },
      { name: "color", type: "linear", domain: [lo, hi], range: { scheme: "viridis" }, zero: false, nice: false },
    ],
    axes: [
      { orient: "bottom", scale: "x", title: opts.xTitle },
      { orient: "left", scale: "y", title: opts.yTitle },
    ],
    legends: [{ fill: "color", type: "gradient", title: opts.legend, gradientLength: h - 30 }],
    marks: [
      {
        type: "image",
        encode: {
          enter: {
            x: { value: 0 },
            y: { value: 0 },
            width: { signal: "width" },
            height: { signal: "height" },
            url: { value: `data:image/png;base64,${raster.toString("base64")}` },
            aspect: { value: false },
            smooth: { value: false },
          },
        },
      },
    ],
  };
  const view = new vega.View(vega.parse(spec), { renderer: "none" });
  const svg = await view.toSVG();
  view.finalize();
  const image = new Resvg(svg, { fitTo: { mode: "zoom", value: 2 }, font: { loadSystemFonts: true, defaultFontFamily: "DejaVu Sans" }, background: "white" }).render();
  return { svg, png: image.asPng(), width: image.width, height: image.height };
}
