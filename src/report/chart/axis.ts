/**
 * One axis of a chart: ticks (whole units, drawn half a unit in so that
 * they stay crisp), labels through psibox's tick formatter, the axis line
 * and the title. Labels that would overlap are thinned, every other one
 * at a time, keeping at least the first and the last; a log axis labels
 * its powers of ten (with 2 and 5 times them where only two decades
 * show), its other ticks shorter and unlabelled. The layout box
 * (ticks, labels, title) tells the chart how much room the axis takes.
 */
import { formatTick } from "../../core/format.js";
import { axisTicks, position, type AxisSpec, type Scale } from "./scales.js";
import { emptyBox, num, textBox, textSvg, unite, type Box, type TextStyle } from "./text.js";

export type Orient = "bottom" | "left" | "right";

export const AXIS_COLOUR = "#333";
const TICK = 5;
const MINOR_TICK = 3;
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

/** A log axis's tick value by rank: 0 for a power of ten, 1 for twice or five times one, 2 for the other minor ticks. */
function logRank(v: number): number {
  const m = Math.round(v / 10 ** Math.floor(Math.log10(v) + 1e-9));
  return m === 1 ? 0 : m === 2 || m === 5 ? 1 : 2;
}

/**
 * The labels of a log axis: the powers of ten where three or more fall on it (thinned as any labels), with
 * twice and five times each where only two do and those fit; otherwise (less than a decade) as a linear axis's.
 */
function logLabels(all: readonly Label[], values: readonly number[]): Label[] {
  const ranked = (r: number) => all.filter((_, i) => logRank(values[i]!) <= r);
  const decades = ranked(0);
  if (decades.length >= 3) return thinLabels(decades);
  if (decades.length === 2) {
    const more = ranked(1);
    return anyOverlap(more) ? decades : more;
  }
  return thinLabels(all);
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
  const all = values.map((v) => {
    const p = position(s, v);
    const text = formatTick(v);
    return { text, at: p, box: across ? textBox(p, TICK + LABEL_PAD, text, style) : textBox(sign * (TICK + LABEL_PAD), p, text, style) };
  });
  const labels = s.log ? logLabels(all, values) : thinLabels(all);
  const box = emptyBox();
  for (const l of labels) unite(box, l.box);
  // the ticks' and labels' extent away from the plot, then the title beyond it
  const extent = Math.max(TICK, across ? box.y2 : sign * (sign > 0 ? box.x2 : box.x1));
  unite(box, across ? { x1: 0, y1: 0, x2: length, y2: extent } : { x1: Math.min(0, sign * extent), y1: 0, x2: Math.max(0, sign * extent), y2: length });
  const titleStyle: TextStyle = { size: TITLE, anchor: "middle", baseline: across ? "top" : "bottom", angle: place.angle };
  const [tx, ty] = across ? [length / 2, extent + place.padding] : [sign * (extent + place.padding), length / 2];
  if (axis.title) unite(box, textBox(tx, ty, axis.title, titleStyle));
  const [ox, oy] = across ? [0, at] : [at, 0];
  // a log axis's unlabelled ticks are minor ones, shorter
  const labelled = new Set(labels.map((l) => l.at));
  const ticks = values.map((v) => {
    const at = position(s, v);
    const p = Math.round(at);
    const size = s.log && !labelled.has(at) ? MINOR_TICK : TICK;
    return across ? `M${p},0v${size}` : `M0,${p}h${sign * size}`;
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
