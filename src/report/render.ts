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
 * width); the SVG is kept as the vector version (vega-svg.ts, with the
 * look of figure-style.ts).
 *
 * The figures are drawn on a worker thread (raster-pool.ts): the main
 * thread builds the specifications and sends them; the worker turns them
 * into SVG with Vega, rasterises and encodes the PNG, so the main thread
 * never loads Vega while a worker can start, and figures requested
 * together (Promise.all) are drawn while the main thread computes. Only the figure font's regular and bold
 * faces are loaded, found once per process through fontconfig; without
 * fontconfig, or without the font, every system font is loaded (slower,
 * same pictures).
 */
import { execFile, execFileSync } from "node:child_process";
import fs from "node:fs";
import { createRequire } from "node:module";
import type * as vega from "vega";
import type { TopLevelSpec } from "vega-lite";
import type { ResvgRenderOptions } from "@resvg/resvg-js";
import { rasterPool, resvgAllocatorOptions } from "./raster-pool.js";
import type { FigureJob, FigureSource, RasterLayer, ResvgClass } from "./figure-draw.js";
import { FONT, PNG_SCALE } from "./figure-style.js";

/** A rendered figure. */
export interface Figure {
  readonly svg: string;
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
}

export { FONT, PNG_SCALE, STYLE } from "./figure-style.js";

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

/** Draw a figure (an SVG, or a Vega or Vega-Lite spec) with the figure font, and a plane picture's raster under it, on the figure workers (or on this thread where they cannot start). */
export async function rasterise(source: string | FigureSource, scale = PNG_SCALE, raster?: RasterLayer): Promise<Figure> {
  const from = typeof source === "string" ? { svg: source } : source;
  const job: FigureJob = { ...from, options: rasterOptions(scale, await findFigureFont()), ...(raster ? { raster } : {}) };
  const pool = rasterPool();
  if (pool) {
    try {
      return await pool.render(job);
    } catch {
      // drawn below, where resvg's own error (if the SVG is at fault) reaches the caller
    }
  }
  // loaded here only (resvg after its allocator's options are set; Vega with the drawing), where no worker could draw
  resvgAllocatorOptions();
  const { Resvg } = createRequire(import.meta.url)("@resvg/resvg-js") as { Resvg: ResvgClass };
  const { drawFigure } = await import("./figure-draw.js");
  const drawn = await drawFigure(Resvg, job);
  return { ...drawn, png: Buffer.from(drawn.png.buffer, drawn.png.byteOffset, drawn.png.length) };
}

/** Figures drawn together (their rasterising shares the thread pool), awaited into a record in the keys' order; undefined entries are left out. */
export async function figuresTogether(pending: Readonly<Record<string, Promise<Figure> | undefined>>): Promise<Record<string, Figure>> {
  const entries = Object.entries(pending).filter((e): e is [string, Promise<Figure>] => e[1] !== undefined);
  const figures = await Promise.all(entries.map(([, f]) => f));
  return Object.fromEntries(entries.map(([name], i) => [name, figures[i]!]));
}

/** Render a Vega spec to SVG and PNG. */
export function renderVega(spec: vega.Spec, scale = PNG_SCALE): Promise<Figure> {
  return rasterise({ spec }, scale);
}

/** Render a Vega-Lite spec (with the shared style) to SVG and PNG. */
export function renderVegaLite(spec: TopLevelSpec, scale = PNG_SCALE): Promise<Figure> {
  return rasterise({ vegaLite: spec }, scale);
}
