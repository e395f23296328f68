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

let registered = false;
function registerFormatter(): void {
  if (registered) return;
  vega.expressionFunction("psiboxTick", (x: unknown) => (typeof x === "number" ? formatTick(x) : String(x)));
  registered = true;
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

/** A Vega-Lite spec, with the shared style, compiled to Vega. */
export function vegaOfLite(spec: TopLevelSpec): vega.Spec {
  const styled = { ...spec, config: { ...STYLE, ...((spec as { config?: object }).config ?? {}) } } as TopLevelSpec;
  return compile(styled).spec;
}
