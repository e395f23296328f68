/**
 * The truncated-Wigner ensemble's series (psibox ensemble's series.csv) as
 * one figure: the condensate fraction N₀/N and the mean field's share
 * |⟨b⟩|²/N with one-error bands, and the mean field's departure from the
 * classical field with its level and the time the clock rang.
 */
import type { TopLevelSpec } from "vega-lite";
import { formatNumber } from "../core/format.js";
import { PANEL, SCHEMA, type Row } from "./plots.js";
import { renderVegaLite, type Figure } from "./render.js";

const INK = { fraction: "#1f5fa8", coherence: "#2a9d8f", departure: "#8e44ad", level: "#d1495b" };

/** What the figure marks besides the series: the departure level and, if it rang, its time (series' unit). */
export interface EnsembleMarks {
  readonly level: number;
  readonly departureTime: number | null;
}

const x = (title: string | null, domain: [number, number]) => ({ field: "t", type: "quantitative", title, scale: { nice: false, zero: false, domain } });

/** A line with a band of ± its error, for each named series of `long` rows (t, series, v, e). */
function banded(long: Row[], tTitle: string | null, domain: [number, number], colours: Record<string, string>, yTitle: string, yDomain?: [number, number]): object[] {
  const colour = { field: "series", type: "nominal", title: null, scale: { domain: Object.keys(colours), range: Object.values(colours) }, legend: { orient: "top", direction: "horizontal", title: null } };
  const y = { type: "quantitative", title: yTitle, ...(yDomain ? { scale: { domain: yDomain, nice: false } } : {}) };
  return [
    { data: { values: long }, transform: [{ calculate: "datum.v - datum.e", as: "lo" }, { calculate: "datum.v + datum.e", as: "hi" }], mark: { type: "area", opacity: 0.25 }, encoding: { x: x(tTitle, domain), y: { field: "lo", ...y }, y2: { field: "hi" }, color: colour } },
    { data: { values: long }, mark: { type: "line", strokeWidth: 1.5, point: long.length < 80 }, encoding: { x: x(tTitle, domain), y: { field: "v", ...y }, color: colour } },
  ];
}

/** The figure from series.csv rows (the time column is "time", in `unit`). */
export function ensemblePlot(series: readonly Record<string, string>[], unit: string, marks: EnsembleMarks): Promise<Figure> {
  const num = (r: Record<string, string>, c: string): number => (r[c] === "" || r[c] === undefined ? Number.NaN : Number(r[c]));
  const t = (r: Record<string, string>) => num(r, "time");
  const domain: [number, number] = [t(series[0]!), t(series.at(-1)!)];
  const tTitle = `t [${unit}]`;
  const shares = series.flatMap((r) => [
    { t: t(r), series: "condensate N₀/N", v: num(r, "condensate_fraction"), e: num(r, "condensate_fraction_err") },
    { t: t(r), series: "mean field |⟨b⟩|²/N", v: num(r, "coherence"), e: num(r, "coherence_err") },
  ]);
  const departure = series.map((r) => ({ t: t(r), series: "‖⟨ψ⟩ − ψ_cl‖/‖ψ_cl‖", v: num(r, "departure"), e: num(r, "departure_err") }));
  const one = { values: [{}] };
  const ring = marks.departureTime === null ? [] : [{ data: one, mark: { type: "rule", strokeDash: [2, 2], color: INK.level }, encoding: { x: { datum: marks.departureTime } } }];
  const top = Math.max(marks.level * 1.2, ...departure.map((d) => d.v + (Number.isFinite(d.e) ? d.e : 0)).filter(Number.isFinite));
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "Truncated-Wigner ensemble", subtitle: ["bands: ± one error", `dashed: the departure level ${formatNumber(marks.level)}; dotted: when it was reached`] },
    spacing: 10,
    resolve: { scale: { color: "independent" }, legend: { color: "independent" } },
    vconcat: [
      { width: PANEL.width, height: 120, layer: banded(shares, null, domain, { "condensate N₀/N": INK.fraction, "mean field |⟨b⟩|²/N": INK.coherence }, "share of N", [0, 1.05]) },
      {
        width: PANEL.width,
        height: 120,
        layer: [
          ...banded(departure, tTitle, domain, { "‖⟨ψ⟩ − ψ_cl‖/‖ψ_cl‖": INK.departure }, "departure", [0, top]),
          { data: one, mark: { type: "rule", strokeDash: [5, 3], color: INK.level }, encoding: { y: { datum: marks.level } } },
          ...ring,
        ],
      },
    ],
  } as unknown as TopLevelSpec);
}
