/**
 * psibox's own chart writer: a figure described as plain data (a title,
 * panels of series stacked top to bottom, or a plane picture's image area
 * with its colour bar; a legend) written as SVG, with the origin of the
 * first plot area. Sizes follow the content: the room the axes, the
 * legend and the title need is added around the plot areas, plus a
 * margin. The look is the figures' one (figure-style.ts): DejaVu Sans, 10
 * units for tick and legend labels, 11 for axis titles, 11 bold for the
 * title and 10 for its subtitle, frames and axes in dark grey.
 */
import { axisSvg, AXIS_COLOUR } from "./axis.js";
import { legendLayout, type LegendSpec } from "./legend.js";
import { marksSvg, type Series } from "./marks.js";
import { extent, scaleOf, type AxisSpec } from "./scales.js";
import { emptyBox, moved, num, textSvg, textWidth, unite, type Box } from "./text.js";
import { imageAreaSvg, type ImageArea } from "./image-area.js";

export type { AxisSpec, LegendSpec, Series, ImageArea };

/** One plot area with its axes (bottom and left) and series. */
export interface Panel {
  readonly width: number;
  readonly height: number;
  readonly x: AxisSpec;
  readonly y: AxisSpec;
  readonly series: readonly Series[];
}

export interface ChartSpec {
  readonly title: string;
  readonly subtitle?: string;
  /** Subtitles the figure is made wide enough for besides its own (a movie's frames: each as wide as the widest). */
  readonly subtitleRoom?: readonly string[];
  /** Plot areas stacked from the top, `PANEL_GAP` apart (or an image area instead). */
  readonly panels?: readonly Panel[];
  readonly image?: ImageArea;
  readonly legend?: LegendSpec;
  /** The margin around everything (default 5). */
  readonly margin?: number;
}

const PANEL_GAP = 20;
const LEGEND_GAP = 18;
const TITLE_GAP = 6;
const SUBTITLE_GAP = 3;

/** A laid-out part: its SVG (relative to the first plot's origin), its box, and the boxes beside which a legend goes. */
export interface Part {
  readonly svg: string;
  readonly box: Box;
  /** Where a right legend must stay clear of (plot areas, vertical axes) and a top one (plot areas, horizontal axes). */
  readonly besideRight: Box;
  readonly besideTop: Box;
  readonly width: number;
  readonly height: number;
}

/**
 * A panel drawn `dy` below the first. Its box holds the axes, the marks and the plot area; in a stack of
 * panels also the frame's stroke, and the axes half a unit further in (where they are drawn).
 */
function panelPart(p: Panel, dy: number, inStack: boolean): Part {
  const xs = scaleOf(p.x, extent(p.series.flatMap((s) => s.x), p.x.log === true), [0, p.width]);
  const ys = scaleOf(p.y, extent(p.series.flatMap((s) => s.y), p.y.log === true), [p.height, 0]);
  const bottom = axisSvg(p.x, xs, "bottom", p.height, p.width);
  const left = axisSvg(p.y, ys, "left", 0, p.height);
  const marks = marksSvg(p.series, xs, ys);
  const area: Box = { x1: 0, y1: 0, x2: p.width, y2: p.height };
  const frame = `<path class="frame" d="M0.5,0.5h${num(p.width)}v${num(p.height)}h${num(-p.width)}Z" stroke="${AXIS_COLOUR}"/>`;
  const shift = inStack ? 0.5 : 0;
  const box = unite(unite(unite({ ...area }, moved(bottom.box, shift, shift)), moved(left.box, shift, shift)), marks.box);
  if (inStack) unite(box, { x1: -0.5, y1: -0.5, x2: p.width + 1.5, y2: p.height + 1.5 });
  const svg = `<g class="panel" transform="translate(0,${num(dy)})">${frame}${bottom.svg}${left.svg}${marks.svg}</g>`;
  return { svg, box: moved(box, 0, dy), besideRight: moved(unite({ ...area }, left.box), 0, dy), besideTop: moved(unite({ ...area }, bottom.box), 0, dy), width: p.width, height: p.height };
}

/** The panels, each below the last one's box with a gap. */
function stacked(panels: readonly Panel[]): Part {
  const inStack = panels.length > 1;
  let svg = "";
  let y = 0;
  const box = emptyBox();
  const right = emptyBox();
  const top = emptyBox();
  panels.forEach((p, i) => {
    const first = panelPart(p, 0, inStack);
    const dy = i === 0 ? 0 : Math.ceil(box.y2) + PANEL_GAP + (first.box.y1 < 0 ? Math.ceil(-first.box.y1) : 0);
    const part = i === 0 ? first : panelPart(p, dy, inStack);
    y = dy;
    svg += part.svg;
    unite(box, part.box);
    // beside several panels, a legend keeps clear of everything they draw
    unite(right, inStack ? part.box : part.besideRight);
    unite(top, inStack ? part.box : part.besideTop);
  });
  return { svg, box, besideRight: right, besideTop: top, width: panels[0]?.width ?? 0, height: inStack ? 0 : y + (panels[0]?.height ?? 0) };
}

/** Title and subtitle above the content, starting at its left edge. */
function titleSvg(spec: ChartSpec, content: Box): { svg: string; box: Box } {
  const height = spec.subtitle ? 11 + SUBTITLE_GAP + 10 : 11;
  const [x, y] = [content.x1, content.y1 - height - TITLE_GAP];
  const width = Math.max(textWidth(spec.title, 11, true), ...[spec.subtitle ?? "", ...(spec.subtitleRoom ?? [])].map((s) => textWidth(s, 10)));
  const svg =
    `<g class="title" transform="translate(${num(x)},${num(y)})">` +
    textSvg(0, 0, spec.title, { size: 11, bold: true, baseline: "top" }) +
    (spec.subtitle ? textSvg(0, 11 + SUBTITLE_GAP, spec.subtitle, { size: 10, baseline: "top" }, "subtitle") : "") +
    `</g>`;
  return { svg, box: { x1: x, y1: y, x2: x + width, y2: y + height } };
}

/** Write the chart: its SVG, and the origin of its first plot area in SVG units. */
export function chartSvg(spec: ChartSpec): { svg: string; origin: [number, number] } {
  const part = spec.image ? imageAreaSvg(spec.image) : stacked(spec.panels ?? []);
  const all = { ...part.box };
  let legend = "";
  if (spec.legend && spec.legend.entries.length > 0) {
    const l = legendLayout(spec.legend);
    const [lx, ly] = spec.legend.orient === "right" ? [Math.ceil(part.besideRight.x2) + LEGEND_GAP, 0] : [0, Math.floor(part.besideTop.y1) - LEGEND_GAP - l.height];
    legend = l.svg(lx, ly);
    unite(all, { x1: lx, y1: ly, x2: lx + l.width, y2: ly + l.height });
  }
  const title = titleSvg(spec, all);
  unite(all, title.box);
  const margin = spec.margin ?? 5;
  const [left, top] = [Math.max(0, Math.ceil(-all.x1)), Math.max(0, Math.ceil(-all.y1))];
  const width = part.width + left + Math.max(0, Math.ceil(all.x2 - part.width)) + 2 * margin;
  const height = part.height + top + Math.max(0, Math.ceil(all.y2 - part.height)) + 2 * margin;
  const origin: [number, number] = [left + margin, top + margin];
  const svg =
    `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" version="1.1" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">` +
    `<rect width="${width}" height="${height}" fill="white"/>` +
    `<g fill="none" stroke-miterlimit="10" transform="translate(${origin[0]},${origin[1]})">${part.svg}${legend}${title.svg}</g></svg>`;
  return { svg, origin };
}
