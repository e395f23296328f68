/**
 * Rendering figures: psibox's charts (chart/chart.ts) or Vega and Vega-Lite
 * specifications rendered to SVG in Node (no browser, no canvas), then
 * rasterised to PNG with resvg.
 *
 * One style for every figure: DejaVu Sans (it has the Unicode math glyphs
 * the labels use: ⟨⟩, ₁₀, ², −, ∫, λ, χ), 10 px tick labels and 11 px
 * titles on plots about 300–400 px wide, so that a figure set at the width
 * of one column of a two-column paper (8.6 cm) prints its text at about
 * 7–8 pt, and one on a slide at half its width reads from the back row.
 * PNGs are rendered at 3 pixels per SVG unit (about 300 dpi at column
 * width); the SVG is kept as the vector version (chart/ or vega-svg.ts,
 * with the look of figure-style.ts).
 *
 * The figures are drawn on a worker thread (raster-pool.ts): the main
 * thread builds the figures' descriptions (charts, or Vega specifications
 * for the run, halo and ensemble figures) and hands each to the worker as
 * it is requested; the worker turns them into SVG, rasterises and encodes
 * the PNG, so the main thread never loads Vega while a worker can start,
 * and figures are drawn while the main thread computes. Only the figure
 * font's regular and bold faces are loaded (figure-font.ts).
 */
import type * as vega from "vega";
import type { TopLevelSpec } from "vega-lite";
import { rasterPool } from "./raster-pool.js";
import { resvgClass } from "./resvg-binding.js";
import type { FigureJob, FigureSource, RasterLayer } from "./figure-draw.js";
import { PNG_SCALE } from "./figure-style.js";
import { figureFontFiles } from "./figure-font.js";
import type { ChartSpec } from "./chart/chart.js";

/** A rendered figure. */
export interface Figure {
  readonly svg: string;
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
}

export { FONT, PNG_SCALE, STYLE } from "./figure-style.js";
export { figureFaces, figureFontFiles } from "./figure-font.js";

/** Get ready to draw: start the figure workers in the background (while a snapshot is read); each asks fontconfig for the figure font as it starts. */
export function prepareFigures(): void {
  rasterPool();
}

/**
 * Draw a figure (an SVG, a chart, or a Vega or Vega-Lite spec) with the figure font, and a plane picture's raster under it, on
 * the figure workers (or on this thread where they cannot start). The job is handed to a worker at once, during
 * this call: a figure requested before a long computation is drawn beside it.
 */
export function rasterise(source: string | FigureSource, scale = PNG_SCALE, raster?: RasterLayer): Promise<Figure> {
  const from = typeof source === "string" ? { svg: source } : source;
  const job: FigureJob = { ...from, scale, ...(raster ? { raster } : {}) };
  const pool = rasterPool();
  // drawn here where no worker can, or where the worker failed: resvg's own error (if the SVG is at fault) then reaches the caller
  return pool ? pool.render(job).catch(() => drawHere(job)) : drawHere(job);
}

/** Draw a figure on this thread (resvg loaded here only; Vega with the drawing). */
async function drawHere(job: FigureJob): Promise<Figure> {
  const { drawFigure } = await import("./figure-draw.js");
  const drawn = await drawFigure(resvgClass(), job, figureFontFiles());
  return { ...drawn, png: Buffer.from(drawn.png.buffer, drawn.png.byteOffset, drawn.png.length) };
}

/** Figures drawn together (their rasterising shares the thread pool), awaited into a record in the keys' order; undefined entries are left out. */
export async function figuresTogether(pending: Readonly<Record<string, Promise<Figure> | undefined>>): Promise<Record<string, Figure>> {
  const entries = Object.entries(pending).filter((e): e is [string, Promise<Figure>] => e[1] !== undefined);
  const figures = await Promise.all(entries.map(([, f]) => f));
  return Object.fromEntries(entries.map(([name], i) => [name, figures[i]!]));
}

/** Render a chart (psibox's chart writer) to SVG and PNG. */
export function renderChart(chart: ChartSpec, scale = PNG_SCALE): Promise<Figure> {
  return rasterise({ chart }, scale);
}

/** Render a Vega spec to SVG and PNG. */
export function renderVega(spec: vega.Spec, scale = PNG_SCALE): Promise<Figure> {
  return rasterise({ spec }, scale);
}

/** Render a Vega-Lite spec (with the shared style) to SVG and PNG. */
export function renderVegaLite(spec: TopLevelSpec, scale = PNG_SCALE): Promise<Figure> {
  return rasterise({ vegaLite: spec }, scale);
}
