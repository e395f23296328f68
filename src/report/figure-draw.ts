/**
 * Drawing one figure into its files' bytes, on a figure worker (or on the
 * main thread where none can start): Vega turns a specification into the
 * SVG (vega-svg.ts, loaded with the first one), resvg rasterises the SVG
 * and encodes the PNG.
 *
 * A plane picture's raster is not drawn by resvg: the SVG carries a
 * placeholder image, which is left out of the rasterised SVG; its cells are
 * put straight into the pixels under everything the SVG draws (the frame,
 * the colour bar, the text), each pixel taking the cell its centre falls
 * in (the SVG asks for pixelated scaling; resvg blended a pixel between
 * cells), and the PNG is encoded here at a fast zlib level. The SVG file
 * gets the enlarged raster as an embedded PNG in the placeholder's place.
 */
import type { ResvgRenderOptions } from "@resvg/resvg-js";
import type * as vega from "vega";
import type { TopLevelSpec } from "vega-lite";
import { blockPng, FIGURE_LEVEL, pngFile } from "./png.js";

/** The placeholder address of a plane picture's image (a data address that Vega keeps as it is). */
export const RASTER_MARKER = "data:image/png;base64,cHNpYm94LXJhc3Rlcg==";

/** A plane picture's raster: its size in SVG units (its top-left corner is the origin of the Vega spec's marks), its cells' colours (RGB, top row first) and the zoom of the embedded PNG. */
export interface RasterLayer {
  readonly width: number;
  readonly height: number;
  readonly nx: number;
  readonly ny: number;
  readonly colours: Uint8Array;
  readonly zoom: number;
}

/** What a figure is drawn from: its SVG, or a Vega spec, or a Vega-Lite spec (given the shared style). */
export type FigureSource = { readonly svg: string } | { readonly spec: vega.Spec } | { readonly vegaLite: TopLevelSpec };

/** What a worker is sent: the figure, resvg's options (zoom, fonts, white background) and a plane picture's raster (with a Vega spec only). */
export type FigureJob = FigureSource & {
  readonly options: ResvgRenderOptions;
  readonly raster?: RasterLayer;
};

/** The figure's files: the SVG and the PNG's bytes, and the PNG's size in pixels. */
export interface DrawnFigure {
  readonly svg: string;
  readonly png: Uint8Array;
  readonly width: number;
  readonly height: number;
}

/** resvg's class (passed in: the worker loads it by path). */
export type ResvgClass = new (svg: string, options?: ResvgRenderOptions) => { render(): { readonly pixels: Buffer; readonly width: number; readonly height: number; asPng(): Buffer } };

const IMAGE = new RegExp(`<image xlink:href="${RASTER_MARKER.replace(/[+/=.]/g, "\\$&")}"[^>]*/>`);
const BACKGROUND = /^(<svg[^>]*>)<rect width="[\d.]+" height="[\d.]+" fill="white"\/>/;

/** The SVG without the placeholder image and the white background (both put under the pixels here). */
function frameOnly(svg: string): string {
  if (!IMAGE.test(svg) || !BACKGROUND.test(svg)) throw new Error("a plane picture's SVG lacks its raster placeholder or its white background");
  return svg.replace(IMAGE, "").replace(BACKGROUND, "$1");
}

/** The figure's SVG and the origin of its marks (a Vega spec's plot area; [0, 0] for an SVG given as it is). */
async function figureSvg(source: FigureSource): Promise<{ svg: string; origin: [number, number] }> {
  if ("svg" in source) return { svg: source.svg, origin: [0, 0] };
  const { vegaOfLite, vegaSvg } = await import("./vega-svg.js");
  return vegaSvg("spec" in source ? source.spec : vegaOfLite(source.vegaLite));
}

/** Draw a figure: rasterise and encode (resvg's own encoder), or for a plane picture put its cells under the frame, encode the PNG here and fill the SVG's raster in. */
export async function drawFigure(Resvg: ResvgClass, job: FigureJob): Promise<DrawnFigure> {
  const { svg, origin } = await figureSvg(job);
  const raster = job.raster;
  if (!raster) {
    const image = new Resvg(svg, job.options).render();
    return { svg, png: image.asPng(), width: image.width, height: image.height };
  }
  const image = new Resvg(frameOnly(svg), { ...job.options, background: undefined }).render();
  const { width, height } = image;
  const scale = job.options.fitTo?.mode === "zoom" ? job.options.fitTo.value : 1;
  const px = image.pixels;
  layOver(px, width, height, underlay(raster, origin, scale));
  const png = pngFile(scanlines(px, width, height), width, height, 4, FIGURE_LEVEL);
  const embedded = `data:image/png;base64,${blockPng(raster.colours, raster.nx, raster.ny, raster.zoom).toString("base64")}`;
  return { svg: svg.replace(RASTER_MARKER, embedded), png, width, height };
}

/** Where the cells go in pixels: the rectangle, and for each pixel column and row the offset of its cell's colour. */
interface Underlay {
  readonly x0: number;
  readonly y0: number;
  readonly columns: Int32Array;
  readonly rows: Int32Array;
  readonly colours: Uint8Array;
}

/** Pixel (i + ½) of n samples the enlarged raster at (i + ½)·N/n, N = cells·zoom (nearest neighbour), whose block is its cell. */
function cellOf(n: number, cells: number, zoom: number): Int32Array {
  const src = cells * zoom;
  return Int32Array.from({ length: n }, (_, i) => Math.min(cells - 1, Math.floor(Math.floor(((i + 0.5) * src) / n) / zoom)));
}

function underlay(r: RasterLayer, [x, y]: readonly [number, number], scale: number): Underlay {
  const [x0, y0] = [Math.round(x * scale), Math.round(y * scale)];
  const w = Math.round((x + r.width) * scale) - x0;
  const h = Math.round((y + r.height) * scale) - y0;
  const columns = cellOf(w, r.nx, r.zoom).map((c) => 3 * c);
  const rows = cellOf(h, r.ny, r.zoom).map((c) => 3 * r.nx * c);
  return { x0, y0, columns, rows, colours: r.colours };
}

const WHITE = Uint8Array.of(255, 255, 255);

/**
 * Lay premultiplied RGBA pixels, in place, over white, and inside the underlay's rectangle over its
 * cells (source-over: colour + (1 − alpha)·what is under it); every pixel ends opaque.
 */
function layOver(px: Uint8Array, width: number, height: number, under: Underlay): void {
  for (let y = 0; y < height; y++) {
    const cellRow = y >= under.y0 && y - under.y0 < under.rows.length ? under.rows[y - under.y0]! : -1;
    for (let x = 0, i = 4 * width * y; x < width; x++, i += 4) {
      const a = px[i + 3]!;
      if (a === 255) continue;
      const col = cellRow >= 0 ? x - under.x0 : -1;
      const inside = col >= 0 && col < under.columns.length;
      const base = inside ? under.colours : WHITE;
      const c = inside ? cellRow + under.columns[col]! : 0;
      const k = 255 - a;
      for (let ch = 0; ch < 3; ch++) px[i + ch] = px[i + ch]! + Math.round((base[c + ch]! * k) / 255);
      px[i + 3] = 255;
    }
  }
}

let scratch = new Uint8Array(0);

/** The PNG's scanlines of RGBA pixels, unfiltered (filter byte 0: a fast zlib level does as well on figures as filtering), in a buffer reused from figure to figure. */
function scanlines(px: Uint8Array, width: number, height: number): Uint8Array {
  const line = 4 * width;
  const size = (line + 1) * height;
  // fresh memory costs more than copying into memory touched already
  if (scratch.length < size) scratch = new Uint8Array(size);
  const out = scratch.subarray(0, size);
  for (let y = 0; y < height; y++) {
    out[(line + 1) * y] = 0;
    out.set(px.subarray(line * y, line * (y + 1)), (line + 1) * y + 1);
  }
  return out;
}
