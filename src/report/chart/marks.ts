/**
 * The marks of a chart's panel: series drawn as points (filled circles),
 * as a line (joined in the order of x; broken where a value cannot be
 * placed, e.g. a non-positive value on a log axis), or both.
 */
import { position, type Scale } from "./scales.js";
import { emptyBox, num, unite, type Box } from "./text.js";

export interface Series {
  /** Legend label (series without one stay out of the legend). */
  readonly name?: string;
  readonly colour: string;
  readonly x: readonly number[];
  readonly y: readonly number[];
  readonly mark: "points" | "line" | "line-points";
  /** A point's area in square units (default 30). */
  readonly size?: number;
  /** The points' opacity (default 0.7 for points alone, 1 on a line). */
  readonly opacity?: number;
  /** Line width (default 2). */
  readonly width?: number;
  readonly dash?: readonly number[];
}

const placeable = (s: Scale, v: number) => Number.isFinite(v) && (!s.log || v > 0);

/** The series' points in SVG units, in the order of x for lines; null where a value cannot be placed. */
function placed(series: Series, sx: Scale, sy: Scale, sorted: boolean): ([number, number] | null)[] {
  const order = series.x.map((_, i) => i);
  if (sorted) order.sort((a, b) => series.x[a]! - series.x[b]!);
  return order.map((i) => (placeable(sx, series.x[i]!) && placeable(sy, series.y[i]!) ? [position(sx, series.x[i]!), position(sy, series.y[i]!)] : null));
}

function lineSvg(series: Series, pts: ([number, number] | null)[]): string {
  let d = "";
  let pen = false;
  for (const p of pts) {
    if (!p) {
      pen = false;
      continue;
    }
    d += `${pen ? "L" : "M"}${num(p[0])},${num(p[1])}`;
    pen = true;
  }
  const dash = series.dash ? ` stroke-dasharray="${series.dash.join(",")}"` : "";
  // joined round at each point: a sharp turn of a mitred join draws a spike past the point
  return d ? `<path class="line" d="${d}" stroke="${series.colour}" stroke-width="${series.width ?? 2}" stroke-linejoin="round"${dash}/>` : "";
}

function pointsSvg(series: Series, pts: ([number, number] | null)[], r: number, opacity: number): string {
  // each circle translucent on its own (overlapping points show darker), the colour given once
  const circles = pts
    .filter((p): p is [number, number] => p !== null)
    .map(([x, y]) => `<circle cx="${num(x)}" cy="${num(y)}" r="${num(r)}"/>`)
    .join("");
  return circles ? `<g class="points" fill="${series.colour}" fill-opacity="${opacity}">${circles}</g>` : "";
}

/** Draw the series in their order (points of a line with points go over all lines) and return their SVG and the box they cover. */
export function marksSvg(all: readonly Series[], sx: Scale, sy: Scale): { svg: string; box: Box } {
  const box = emptyBox();
  let svg = "";
  let over = "";
  for (const series of all) {
    const line = series.mark !== "points";
    const pts = placed(series, sx, sy, line);
    const r = Math.sqrt(series.size ?? 30) / 2;
    // a line's box reaches a whole line width beyond its points
    const reach = line ? Math.max(series.width ?? 2, series.mark === "line-points" ? r : 0) : r;
    for (const p of pts) if (p) unite(box, { x1: p[0] - reach, y1: p[1] - reach, x2: p[0] + reach, y2: p[1] + reach });
    if (line) svg += lineSvg(series, pts);
    const points = series.mark === "line" ? "" : pointsSvg(series, pts, r, series.opacity ?? (line ? 1 : 0.7));
    if (series.mark === "line-points") over += points;
    else svg += points;
  }
  return { svg: svg + over, box };
}
