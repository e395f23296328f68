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
 */
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import { Resvg } from "@resvg/resvg-js";
import { formatTick } from "../core/format.js";

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

/** Rasterise an SVG with the figure font. */
export function rasterise(svg: string, scale = PNG_SCALE): Figure {
  const image = new Resvg(svg, {
    fitTo: { mode: "zoom", value: scale },
    font: { loadSystemFonts: true, defaultFontFamily: FONT, sansSerifFamily: FONT },
    background: "white",
  }).render();
  return { svg, png: image.asPng(), width: image.width, height: image.height };
}

/** Render a Vega spec to SVG and PNG. */
export async function renderVega(spec: vega.Spec, scale = PNG_SCALE): Promise<Figure> {
  registerFormatter();
  const view = new vega.View(vega.parse(spec), { renderer: "none" });
  const svg = await view.toSVG();
  view.finalize();
  return rasterise(svg, scale);
}

/** Render a Vega-Lite spec (with the shared style) to SVG and PNG. */
export async function renderVegaLite(spec: TopLevelSpec, scale = PNG_SCALE): Promise<Figure> {
  registerFormatter();
  const styled = { ...spec, config: { ...STYLE, ...((spec as { config?: object }).config ?? {}) } } as TopLevelSpec;
  return renderVega(compile(styled).spec, scale);
}
