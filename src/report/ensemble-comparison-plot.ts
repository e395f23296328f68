/**
 * The ensemble beside its predictions (psibox ensemble's comparison.csv) as
 * one figure over time: the depletion N − N₀ of the ensemble against the
 * tangent-linear Tr V†V, each with a band of ± one error, and the mean
 * field |⟨b⟩|/√N of the ensemble (band) against the Kerr mode with the
 * frozen and the adiabatic coefficient; dashed: the levels whose crossing
 * times are each method's clock.
 */
import type { TopLevelSpec } from "vega-lite";
import { formatNumber } from "../core/format.js";
import { PANEL, SCHEMA, type Row } from "./plots.js";
import { renderVegaLite, type Figure } from "./render.js";

const INK = { ensemble: "#1f5fa8", tangent: "#e07a1f", kerr: "#2a9d8f", adiabatic: "#8e44ad", level: "#d1495b" };
const WIDTH = Math.round(PANEL.width * 1.4);
const LABEL = { ensemble: "ensemble", tangent: "tangent-linear", kerr: "Kerr mode (χ)", adiabatic: "Kerr mode (χ_ad)" };

/** Lines of `long` rows (t, series, v, e) with bands of ± e where e is finite, coloured by series. */
function lines(long: Row[], colours: Record<string, string>, tTitle: string | null, domain: [number, number], yTitle: string, level: number): object[] {
  const colour = { field: "series", type: "nominal", title: null, scale: { domain: Object.keys(colours), range: Object.values(colours) }, legend: { orient: "top", direction: "horizontal", title: null } };
  const x = { field: "t", type: "quantitative", title: tTitle, scale: { nice: false, zero: false, domain } };
  const y = { type: "quantitative", title: yTitle };
  // the adiabatic Kerr mode dashed: it often lies on the frozen one
  const dashes = { field: "series", type: "nominal", legend: { orient: "top", direction: "horizontal", title: null }, scale: { domain: Object.keys(colours), range: Object.keys(colours).map((k) => (k === LABEL.adiabatic ? [5, 3] : [1, 0])) } };
  const bands = long.filter((r) => Number.isFinite(r["e"] as number));
  // a level far above the curves would flatten them: drawn only when within twice their top
  const top = Math.max(...long.map((r) => (r["v"] as number) + (Number.isFinite(r["e"] as number) ? (r["e"] as number) : 0)).filter(Number.isFinite));
  const rule = level <= 2 * top ? [{ data: { values: [{}] }, mark: { type: "rule", strokeDash: [5, 3], color: INK.level }, encoding: { y: { datum: level } } }] : [];
  return [
    { data: { values: bands }, transform: [{ calculate: "datum.v - datum.e", as: "lo" }, { calculate: "datum.v + datum.e", as: "hi" }], mark: { type: "area", opacity: 0.22 }, encoding: { x, y: { field: "lo", ...y }, y2: { field: "hi" }, color: colour } },
    { data: { values: long }, mark: { type: "line", strokeWidth: 1.5, point: long.length < 120 }, encoding: { x, y: { field: "v", ...y }, color: colour, strokeDash: dashes } },
    ...rule,
  ];
}

/** The figure from comparison.csv rows (time column "time", in `unit`); `depletionLevel` in particles, `meanFieldLevel` of |⟨b⟩|/√N. */
export function ensembleComparisonPlot(rows: readonly Record<string, string>[], unit: string, depletionLevel: number, meanFieldLevel: number): Promise<Figure> {
  const num = (r: Record<string, string>, c: string): number => (r[c] === "" || r[c] === undefined ? Number.NaN : Number(r[c]));
  const t = (r: Record<string, string>) => num(r, "time");
  const domain: [number, number] = [t(rows[0]!), t(rows.at(-1)!)];
  const depletion = rows.flatMap((r) => [
    { t: t(r), series: LABEL.ensemble, v: num(r, "depletion_ensemble"), e: num(r, "depletion_ensemble_err") },
    { t: t(r), series: LABEL.tangent, v: num(r, "depletion_tangent"), e: num(r, "depletion_tangent_err") },
  ]);
  const meanField = rows.flatMap((r) => [
    { t: t(r), series: LABEL.ensemble, v: num(r, "meanfield_ensemble"), e: num(r, "meanfield_ensemble_err") },
    { t: t(r), series: LABEL.kerr, v: num(r, "meanfield_kerr"), e: Number.NaN },
    { t: t(r), series: LABEL.adiabatic, v: num(r, "meanfield_kerr_adiabatic"), e: Number.NaN },
  ]);
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "The ensemble against the linear and the single-mode pictures", subtitle: ["bands: ± one error; red dashes (when in range): the clocks' levels,", `depletion ${formatNumber(depletionLevel, 3)} particles and |⟨b⟩|/√N = e^(−1/2)`] },
    spacing: 10,
    // each panel's own colours and dashes (the second has three series, the first two)
    resolve: { scale: { color: "independent", strokeDash: "independent" }, legend: { color: "independent", strokeDash: "independent" } },
    vconcat: [
      { width: WIDTH, height: 130, layer: lines(depletion, { [LABEL.ensemble]: INK.ensemble, [LABEL.tangent]: INK.tangent }, null, domain, "depletion [particles]", depletionLevel) },
      { width: WIDTH, height: 130, layer: lines(meanField, { [LABEL.ensemble]: INK.ensemble, [LABEL.kerr]: INK.kerr, [LABEL.adiabatic]: INK.adiabatic }, `t [${unit}]`, domain, "mean field |⟨b⟩|/√N", meanFieldLevel) },
    ],
  } as unknown as TopLevelSpec);
}
