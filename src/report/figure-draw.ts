/**
 * Drawing one figure into its files' bytes, on a figure worker (or on the
 * main thread where none can start): psibox's chart writer (chart/chart.ts)
 * or, for the figures still specified for it, Vega (vega-svg.ts, loaded
 * with the first such figure only) turns the figure into SVG, and resvg
 * rasterises it.
 *
 * A plane picture's raster is not drawn by resvg: the SVG carries a
 * placeholder image, which is left out of the rasterised SVG, and resvg
 * draws the white background around the raster's rectangle of pixels only;
 * the cells are put straight into that rectangle's pixels under everything
 * the SVG draws there (the frame, the ticks), each pixel taking the cell
 * its centre falls in (the SVG asks for pixelated scaling; resvg blended a
 * pixel between cells; figure-pixels.ts). The SVG file gets the enlarged raster as an
 * embedded PNG in the placeholder's place. Every figure's PNG is encoded
 * here, band by band, at a fast zlib level (resvg's own encoder took
 * several times as long for files of about the same size).
 */
import type { ResvgRenderOptions } from "@resvg/resvg-js";
import type * as vega from "vega";
import type { TopLevelSpec } from "vega-lite";
import { bandedPng, blockPng, FIGURE_LEVEL } from "./png.js";
import { facesFor } from "./figure-faces.js";
import { figureScanlines, underlay, type Underlay } from "./figure-pixels.js";
import { chartSvg, type ChartSpec } from "./chart/chart.js";
import { setTextMeasure } from "./chart/text.js";
import { figureTextMeasure, rasterOptions } from "./figure-font.js";

/** The placeholder address of a plane picture's image (a data address that Vega keeps as it is). */
export const RASTER_MARKER = "data:image/png;base64,cHNpYm94LXJhc3Rlcg==";

/** A plane picture's raster: its size in SVG units (its top-left corner is the origin of the chart's or Vega spec's plot area), its cells' colours (RGB, top row first) and the zoom of the embedded PNG. */
export interface RasterLayer {
  readonly width: number;
  readonly height: number;
  readonly nx: number;
  readonly ny: number;
  readonly colours: Uint8Array;
  readonly zoom: number;
}

/** What a figure is drawn from: its SVG, or a chart (psibox's chart writer), or a Vega spec, or a Vega-Lite spec (given the shared style). */
export type FigureSource = { readonly svg: string } | { readonly chart: ChartSpec } | { readonly spec: vega.Spec } | { readonly vegaLite: TopLevelSpec };

/** What a worker is sent: the figure, its zoom (PNG pixels per SVG unit) and a plane picture's raster (with a chart or a Vega spec only). */
export type FigureJob = FigureSource & {
  readonly scale: number;
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
export type ResvgClass = new (svg: string, options?: ResvgRenderOptions) => { render(): { readonly pixels: Buffer; readonly width: number; readonly height: number } };

const IMAGE = new RegExp(`<image xlink:href="${RASTER_MARKER.replace(/[+/=.]/g, "\\$&")}"[^>]*/>`);
const BACKGROUND = /^(<svg[^>]*>)<rect width="([\d.]+)" height="([\d.]+)" fill="white"\/>/;

/**
 * The SVG without the placeholder image, its white background drawn around the plane picture's rectangle of
 * pixels (`cells`, at `scale` pixels a unit: its edges fall on pixel edges), which is left clear for the cells to
 * be put under whatever the SVG draws there.
 */
function frameOnly(svg: string, cells: Underlay, scale: number): string {
  const background = BACKGROUND.exec(svg);
  if (!IMAGE.test(svg) || !background) throw new Error("a plane picture's SVG lacks its raster placeholder or its white background");
  const [x1, y1, x2, y2] = [cells.x0, cells.y0, cells.x0 + cells.columns.length, cells.y0 + cells.rows.length].map((v) => v / scale);
  const around = `<path d="M0,0H${background[2]}V${background[3]}H0Z M${x1},${y1}V${y2}H${x2}V${y1}Z" fill="white" fill-rule="evenodd"/>`;
  return svg.replace(IMAGE, "").replace(BACKGROUND, `$1${around}`);
}

/** The figure's SVG and the origin of its plot area (a chart's or a Vega spec's; [0, 0] for an SVG given as it is). */
async function figureSvg(source: FigureSource): Promise<{ svg: string; origin: [number, number] }> {
  if ("svg" in source) return { svg: source.svg, origin: [0, 0] };
  if ("chart" in source) return chartSvg(source.chart);
  const { vegaOfLite, vegaSvg } = await import("./vega-svg.js");
  return vegaSvg("spec" in source ? source.spec : vegaOfLite(source.vegaLite));
}

/** Draw a figure with the figure font's `fonts` (null: the system's; resvg is given copies with the outlines the figures use, figure-faces.ts; its text is laid out with their widths): rasterise with resvg, for a plane picture put its cells under the frame and fill the SVG's raster in, and encode the PNG here (at a fast zlib level). */
export async function drawFigure(Resvg: ResvgClass, job: FigureJob, fonts: string[] | null): Promise<DrawnFigure> {
  // text laid out as wide as these faces set it (chart writer and Vega alike)
  setTextMeasure(figureTextMeasure(fonts));
  const { svg, origin } = await figureSvg(job);
  const raster = job.raster;
  const cells = raster && underlay(raster, origin, job.scale);
  const drawn = cells ? frameOnly(svg, cells, job.scale) : svg;
  const options = rasterOptions(job.scale, fonts && facesFor(fonts, drawn));
  const image = new Resvg(drawn, cells ? { ...options, background: undefined } : options).render();
  const { width, height } = image;
  // a copy of resvg's pixels at each read: changed in place here
  const px = image.pixels;
  const png = await bandedPng(width, height, 4, FIGURE_LEVEL, figureScanlines(px, width, cells));
  if (!raster) return { svg, png, width, height };
  const embedded = `data:image/png;base64,${(await blockPng(raster.colours, raster.nx, raster.ny, raster.zoom)).toString("base64")}`;
  return { svg: svg.replace(RASTER_MARKER, embedded), png, width, height };
}
