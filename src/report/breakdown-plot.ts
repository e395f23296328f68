/**
 * The measured classical breakdown from the time series (`[breakdown]`):
 * the Lyapunov rate λ(t) (finite-time and last interval), ∫λ dt against its
 * two thresholds ½ ln N (depletion) and ln N (scrambling), and the measured
 * depletion N_dep/N on a log axis against the depletion clock's fraction,
 * with the times the measured clocks rang.
 */
import type { TopLevelSpec } from "vega-lite";
import { formatNumber } from "../core/format.js";
import { logAxis, PANEL, scaleColumn, SCHEMA, type Row } from "./plots.js";
import { renderVegaLite, type Figure } from "./render.js";

const INK = { rate: "#1f5fa8", last: "#8aa9d6", twin: "#2a9d8f", threshold: "#d1495b", ring: "#b5651d" };

/** What the plot needs besides the series: ln N, the depletion clock's fraction, and the clocks that rang (t in the series' unit). */
export interface BreakdownMarks {
  readonly lnN: number;
  readonly fraction?: number;
  readonly rings: readonly { readonly t: number; readonly label: string }[];
}

const x = (title: string | null, domain: [number, number]) => ({ field: "t", type: "quantitative", title, scale: { nice: false, zero: false, domain } });

function dashed(value: number, label: string, colour = INK.threshold): object[] {
  const one = { values: [{}] };
  return [
    { data: one, mark: { type: "rule", strokeDash: [5, 3], color: colour }, encoding: { y: { datum: value } } },
    { data: one, mark: { type: "text", align: "right", baseline: "top", dy: 3, fontSize: 9, color: colour }, encoding: { x: { value: PANEL.width - 2 }, y: { datum: value }, text: { value: label } } },
  ];
}

function rings(marks: BreakdownMarks, withText: boolean): object[] {
  if (marks.rings.length === 0) return [];
  const labelled = marks.rings.map((r, i) => ({ ...r, y: 3 + 11 * i }));
  return [
    { data: { values: marks.rings }, mark: { type: "rule", strokeDash: [2, 2], color: INK.ring }, encoding: { x: { field: "t", type: "quantitative" } } },
    ...(withText ? [{ data: { values: labelled }, mark: { type: "text", align: "left", baseline: "top", dx: 3, fontSize: 9, color: INK.ring }, encoding: { x: { field: "t", type: "quantitative" }, y: { field: "y", type: "quantitative", scale: null }, text: { field: "label" } } }] : []),
  ];
}

/** λ(t): the finite-time rate and the last interval's, scaled to a readable unit. */
function ratePanel(rows: Row[], tTitle: string | null, domain: [number, number], marks: BreakdownMarks): object {
  const long = rows.flatMap((r) => [
    { t: r["t"]!, series: "finite-time λ_T", v: r["rate"]! },
    { t: r["t"]!, series: "last interval", v: r["last"]! },
  ]).filter((r) => Number.isFinite(r.v as number));
  const scaled = scaleColumn(long, ["v"], () => "v", "λ", "1/s");
  return {
    width: PANEL.width,
    height: 110,
    layer: [
      {
        data: { values: scaled.rows },
        mark: { type: "line", strokeWidth: 1.5, point: rows.length < 40 },
        encoding: { x: x(tTitle, domain), y: { field: "v", type: "quantitative", title: scaled.title }, color: { field: "series", type: "nominal", title: null, scale: { domain: ["finite-time λ_T", "last interval"], range: [INK.rate, INK.last] }, legend: { orient: "right" } } },
      },
      ...rings(marks, true),
    ],
  };
}

/** ∫λ dt (and the twin's) against ½ ln N and ln N. */
function integralPanel(rows: Row[], tTitle: string | null, domain: [number, number], marks: BreakdownMarks): object {
  const twin = rows.some((r) => Number.isFinite(r["twin"] as number));
  const long = rows.flatMap((r) => [{ t: r["t"]!, series: "tangent", v: r["integral"]! }, ...(twin ? [{ t: r["t"]!, series: "twin run", v: r["twin"]! }] : [])]);
  const top = Math.max(marks.lnN * 1.08, ...long.map((r) => r.v as number).filter(Number.isFinite));
  return {
    width: PANEL.width,
    height: 110,
    layer: [
      {
        data: { values: long },
        mark: { type: "line", strokeWidth: 1.5 },
        encoding: { strokeDash: { field: "series", type: "nominal", legend: null, scale: { domain: ["tangent", "twin run"], range: [[1, 0], [4, 3]] } }, x: x(tTitle, domain), y: { field: "v", type: "quantitative", title: "∫λ dt", scale: { domain: [Math.min(0, ...long.map((r) => r.v as number).filter(Number.isFinite)), top], nice: false } }, color: { field: "series", type: "nominal", title: null, scale: { domain: ["tangent", "twin run"], range: [INK.rate, INK.twin] }, legend: { orient: "right" } } },
      },
      ...dashed(marks.lnN / 2, `depletion at ½ ln N = ${formatNumber(marks.lnN / 2)}`),
      ...dashed(marks.lnN, `scrambling at ln N = ${formatNumber(marks.lnN)}`),
      ...rings(marks, false),
    ],
  };
}

/** N_dep/N on a log axis against the depletion clock's fraction. */
function depletionPanel(rows: Row[], tTitle: string | null, domain: [number, number], marks: BreakdownMarks): object {
  const positive = rows.filter((r) => (r["depleted"] as number) > 0);
  const axis = logAxis([...positive.map((r) => r["depleted"] as number), ...(marks.fraction ? [marks.fraction] : [])]);
  return {
    width: PANEL.width,
    height: 110,
    layer: [
      { data: { values: positive }, mark: { type: "line", strokeWidth: 1.5, color: INK.rate, point: positive.length < 40 }, encoding: { x: x(tTitle, domain), y: { field: "depleted", type: "quantitative", title: "N_dep / N", scale: { type: "log", domain: axis.domain, nice: false }, axis: { values: axis.values, format: ".0e" } } } },
      ...(marks.fraction ? dashed(marks.fraction, `depletion clock at ${formatNumber(marks.fraction)} N`) : []),
      ...rings(marks, false),
    ],
  };
}

/** The figure: the panels the series has columns for (Lyapunov, depletion). */
export function breakdownPlot(series: Row[], tCol: string, tTitle: string, marks: BreakdownMarks): Promise<Figure> {
  const N = Math.exp(marks.lnN);
  const rows: Row[] = series.map((r) => ({
    t: Number(r[tCol]),
    rate: Number(r["lyapunov_rate_per_s"]),
    last: Number(r["lyapunov_interval_rate_per_s"]),
    integral: Number(r["lyapunov_integral"]),
    twin: Number(r["lyapunov_twin_integral"]),
    depleted: Number(r["depleted_N"]) / N,
  }));
  const domain: [number, number] = [rows[0]!.t as number, rows.at(-1)!.t as number];
  const lyapunov = "lyapunov_integral" in series[0]!;
  const depletion = "depleted_N" in series[0]! && rows.some((r) => (r["depleted"] as number) > 0);
  const panels = [
    ...(lyapunov ? [(t: string | null) => ratePanel(rows, t, domain, marks), (t: string | null) => integralPanel(rows, t, domain, marks)] : []),
    ...(depletion ? [(t: string | null) => depletionPanel(rows, t, domain, marks)] : []),
  ];
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "Measured classical breakdown", subtitle: "tangent-linear companion: dashed, the clocks' thresholds; dotted, when a measured clock rang" },
    spacing: 10,
    resolve: { scale: { color: "independent", strokeDash: "independent" }, legend: { color: "independent" } },
    vconcat: panels.map((p, i) => p(i === panels.length - 1 ? tTitle : null)),
  } as unknown as TopLevelSpec);
}
