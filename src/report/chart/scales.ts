/**
 * Position scales of the figures: a linear or a log map from a domain of
 * values onto a range of SVG units. The domain comes from the axis (given)
 * or from the data, linear ones reaching to zero unless told not to, both
 * rounded outward to round ticks (linear) or whole decades (log) unless
 * told not to.
 */
import { linearTicks, logTicksOf, niceLinear, niceLog, thinTicks } from "./ticks.js";

/** What an axis asks of its scale; the data fill in what it leaves open. */
export interface AxisSpec {
  readonly title: string;
  /** A log scale (positive values only). */
  readonly log?: boolean;
  /** The domain as given; default: the data's extent. */
  readonly domain?: readonly [number, number];
  /** Round the domain outward (default true, as for data-driven domains; false keeps it exact). */
  readonly nice?: boolean;
  /** A linear scale's domain reaches to zero (default true unless the domain is given). */
  readonly zero?: boolean;
  /** The tick values as given (at most five kept, every other dropped until they fit); default: round ticks. */
  readonly values?: readonly number[];
  /** Draw the axis line (default true). */
  readonly line?: boolean;
}

export interface Scale {
  readonly log: boolean;
  readonly domain: readonly [number, number];
  readonly range: readonly [number, number];
}

/** How many ticks an axis aims at. */
export const TICK_COUNT = 5;

/** Position of a value on the scale. */
export function position(s: Scale, v: number): number {
  const [a, b] = s.log ? [Math.log10(s.domain[0]), Math.log10(s.domain[1])] : s.domain;
  const t = ((s.log ? Math.log10(v) : v) - a) / (b - a);
  return s.range[0] + (Number.isFinite(t) ? t : 0.5) * (s.range[1] - s.range[0]);
}

/** The extent of the finite values (positive ones for a log scale). */
export function extent(values: Iterable<number>, log: boolean): [number, number] | undefined {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v) || (log && v <= 0)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo <= hi ? [lo, hi] : undefined;
}

/** The scale of an axis over `range`, from its own domain or the data's extent. */
export function scaleOf(axis: AxisSpec, data: readonly [number, number] | undefined, range: readonly [number, number]): Scale {
  const log = axis.log === true;
  const given = axis.domain ?? data ?? (log ? [1, 10] : [0, 1]);
  let domain: [number, number] = [given[0], given[1]];
  if (!log && (axis.zero ?? !axis.domain)) domain = [Math.min(0, domain[0]), Math.max(0, domain[1])];
  if (axis.nice ?? !axis.domain) domain = log ? niceLog(domain) : niceLinear(domain);
  return { log, domain, range };
}

/** The tick values of an axis on its scale. */
export function axisTicks(axis: AxisSpec, s: Scale): number[] {
  if (axis.values) return thinTicks(axis.values, (v) => position(s, v), s.range, TICK_COUNT);
  return s.log ? logTicksOf(s.domain[0], s.domain[1], TICK_COUNT) : linearTicks(s.domain[0], s.domain[1], TICK_COUNT);
}
