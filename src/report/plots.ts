/**
 * Line and point plots: the power spectrum and a 1D density profile (drawn
 * by psibox's chart writer), and the helpers the run-level plots share
 * (log-axis ticks, scaled linear axes).
 */
import { axisExponent, scaledUnit } from "../core/format.js";
import { renderChart, type Figure } from "./render.js";
import type { Series } from "./chart/chart.js";

export type Row = Record<string, number | string>;
export const SCHEMA = "https://vega.github.io/schema/vega-lite/v5.json";
/** Plot area of a single panel, SVG units. */
export const PANEL = { width: 300, height: 190 } as const;
/** Colours of a measurement and of a prediction beside it. */
const MEASURED = "#1f5fa8";
const PREDICTED = "#d1495b";

/** Tick values for a log axis over [lo, hi]: whole decades (every few when there are many), or 1-2-5 steps inside one or two decades. */
export function logTicks(lo: number, hi: number): number[] {
  const a = Math.floor(Math.log10(lo));
  const b = Math.ceil(Math.log10(hi));
  if (b - a <= 2) {
    const out: number[] = [];
    for (let e = a; e <= b; e++) for (const m of [1, 2, 5]) if (m * 10 ** e >= lo * (1 - 1e-9) && m * 10 ** e <= hi * (1 + 1e-9)) out.push(Number(`${m}e${e}`));
    return out;
  }
  const step = [1, 2, 5, 10, 20, 25, 50, 100].find((k) => (b - a) / k <= 6) ?? Math.ceil((b - a) / 6);
  const out: number[] = [];
  for (let e = Math.ceil(a / step) * step; e <= b; e += step) out.push(Number(`1e${e}`));
  return out;
}

/** A log axis over the positive values: its domain (whole decades) and its tick values. */
export function logAxis(values: number[]): { domain: [number, number]; values: number[] } {
  const pos = values.filter((v) => v > 0 && Number.isFinite(v));
  const lo = 10 ** Math.floor(Math.log10(Math.min(...pos)));
  const hi = 10 ** Math.ceil(Math.log10(Math.max(...pos)));
  const domain: [number, number] = hi > lo ? [lo, hi] : [lo / 10, hi * 10];
  return { domain, values: logTicks(domain[0], domain[1]) };
}

/** Scale a column by a power of ten for a readable linear axis; returns the factor's exponent and the axis title with it. */
export function scaleColumn(rows: Row[], fields: string[], as: (f: string) => string, quantity: string, unit: string): { title: string; rows: Row[] } {
  const e = axisExponent(rows.flatMap((r) => fields.map((f) => Number(r[f]))));
  const k = 10 ** -e;
  const scaled = rows.map((r) => ({ ...r, ...Object.fromEntries(fields.map((f) => [as(f), Number(r[f]) * k])) }));
  const u = scaledUnit(e, unit);
  return { title: u ? `${quantity} [${u}]` : quantity, rows: scaled };
}

/**
 * The linear prediction cut at the first zero of the wave suppression
 * T_FDM = cos(x³)/(1 + x⁸): past its turnover P(k) falls monotonically
 * until cos(x³) first vanishes; the oscillating tail beyond (below 10⁻⁴ of
 * the turnover's power) would look like spikes on a log axis.
 */
export function cutAtFirstZero(rows: { k: number; P: number }[]): { k: number; P: number }[] {
  let peak = 0;
  for (let i = 1; i < rows.length; i++) if (rows[i]!.P > rows[peak]!.P) peak = i;
  for (let i = peak + 1; i < rows.length - 1; i++) if (rows[i + 1]!.P > rows[i]!.P) return rows.slice(0, i + 1);
  return rows;
}

/** P(k) measured (points) and, when given, the linear prediction (dashed line), log–log. */
export function powerPlot(measured: { k: number; P: number }[], linear: { k: number; P: number }[] | undefined, kTitle: string, pTitle: string, title: string, subtitle = ""): Promise<Figure> {
  const lin = linear ? cutAtFirstZero(linear) : [];
  const xa = logAxis([...measured.map((r) => r.k), ...lin.map((r) => r.k)]);
  const ya = logAxis([...measured.map((r) => r.P), ...lin.map((r) => r.P)]);
  const series: Series[] = [{ name: "measured", colour: MEASURED, x: measured.map((r) => r.k), y: measured.map((r) => r.P), mark: "points", size: 22 }];
  if (lin.length) series.push({ name: "linear theory", colour: PREDICTED, x: lin.map((r) => r.k), y: lin.map((r) => r.P), mark: "line", width: 1.5, dash: [6, 3] });
  return renderChart({
    title,
    ...(subtitle ? { subtitle } : {}),
    panels: [{ ...PANEL, x: { title: kTitle, log: true, ...xa, nice: false }, y: { title: pTitle, log: true, ...ya, nice: false }, series }],
    legend: { orient: "top", entries: series.map((s) => ({ label: s.name!, colour: s.colour })), symbol: "circle", outline: lin.length > 0, opacity: 0.7 },
  });
}

/** A 1D density profile on a log axis (its decades cover `domainValues`, default the profile's own; room made for the subtitles `subtitleRoom` besides its own). */
export function densityLinePlot(rows: { x: number; rho: number }[], xTitle: string, yTitle: string, title: string, subtitle: string, domainValues?: number[], subtitleRoom?: readonly string[]): Promise<Figure> {
  const ya = logAxis(domainValues ?? rows.map((r) => r.rho));
  const shown = rows.filter((r) => r.rho > 0);
  return renderChart({
    title,
    subtitle,
    ...(subtitleRoom ? { subtitleRoom } : {}),
    panels: [{ ...PANEL, x: { title: xTitle, nice: false, zero: false }, y: { title: yTitle, log: true, ...ya, nice: false }, series: [{ colour: MEASURED, x: shown.map((r) => r.x), y: shown.map((r) => r.rho), mark: "line", width: 1.5 }] }],
  });
}
