/**
 * A chart's legend: one entry per series name, a symbol (a circle, or a
 * short line for lines) and its label, in a column beside the plot or in a
 * row above it, with an optional title.
 */
import { num, textSvg, textWidth, type TextStyle } from "./text.js";

export interface LegendSpec {
  /** Beside the plot, entries in a column; or above it, in a row. */
  readonly orient: "right" | "top";
  readonly title?: string;
  readonly entries: readonly { readonly label: string; readonly colour: string }[];
  /** A filled circle (points) or a short line (lines). */
  readonly symbol: "circle" | "line";
  /** Circles also get an outline (series drawn with lines among them). */
  readonly outline?: boolean;
  readonly opacity?: number;
}

/** The symbol's cell (its centre is half of it across and down), the label's distance from it and the font sizes. */
const CELL = 12;
const LABEL_GAP = 4;
const LABEL: TextStyle = { size: 10, baseline: "middle" };
const TITLE: TextStyle = { size: 10, baseline: "top" };
const TITLE_GAP = 5;
const ROW_GAP = 2;
const COLUMN_GAP = 10;
const RADIUS = 5;
const OUTLINE = 1.5;

export interface LegendLayout {
  readonly svg: (x: number, y: number) => string;
  readonly width: number;
  readonly height: number;
}

function symbolSvg(spec: LegendSpec, colour: string): string {
  const c = CELL / 2;
  const opacity = ` opacity="${spec.opacity ?? 1}"`;
  if (spec.symbol === "line") return `<path d="M${c - RADIUS},${c}h${2 * RADIUS}" stroke="${colour}" stroke-width="${OUTLINE}"${opacity}/>`;
  const outline = spec.outline ? ` stroke="${colour}" stroke-width="${OUTLINE}"` : "";
  return `<circle cx="${c}" cy="${c}" r="${RADIUS}" fill="${colour}"${outline}${opacity}/>`;
}

/** Lay out the legend; its SVG is placed with its top-left corner at (x, y). */
export function legendLayout(spec: LegendSpec): LegendLayout {
  // an entry's box: the symbol (with its outline) and the label's one-em line around the centre
  const reach = RADIUS + (spec.outline && spec.symbol === "circle" ? OUTLINE : 0);
  const [top, bottom] = [Math.min(CELL / 2 - reach, 1), Math.max(CELL / 2 + reach, 11)];
  const widths = spec.entries.map((e) => CELL + LABEL_GAP + textWidth(e.label, LABEL.size));
  const lead = top < 0 ? Math.ceil(-top) : 0;
  const titleHeight = spec.title ? TITLE.size + TITLE_GAP : 0;
  const places =
    spec.orient === "right"
      ? spec.entries.map((_, i) => [0, titleHeight + i * (Math.ceil(bottom) + ROW_GAP + lead)] as const)
      : // in a row, each entry centred on the row's whole-unit height
        widths.map((_, i) => [widths.slice(0, i).reduce((s, w) => s + Math.ceil(w) + COLUMN_GAP + lead, 0), titleHeight + (Math.ceil(bottom) - bottom) / 2] as const);
  const last = places[places.length - 1] ?? [0, titleHeight];
  const width = Math.max(spec.orient === "right" ? Math.max(0, ...widths) : last[0] + (widths[widths.length - 1] ?? 0), spec.title ? textWidth(spec.title, TITLE.size) : 0);
  const height = Math.ceil(last[1] + bottom);
  const svg = (x: number, y: number) =>
    `<g class="legend" transform="translate(${num(x)},${num(y)})">` +
    (spec.title ? textSvg(0, 0, spec.title, TITLE, "legend-title") : "") +
    spec.entries
      .map((e, i) => `<g class="entry" transform="translate(${num(places[i]![0])},${num(places[i]![1])})">${symbolSvg(spec, e.colour)}${textSvg(CELL + LABEL_GAP, CELL / 2, e.label, LABEL)}</g>`)
      .join("") +
    `</g>`;
  return { svg, width: Math.ceil(width), height };
}

