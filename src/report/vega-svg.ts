/**
 * Vega and Vega-Lite specifications to SVG in Node (no browser, no canvas),
 * on a figure worker (or on the main thread where none can start): Vega is
 * loaded where the figures are drawn, not by the main thread. Tick labels
 * go through psibox's number formatter (registered as the Vega expression
 * function `psiboxTick`).
 */
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import { formatTick } from "../core/format.js";
import { STYLE } from "./figure-style.js";
import { textWidth } from "./chart/text.js";

/** A text item as Vega measures it. */
type TextItem = { fontSize?: number | string; fontWeight?: string | number; limit?: number };
/** vega-scenegraph's text measurement (exported by Vega, not in its typings). */
interface TextMetrics {
  width: (item: TextItem, text: unknown) => number;
}

let registered = false;
function prepareVega(): void {
  if (registered) return;
  vega.expressionFunction("psiboxTick", (x: unknown) => (typeof x === "number" ? formatTick(x) : String(x)));
  // Vega without a canvas takes text as 0.8 em per character: it gets the chart writer's widths instead (the figure
  // font's where the drawing thread has them, else that same estimate). Vega also truncates text longer than an
  // item's limit with these widths, so such text is at most that wide
  (vega as unknown as { textMetrics: TextMetrics }).textMetrics.width = (item, text) => {
    const line = text == null ? "" : String(text).trim();
    const bold = item.fontWeight === "bold" || Number(item.fontWeight) >= 600;
    const w = line ? textWidth(line, item.fontSize != null ? Number(item.fontSize) || 0 : 11, bold) : 0;
    return item.limit !== undefined && item.limit > 0 ? Math.min(w, item.limit) : w;
  };
  registered = true;
}

/** A Vega spec's SVG, and where the origin of its marks (the plot area's top-left corner) lies in it, in SVG units. */
export async function vegaSvg(spec: vega.Spec): Promise<{ svg: string; origin: [number, number] }> {
  prepareVega();
  const view = new vega.View(vega.parse(spec), { renderer: "none" });
  const svg = await view.toSVG();
  const [x, y] = view.origin();
  const pad = view.padding() as { left: number; top: number };
  view.finalize();
  return { svg, origin: [x + pad.left, y + pad.top] };
}

/** A Vega-Lite spec, with the shared style, compiled to Vega. */
export function vegaOfLite(spec: TopLevelSpec): vega.Spec {
  const styled = { ...spec, config: { ...STYLE, ...((spec as { config?: object }).config ?? {}) } } as TopLevelSpec;
  return compile(styled).spec;
}
