/**
 * Axis ticks and rounded ("nice") domains of the figures' scales, linear
 * and logarithmic. Steps are 1, 2 or 5 times a power of ten, chosen where
 * the raw step (span / count) crosses the geometric means of neighbouring
 * steps (√2, √10, √50); tick values are integers times the step (or over
 * its reciprocal for steps below one), so 0.1 + 0.2 never shows up as
 * 0.30000000000000004. The results agree with the general-purpose
 * vega-scale package, which the figures used before (checked in the unit
 * tests): the same axes, the same labels.
 */

/** A tick step as integers: ticks are i·step (step ≥ 1, `inverse` false) or i/step (`inverse` true), for i from `first` to `last`. */
interface Steps {
  readonly first: number;
  readonly last: number;
  readonly step: number;
  readonly inverse: boolean;
}

function steps(lo: number, hi: number, count: number): Steps {
  const raw = (hi - lo) / Math.max(0, count);
  const power = Math.floor(Math.log10(raw));
  const ratio = raw / 10 ** power;
  const factor = ratio >= Math.sqrt(50) ? 10 : ratio >= Math.sqrt(10) ? 5 : ratio >= Math.sqrt(2) ? 2 : 1;
  if (power < 0) {
    const step = 10 ** -power / factor;
    let first = Math.round(lo * step);
    let last = Math.round(hi * step);
    if (first / step < lo) first++;
    if (last / step > hi) last--;
    if (last < first && count >= 0.5 && count < 2) return steps(lo, hi, 2 * count);
    return { first, last, step, inverse: true };
  }
  const step = 10 ** power * factor;
  let first = Math.round(lo / step);
  let last = Math.round(hi / step);
  if (first * step < lo) first++;
  if (last * step > hi) last--;
  if (last < first && count >= 0.5 && count < 2) return steps(lo, hi, 2 * count);
  return { first, last, step, inverse: false };
}

/** About `count` round ticks in [a, b] (either order; listed in that order). */
export function linearTicks(a: number, b: number, count: number): number[] {
  if (!(count > 0) || !Number.isFinite(a) || !Number.isFinite(b)) return [];
  if (a === b) return [a];
  const [lo, hi] = a < b ? [a, b] : [b, a];
  const s = steps(lo, hi, count);
  if (!(s.last >= s.first)) return [];
  const out = Array.from({ length: s.last - s.first + 1 }, (_, i) => (s.inverse ? (s.first + i) / s.step : (s.first + i) * s.step));
  return a < b ? out : out.reverse();
}

/** The signed step of `linearTicks` (negative: the reciprocal of the step, as `steps` keeps it). */
function signedStep(lo: number, hi: number, count: number): number {
  const s = steps(lo, hi, count);
  return s.inverse ? -s.step : s.step;
}

/** A linear domain widened to round multiples of its tick step for about `count` ticks (repeated until the step settles). */
export function niceLinear(domain: readonly [number, number], count = 10): [number, number] {
  let [lo, hi] = domain[0] <= domain[1] ? domain : [domain[1], domain[0]];
  if (!(hi > lo) || !Number.isFinite(hi - lo)) return [domain[0], domain[1]];
  let previous: number | undefined;
  for (let round = 0; round < 10; round++) {
    const step = signedStep(lo, hi, count);
    if (step === previous) break;
    if (step > 0) [lo, hi] = [Math.floor(lo / step) * step, Math.ceil(hi / step) * step];
    else if (step < 0) [lo, hi] = [Math.ceil(lo * step) / step, Math.floor(hi * step) / step];
    else break;
    previous = step;
  }
  return domain[0] <= domain[1] ? [lo, hi] : [hi, lo];
}

/** 10^e exactly for whole e (1e-7 rather than 10 ** -7 = 9.999999999999999e-8). */
const decade = (e: number): number => (Number.isFinite(e) ? Number(`1e${e}`) : e < 0 ? 0 : e);

/** A positive log domain widened to whole decades. */
export function niceLog(domain: readonly [number, number]): [number, number] {
  const [lo, hi] = domain[0] <= domain[1] ? domain : [domain[1], domain[0]];
  const out: [number, number] = [decade(Math.floor(Math.log10(lo))), decade(Math.ceil(Math.log10(hi)))];
  return domain[0] <= domain[1] ? out : [out[1], out[0]];
}

/**
 * Ticks of a log axis over a positive domain: across fewer decades than `count`, every 1…9 times each
 * decade inside it (the minor ticks; plain round ticks where those are too few); else whole decades,
 * every so many of them.
 */
export function logTicksOf(a: number, b: number, count: number): number[] {
  const [lo, hi] = a < b ? [a, b] : [b, a];
  const [i, j] = [Math.log10(lo), Math.log10(hi)];
  let out: number[] = [];
  if (j - i < count) {
    for (let e = Math.floor(i); e <= Math.ceil(j); e++)
      for (let k = 1; k < 10; k++) {
        const t = e < 0 ? k / decade(-e) : k * decade(e);
        if (t < lo) continue;
        if (t > hi) break;
        out.push(t);
      }
    if (2 * out.length < count) out = linearTicks(lo, hi, count);
  } else {
    out = linearTicks(i, j, Math.min(j - i, count)).map(decade);
  }
  return a < b ? out : out.reverse();
}

/**
 * Given tick values kept to those inside the axis (positions within the pixel range, whole pixels
 * outward), in axis order; more than `count` of them are halved (every other kept) until at most
 * `count` remain, and where fewer than three would remain, the first and last are kept.
 */
export function thinTicks(values: readonly number[], position: (v: number) => number, range: readonly [number, number], count: number): number[] {
  const [lo, hi] = [Math.floor(Math.min(...range)), Math.ceil(Math.max(...range))];
  const down = range[0] > range[1];
  let ticks = values
    .map((v) => [v, position(v)] as const)
    .filter(([, p]) => lo <= p && p <= hi)
    .sort((a, b) => (down ? b[1] - a[1] : a[1] - b[1]))
    .map(([v]) => v);
  if (count > 0 && ticks.length > 1) {
    const ends = [ticks[0]!, ticks[ticks.length - 1]!];
    while (ticks.length > count && ticks.length >= 3) ticks = ticks.filter((_, i) => i % 2 === 0);
    if (ticks.length < 3) ticks = ends;
  }
  return ticks;
}
