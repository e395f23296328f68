/** Line and point plots of a run's tables, as Vega-Lite figures. */
import type { TopLevelSpec } from "vega-lite";
import { renderVegaLite, type Figure } from "./render.js";

type Row = Record<string, number | string>;

/** P(k) measured (points) and, when given, the linear prediction (line), log–log. */
export function powerPlot(measured: Row[], linear: Row[] | undefined, kTitle: string, pTitle: string, caption: string): Promise<Figure> {
  const layers: object[] = [
    {
      data: { values: measured },
      mark: { type: "point", filled: true, size: 30 },
      encoding: {
        x: { field: "k", type: "quantitative", scale: { type: "log" }, title: kTitle },
        y: { field: "P", type: "quantitative", scale: { type: "log" }, title: pTitle },
        color: { datum: "measured", type: "nominal", title: null },
      },
    },
  ];
  if (linear) {
    layers.push({
      data: { values: linear },
      mark: { type: "line", strokeDash: [6, 3] },
      encoding: { x: { field: "k", type: "quantitative" }, y: { field: "P", type: "quantitative" }, color: { datum: "linear theory", type: "nominal" } },
    });
  }
  return renderVegaLite({ $schema: "https://vega.github.io/schema/vega-lite/v5.json", title: caption, width: 420, height: 280, layer: layers } as TopLevelSpec);
}

/** Several series against time, one colour each. */
export function seriesPlot(rows: Row[], x: string, xTitle: string, series: { field: string; label: string }[], yTitle: string, caption: string, logY = false): Promise<Figure> {
  const long = rows.flatMap((r) => series.map((s) => ({ x: r[x], y: r[s.field], series: s.label }))).filter((r) => Number.isFinite(Number(r.y)));
  return renderVegaLite({
    $schema: "https://vega.github.io/schema/vega-lite/v5.json",
    title: caption,
    width: 420,
    height: 240,
    data: { values: long },
    mark: { type: "line" },
    encoding: {
      x: { field: "x", type: "quantitative", title: xTitle },
      y: { field: "y", type: "quantitative", title: yTitle, ...(logY ? { scale: { type: "symlog" } } : {}) },
      color: { field: "series", type: "nominal", title: null },
    },
  } as TopLevelSpec);
}

/** The sidecar's clocks: squeezing, mean-field fraction and the breakdown integral against ln N. */
export function clocksPlot(rows: Row[], x: string, xTitle: string, lnN: number, caption: string): Promise<Figure> {
  const panel = (field: string, title: string, rule?: number, log = false) => ({
    width: 420,
    height: 150,
    ...(log ? { transform: [{ filter: `datum["${field}"] > 0` }] } : {}),
    layer: [
      { mark: { type: "line" }, encoding: { x: { field: x, type: "quantitative", title: xTitle }, y: { field, type: "quantitative", title, ...(log ? { scale: { type: "log" } } : {}) } } },
      ...(rule !== undefined ? [{ mark: { type: "rule", strokeDash: [4, 3], color: "firebrick" }, encoding: { y: { datum: rule } } }] : []),
    ],
  });
  return renderVegaLite({
    $schema: "https://vega.github.io/schema/vega-lite/v5.json",
    title: caption,
    data: { values: rows },
    transform: [{ calculate: "-datum.log10_meanfield_fraction * 2.302585092994046", as: "dephasing" }],
    vconcat: [
      panel("squeezing_dB", "squeezing [dB]"),
      panel("dephasing", "−ln(|⟨b⟩|²/N) (1: phase diffusion)", undefined, true),
      panel("breakdown_integral", "∫λ dt (dashed: ln N)", lnN),
    ],
  } as TopLevelSpec);
}
