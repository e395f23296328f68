/**
 * Rendering figures: Vega-Lite specifications compiled and rendered to SVG
 * in Node (no browser, no canvas), then rasterised to PNG with resvg. The
 * SVG is kept as well: its text (axis titles, captions) can be checked
 * before rasterising.
 */
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import { Resvg } from "@resvg/resvg-js";

/** A rendered figure. */
export interface Figure {
  readonly svg: string;
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
}

/** Render a Vega-Lite spec to SVG and PNG (at `scale` pixels per SVG unit). */
export async function renderVegaLite(spec: TopLevelSpec, scale = 2): Promise<Figure> {
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: "none" });
  const svg = await view.toSVG();
  view.finalize();
  const resvg = new Resvg(svg, { fitTo: { mode: "zoom", value: scale }, font: { loadSystemFonts: true, defaultFontFamily: "DejaVu Sans" }, background: "white" });
  const image = resvg.render();
  return { svg, png: image.asPng(), width: image.width, height: image.height };
}

/** The viridis colour map (perceptually uniform; van der Walt & Smith for matplotlib) as 256 RGB triples, from Vega's scheme. */
export function viridis(): Uint8Array {
  const interp = vega.scheme("viridis") as (t: number) => string;
  const lut = new Uint8Array(256 * 3);
  for (let i = 0; i < 256; i++) {
    const c = interp(i / 255);
    const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(c) ?? /^rgb\((\d+),\s*(\d+),\s*(\d+)\)$/.exec(c);
    if (!m) throw new Error(`unexpected colour ${c}`);
    const parse = (s: string) => (s.length === 2 && /[a-f]/i.test(s) ? parseInt(s, 16) : c.startsWith("#") ? parseInt(s, 16) : Number(s));
    lut[3 * i] = parse(m[1]!);
    lut[3 * i + 1] = parse(m[2]!);
    lut[3 * i + 2] = parse(m[3]!);
  }
  return lut;
}
