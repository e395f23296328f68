/**
 * A plane picture's area: an image over two linear axes (the plane's
 * extent, not rounded), framed, with a colour bar to its right whose own
 * axis carries the colour scale's title. The image is given by address:
 * the figure workers put the picture's cells under a placeholder's place
 * (figure-draw.ts), whose top-left corner is the chart's origin.
 */
import { axisSvg, AXIS_COLOUR } from "./axis.js";
import { scaleOf } from "./scales.js";
import { moved, num, unite, type Box } from "./text.js";
import type { Part } from "./chart.js";

export interface ImageArea {
  readonly width: number;
  readonly height: number;
  readonly x: { readonly title: string; readonly domain: readonly [number, number] };
  readonly y: { readonly title: string; readonly domain: readonly [number, number] };
  /** The image's address (a data address, or the placeholder the figure workers replace). */
  readonly href: string;
  readonly bar: { readonly title: string; readonly domain: readonly [number, number]; readonly href: string };
}

/** The colour bar's width and its distance from the image. */
const BAR = 12;
const BAR_GAP = 14;

function imageSvg(href: string, width: number, height: number): string {
  return `<image xlink:href="${href}" transform="translate(0,0)" width="${num(width)}" height="${num(height)}" preserveAspectRatio="none" style="image-rendering: optimizeSpeed; image-rendering: pixelated;"/>`;
}

/** The colour bar at the image's right, with its axis and title; box relative to the image's origin. */
function barSvg(a: ImageArea): { svg: string; box: Box } {
  const s = scaleOf({ title: a.bar.title, domain: a.bar.domain, nice: false, zero: false }, undefined, [a.height, 0]);
  const axis = axisSvg({ title: a.bar.title }, s, "right", BAR, a.height, { padding: 8, angle: 90 });
  const box = unite({ x1: 0, y1: 0, x2: BAR, y2: a.height }, axis.box);
  const x = a.width + BAR_GAP;
  return { svg: `<g class="colour-bar" transform="translate(${x},0)">${axis.svg}${imageSvg(a.bar.href, BAR, a.height)}</g>`, box: moved(box, x, 0) };
}

/** Lay out and draw the image area. */
export function imageAreaSvg(a: ImageArea): Part {
  const fixed = (axis: ImageArea["x"], line: boolean) => ({ title: axis.title, domain: axis.domain, nice: false, zero: false, line });
  const xs = scaleOf(fixed(a.x, true), undefined, [0, a.width]);
  const ys = scaleOf(fixed(a.y, false), undefined, [a.height, 0]);
  const bottom = axisSvg(fixed(a.x, true), xs, "bottom", a.height, a.width);
  // no line on the left: it would lie half a unit inside the image, under the cells the workers put in
  const left = axisSvg(fixed(a.y, false), ys, "left", 0, a.height);
  const bar = barSvg(a);
  // the frame's stroke, a whole stroke width around the image (as the layout has always counted it)
  const area: Box = { x1: -1, y1: -1, x2: a.width + 1, y2: a.height + 1 };
  const frame = `<path class="frame" d="M0,0h${num(a.width)}v${num(a.height)}h${num(-a.width)}Z" stroke="${AXIS_COLOUR}"/>`;
  const box = unite(unite(unite({ ...area }, bottom.box), left.box), bar.box);
  const svg = `${bottom.svg}${left.svg}${imageSvg(a.href, a.width, a.height)}${frame}${bar.svg}`;
  return { svg, box, besideRight: box, besideTop: box, width: a.width, height: a.height };
}
