/**
 * Text and boxes of the chart writer. A line of text is one em high and as
 * wide as the figure font sets it, where the thread drawing the figure has
 * given its faces' widths (setTextMeasure: font-metrics.ts, from the faces
 * resvg draws with); without them, 0.8 em per character (Vega's estimate
 * when it has no canvas, wider than most text). The SVG is rasterised by
 * resvg with the real font.
 */
import { FONT } from "../figure-style.js";

/** A rectangle in SVG units (x1 ≤ x2, y1 ≤ y2 unless empty). */
export interface Box {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}

export const emptyBox = (): Box => ({ x1: Infinity, y1: Infinity, x2: -Infinity, y2: -Infinity });

/** Grow `a` to hold `b` (in place); returns `a`. */
export function unite(a: Box, b: Box): Box {
  a.x1 = Math.min(a.x1, b.x1);
  a.y1 = Math.min(a.y1, b.y1);
  a.x2 = Math.max(a.x2, b.x2);
  a.y2 = Math.max(a.y2, b.y2);
  return a;
}

export const moved = (b: Box, dx: number, dy: number): Box => ({ x1: b.x1 + dx, y1: b.y1 + dy, x2: b.x2 + dx, y2: b.y2 + dy });

/** Where a text's anchor point lies vertically: its top, middle, bottom or the alphabetic baseline. */
export type Baseline = "top" | "middle" | "bottom" | "alphabetic";

export interface TextStyle {
  readonly size: number;
  readonly bold?: boolean;
  readonly anchor?: "start" | "middle" | "end";
  readonly baseline?: Baseline;
  /** Rotation in degrees about the anchor point: 0, 90 or −90. */
  readonly angle?: number;
}

/** A line's width in em, in the regular or the bold face. */
export type TextMeasure = (text: string, bold: boolean) => number;

let measure: TextMeasure | undefined;

/** Lay text out with `m` from now on on this thread (undefined: the estimate of 0.8 em per UTF-16 unit). */
export function setTextMeasure(m: TextMeasure | undefined): void {
  measure = m;
}

/** The layout width of a line of text at `size`: as the figure font sets it (rounded up) or, without its widths, 0.8 em per UTF-16 unit (rounded down, as Vega does). */
export function textWidth(text: string, size: number, bold = false): number {
  return measure ? Math.ceil(measure(text, bold) * size) : Math.trunc(0.8 * text.length * size);
}

/** How far below the anchor point the alphabetic baseline is drawn, whole units. */
function baselineShift(baseline: Baseline, size: number): number {
  return Math.round(baseline === "top" ? 0.79 * size : baseline === "middle" ? 0.3 * size : baseline === "bottom" ? -0.21 * size : 0);
}

/** The layout box of a text at (x, y). */
export function textBox(x: number, y: number, text: string, style: TextStyle): Box {
  const w = textWidth(text, style.size, style.bold);
  const h = style.size;
  const top = baselineShift(style.baseline ?? "alphabetic", style.size) - Math.round(0.8 * h);
  const left = style.anchor === "middle" ? -w / 2 : style.anchor === "end" ? -w : 0;
  const angle = style.angle ?? 0;
  // a quarter turn maps the box (left…left+w, top…top+h) about the anchor
  if (angle === 90) return { x1: x - top - h, y1: y + left, x2: x - top, y2: y + left + w };
  if (angle === -90) return { x1: x + top, y1: y - left - w, x2: x + top + h, y2: y - left };
  return { x1: x + left, y1: y + top, x2: x + left + w, y2: y + top + h };
}

/** A number as SVG writes it: at most three decimals, no trailing zeros. */
export function num(v: number): string {
  const r = Math.round(v * 1000) / 1000;
  return String(Object.is(r, -0) ? 0 : r);
}

export function escapeXml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

/** A text element at (x, y) in the figure font. */
export function textSvg(x: number, y: number, text: string, style: TextStyle, cls?: string): string {
  const dy = baselineShift(style.baseline ?? "alphabetic", style.size);
  const place = style.angle ? `transform="translate(${num(x)},${num(y)}) rotate(${style.angle})" y="${dy}"` : `x="${num(x)}" y="${num(y + dy)}"`;
  const anchor = style.anchor && style.anchor !== "start" ? ` text-anchor="${style.anchor}"` : "";
  const weight = style.bold ? ` font-weight="bold"` : "";
  const klass = cls ? ` class="${cls}"` : "";
  return `<text${klass} ${place}${anchor} font-family="${FONT}" font-size="${style.size}"${weight} fill="#000">${escapeXml(text)}</text>`;
}
