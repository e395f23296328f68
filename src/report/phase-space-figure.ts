/**
 * A raster over two physical axes with arbitrary ranges (the Husimi x–v
 * image, whose velocity axis is centred on zero), framed by Vega axes, a
 * viridis colour bar and a caption.
 */
import * as vega from "vega";
import { Resvg } from "@resvg/resvg-js";
import { planePng } from "./field-image.js";
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
export async function rangedFigure(plane: RangedPlane, opts: { xTitle: string; yTitle: string; legend: string; caption: string; decades?: number }): Promise<Figure> {
  let hi = -Infinity;
  for (const v of plane.values) if (Number.isFinite(v)) hi = Math.max(hi, v);
  let lo = Infinity;
  for (const v of plane.values) if (Number.isFinite(v)) lo = Math.min(lo, v);
  if (opts.decades !== undefined) lo = Math.max(lo, hi - opts.decades);
  const raster = planePng({ nx: plane.nx, ny: plane.ny, values: plane.values, width: 1, height: 1 }, lo, hi);
  const spec: vega.Spec = {
    width: 420,
    height: 280,
    padding: 8,
    autosize: "pad",
    title: { text: opts.caption, fontSize: 12 },
    scales: [
      { name: "x", type: "linear", domain: [...plane.x], range: "width", zero: false, nice: false },
      { name: "y", type: "linear", domain: [...plane.y], range: "height", zero: false, nice: false },
      { name: "color", type: "linear", domain: [lo, hi], range: { scheme: "viridis" }, zero: false, nice: false },
    ],
    axes: [
      { orient: "bottom", scale: "x", title: opts.xTitle },
      { orient: "left", scale: "y", title: opts.yTitle },
    ],
    legends: [{ fill: "color", type: "gradient", title: opts.legend, titleLimit: 400, gradientLength: 250 }],
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
