/**
 * Rendering figures: Vega and Vega-Lite specifications rendered to SVG in
 * Node (no browser, no canvas), then rasterised to PNG with resvg.
 *
 * One style for every figure: DejaVu Sans (it has the Unicode math glyphs
 * the labels use: ⟨⟩, ₁₀, ², −, ∫, λ, χ), 10 px tick labels and 11 px
 * titles on plots about 300–400 px wide, so that a figure set at the width
 * of one column of a two-column paper (8.6 cm) prints its text at about
 * 7–8 pt, and one on a slide at half its width reads from the back row.
 * PNGs are rendered at 3 pixels per SVG unit (about 300 dpi at column
 * width); the SVG is kept as the vector version. Tick labels go through
 * psibox's number formatter (registered as the Vega expression function
 * `psiboxTick`).
 *
 * Rasterising and PNG encoding run on worker threads (raster-pool.ts), so
 * figures requested together (Promise.all) are drawn on all cores while the
 * main thread builds the next SVG. Only the figure font's regular and bold
 * faces are loaded, found once per process through fontconfig; without
 * fontconfig, or without the font, every system font is loaded (slower,
 * same pictures).
 */
import { execFile, execFileSync } from "node:child_process";
import fs from "node:fs";
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import { createRequire } from "node:module";
import type { ResvgRenderOptions } from "@resvg/resvg-js";
import { formatTick } from "../core/format.js";
import { rasterPool, resvgAllocatorOptions } from "./raster-pool.js";
import { drawFigure, type FigureJob, type RasterLayer, type ResvgClass } from "./figure-draw.js";

/** A rendered figure. */
export interface Figure {
  readonly svg: string;
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
}

export const FONT = "DejaVu Sans";
/** PNG pixels per SVG unit. */
export const PNG_SCALE = 3;

let registered = false;
function registerFormatter(): void {
  if (registered) return;
  vega.expressionFunction("psiboxTick", (x: unknown) => (typeof x === "number" ? formatTick(x) : String(x)));
  registered = true;
}

/** The shared look: fonts, sizes, formatted ticks. Used as Vega-Lite `config` and merged into Vega specs. */
export const STYLE = {
  font: FONT,
  title: { font: FONT, subtitleFont: FONT, fontSize: 11, fontWeight: "bold", subtitleFontSize: 10, anchor: "start", offset: 6 },
  axis: {
    labelFont: FONT,
    titleFont: FONT,
    labelFontSize: 10,
    titleFontSize: 11,
    titleFontWeight: "normal",
    labelExpr: "psiboxTick(datum.value)",
    labelOverlap: true,
    labelFlush: false,
    tickCount: 5,
    grid: false,
    domainColor: "#333",
    tickColor: "#333",
  },
  legend: { labelFont: FONT, titleFont: FONT, labelFontSize: 10, titleFontSize: 10, titleFontWeight: "normal", labelLimit: 300, titleLimit: 400 },
  text: { font: FONT },
  view: { stroke: "#333" },
} as const;

let fontFiles: string[] | null | undefined;
let fontLookup: Promise<string[] | null> | undefined;

/** fontconfig's listing of the figure font's faces: file, weight, width and slant, one face a line. */
const FC_ARGS = ["--format", "%{file}\t%{weight}\t%{width}\t%{slant}\n", FONT];
/** fontconfig's weights of the figures' two styles (regular, bold), its upright slant and its normal width. */
const REGULAR = 80;
const BOLD = 200;

/**
 * The files of the faces the figures use (upright, normal width: the regular and the bold, each the listed weight
 * nearest to it), sorted; every listed file where none is upright and of normal width; null when none exists.
 * resvg reads every file it is given for each figure: the two faces instead of the family's nine.
 */
export function figureFaces(listed: string): string[] | null {
  const faces = listed
    .split("\n")
    .map((l) => l.split("\t"))
    .filter((f) => f.length === 4 && f[0]!.length > 0 && fs.existsSync(f[0]!))
    .map(([file, weight, width, slant]) => ({ file: file!, weight: Number(weight), upright: Number(slant) === 0 && Number(width) === 100 }));
  if (faces.length === 0) return null;
  const upright = faces.filter((f) => f.upright);
  if (upright.length === 0) return [...new Set(faces.map((f) => f.file))].sort();
  const nearest = (w: number) => upright.reduce((best, f) => (Math.abs(f.weight - w) < Math.abs(best.weight - w) ? f : best)).file;
  return [...new Set([nearest(REGULAR), nearest(BOLD)])].sort();
}

/** The figure font's files (its regular and bold faces), asked of fontconfig once; null when it cannot say. */
export function figureFontFiles(): string[] | null {
  if (fontFiles !== undefined) return fontFiles;
  fontFiles = null;
  try {
    fontFiles = figureFaces(execFileSync("fc-list", FC_ARGS, { encoding: "utf8", timeout: 10_000, stdio: ["ignore", "pipe", "ignore"] }));
  } catch {
    // no fontconfig: resvg loads the system's fonts itself
  }
  return fontFiles;
}

/** The same answer, asked in the background (start it early: `psibox analyze` asks before reading a snapshot). */
export function findFigureFont(): Promise<string[] | null> {
  if (fontFiles !== undefined) return Promise.resolve(fontFiles);
  fontLookup ??= new Promise((resolve) => {
    execFile("fc-list", FC_ARGS, { encoding: "utf8", timeout: 10_000 }, (error, stdout) => {
      // a synchronous ask meanwhile has settled it already
      if (fontFiles === undefined) fontFiles = error ? null : figureFaces(stdout);
      resolve(fontFiles);
    });
  });
  return fontLookup;
}

/** Get ready to draw: ask for the figure font and start the figure workers, in the background (while a snapshot is read). */
export function prepareFigures(): void {
  void findFigureFont();
  rasterPool();
}

/** Options of resvg: the zoom, the figure font and a white background. */
function rasterOptions(scale: number, files: string[] | null): ResvgRenderOptions {
  const font = files ? { loadSystemFonts: false, fontFiles: files } : { loadSystemFonts: true };
  return { fitTo: { mode: "zoom", value: scale }, font: { ...font, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" };
}

/** Rasterise an SVG with the figure font (and a plane picture's raster under it), on the figure workers (or on this thread where they cannot start). */
export async function rasterise(svg: string, scale = PNG_SCALE, raster?: RasterLayer): Promise<Figure> {
  const job: FigureJob = { svg, options: rasterOptions(scale, await findFigureFont()), ...(raster ? { raster } : {}) };
  const pool = rasterPool();
  if (pool) {
    try {
      return await pool.render(job);
    } catch {
      // drawn below, where resvg's own error (if the SVG is at fault) reaches the caller
    }
  }
  // loaded here only (after its allocator's options are set), where no worker could draw
  resvgAllocatorOptions();
  const { Resvg } = createRequire(import.meta.url)("@resvg/resvg-js") as { Resvg: ResvgClass };
  const drawn = drawFigure(Resvg, job);
  return { ...drawn, png: Buffer.from(drawn.png.buffer, drawn.png.byteOffset, drawn.png.length) };
}

/** Figures drawn together (their rasterising shares the thread pool), awaited into a record in the keys' order; undefined entries are left out. */
export async function figuresTogether(pending: Readonly<Record<string, Promise<Figure> | undefined>>): Promise<Record<string, Figure>> {
  const entries = Object.entries(pending).filter((e): e is [string, Promise<Figure>] => e[1] !== undefined);
  const figures = await Promise.all(entries.map(([, f]) => f));
  return Object.fromEntries(entries.map(([name], i) => [name, figures[i]!]));
}

/** A Vega spec's SVG, and where the origin of its marks (the plot area's top-left corner) lies in it, in SVG units. */
export async function vegaSvg(spec: vega.Spec): Promise<{ svg: string; origin: [number, number] }> {
  registerFormatter();
  const view = new vega.View(vega.parse(spec), { renderer: "none" });
  const svg = await view.toSVG();
  const [x, y] = view.origin();
  const pad = view.padding() as { left: number; top: number };
  view.finalize();
  return { svg, origin: [x + pad.left, y + pad.top] };
}

/** Render a Vega spec to SVG and PNG. */
export async function renderVega(spec: vega.Spec, scale = PNG_SCALE): Promise<Figure> {
  return rasterise((await vegaSvg(spec)).svg, scale);
}

/** Render a Vega-Lite spec (with the shared style) to SVG and PNG. */
export async function renderVegaLite(spec: TopLevelSpec, scale = PNG_SCALE): Promise<Figure> {
  registerFormatter();
  const styled = { ...spec, config: { ...STYLE, ...((spec as { config?: object }).config ?? {}) } } as TopLevelSpec;
  return renderVega(compile(styled).spec, scale);
}
