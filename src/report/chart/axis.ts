/**
 * One axis of a chart: ticks (whole units, drawn half a unit in so that
 * they stay crisp), labels through psibox's tick formatter, the axis line
 * and the title. Labels that would overlap are thinned, every other one
 * at a time, keeping at least the first and the last. The layout box
 * (ticks, labels, title) tells the chart how much room the axis takes.
 */
import { formatTick } from "../../core/format.js";
import { axisTicks, position, type AxisSpec, type Scale } from "./scales.js";
import { emptyBox, num, textBox, textSvg, unite, type Box, type TextStyle } from "./text.js";

export type Orient = "bottom" | "left" | "right";

export const AXIS_COLOUR = "#333";
const TICK = 5;
const LABEL_PAD = 2;
const LABEL = 10;
const TITLE = 11;

/** How the title sits: its distance from the labels and, on a vertical axis, its rotation. */
export interface TitlePlacement {
  readonly padding: number;
  readonly angle: number;
}

const DEFAULT_TITLE: Record<Orient, TitlePlacement> = { bottom: { padding: 4, angle: 0 }, left: { padding: 4, angle: -90 }, right: { padding: 4, angle: 90 } };

/** The axis, drawn at `at` (the plot's height for a bottom axis, its width for a right one, 0 for a left one). */
export interface AxisLayout {
  readonly svg: string;
  /** Its layout box, relative to the plot's origin. */
  readonly box: Box;
}

interface Label {
  readonly text: string;
  readonly at: number;
  readonly box: Box;
}

const overlaps = (a: Box, b: Box) => 0 > Math.max(b.x1 - a.x2, a.x1 - b.x2, b.y1 - a.y2, a.y1 - b.y2);
const anyOverlap = (ls: readonly Label[]) => ls.some((l, i) => i > 0 && overlaps(ls[i - 1]!.box, l.box));

/** Drop every other label until none overlaps its neighbour (at least two stay: the first and the last). */
function thinLabels(all: readonly Label[]): Label[] {
  const labels = all.filter((l) => l.box.x2 - l.box.x1 > 1);
  let kept = labels;
  if (kept.length >= 3 && anyOverlap(kept)) {
    do kept = kept.filter((_, i) => i % 2 === 0);
    while (kept.length >= 3 && anyOverlap(kept));
    const last = labels[labels.length - 1]!;
    if (kept.length < 3 && !kept.includes(last)) kept = [...kept.slice(0, kept.length > 1 ? -1 : kept.length), last];
  }
  return kept;
}

function labelStyle(orient: Orient): TextStyle {
  return orient === "bottom" ? { size: LABEL, anchor: "middle", baseline: "top" } : { size: LABEL, anchor: orient === "left" ? "end" : "start", baseline: "middle" };
}

/** Lay out and draw an axis of `length` units along its side. */
export function axisSvg(axis: AxisSpec, s: Scale, orient: Orient, at: number, length: number, place: TitlePlacement = DEFAULT_TITLE[orient]): AxisLayout {
  const sign = orient === "left" ? -1 : 1;
  const across = orient === "bottom";
  const values = axisTicks(axis, s);
  const style = labelStyle(orient);
  const labels = thinLabels(
    values.map((v) => {
      const p = position(s, v);
      const text = formatTick(v);
      return { text, at: p, box: across ? textBox(p, TICK + LABEL_PAD, text, style) : textBox(sign * (TICK + LABEL_PAD), p, text, style) };
    }),
  );
  const box = emptyBox();
  for (const l of labels) unite(box, l.box);
  // the ticks' and labels' extent away from the plot, then the title beyond it
  const extent = Math.max(TICK, across ? box.y2 : sign * (sign > 0 ? box.x2 : box.x1));
  unite(box, across ? { x1: 0, y1: 0, x2: length, y2: extent } : { x1: Math.min(0, sign * extent), y1: 0, x2: Math.max(0, sign * extent), y2: length });
  const titleStyle: TextStyle = { size: TITLE, anchor: "middle", baseline: across ? "top" : "bottom", angle: place.angle };
  const [tx, ty] = across ? [length / 2, extent + place.padding] : [sign * (extent + place.padding), length / 2];
  if (axis.title) unite(box, textBox(tx, ty, axis.title, titleStyle));
  const [ox, oy] = across ? [0, at] : [at, 0];
  const ticks = values.map((v) => {
    const p = Math.round(position(s, v));
    return across ? `M${p},0v${TICK}` : `M0,${p}h${sign * TICK}`;
  });
  const line = axis.line === false ? "" : across ? `<path d="M0,0h${num(length)}" stroke="${AXIS_COLOUR}"/>` : `<path d="M0,0v${num(length)}" stroke="${AXIS_COLOUR}"/>`;
  const svg =
    `<g class="axis ${orient}" transform="translate(${num(ox + 0.5)},${num(oy + 0.5)})">` +
    `<path class="ticks" d="${ticks.join("")}" stroke="${AXIS_COLOUR}"/>` +
    labels.map((l) => (across ? textSvg(l.at, TICK + LABEL_PAD, l.text, style, "tick") : textSvg(sign * (TICK + LABEL_PAD), l.at, l.text, style, "tick"))).join("") +
    line +
    (axis.title ? textSvg(tx, ty, axis.title, titleStyle, "axis-title") : "") +
    `</g>`;
  return { svg, box: { x1: box.x1 + ox, y1: box.y1 + oy, x2: box.x2 + ox, y2: box.y2 + oy } };
}
