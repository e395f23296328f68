/**
 * The run-level plots from the time series: energies with their
 * conservation checks (relative energy drift or Layzer–Irvine residual,
 * mass drift), and the quantum sidecar's clocks with their targets and the
 * times they rang.
 */
import type { TopLevelSpec } from "vega-lite";
import { formatNumber } from "../core/format.js";
import { conservationDrifts, energyRows } from "./energy-series.js";
import { logAxis, PANEL, scaleColumn, SCHEMA, type Row } from "./plots.js";
import { renderVegaLite, type Figure } from "./render.js";

const COLOURS = { K: "#d1495b", W: "#1f5fa8", U: "#2a9d5c", E: "#222222", mark: "#b5651d" };

function xEnc(title: string, showTitle = true, domain?: [number, number]): object {
  return { field: "t", type: "quantitative", title: showTitle ? title : null, scale: { nice: false, zero: false, ...(domain ? { domain } : {}) } };
}

/** Energies (top), the energy check and the mass drift (below), against time. */
export function energiesPlot(series: Row[], tCol: string, tTitle: string): Promise<Figure> {
  const rows = energyRows(series, tCol);
  const expanding = rows[0]?.a !== undefined;
  const drifts = conservationDrifts(rows);
  const contact = rows.some((r) => (r.contact ?? 0) !== 0);
  const total = contact ? "K + W + U" : "K + W";
  const long = rows.flatMap((r) => [
    { t: r.t, series: "kinetic K", v: r.kinetic },
    { t: r.t, series: "potential W", v: r.potential },
    ...(contact ? [{ t: r.t, series: "contact U", v: r.contact ?? 0 }] : []),
    { t: r.t, series: total, v: r.kinetic + r.potential + (r.contact ?? 0) },
  ]);
  const names = ["kinetic K", "potential W", ...(contact ? ["contact U"] : []), total];
  const colours = [COLOURS.K, COLOURS.W, ...(contact ? [COLOURS.U] : []), COLOURS.E];
  const energy = scaleColumn(long, ["v"], () => "v", "energy", "Msun (km/s)²");
  const eDrift = scaleColumn(drifts as unknown as Row[], ["energy"], () => "energy", expanding ? "Layzer–Irvine R/|W|" : "(E − E₀)/|E₀|", "");
  const mDrift = scaleColumn(drifts as unknown as Row[], ["mass"], () => "mass", "(M − M₀)/M₀", "");
  const small = { width: PANEL.width, height: 95 };
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "Energies and conservation", subtitle: expanding ? (contact ? "expanding box: R = Δ(K + W + U) + ∫(2K + W + 3U) d ln a stays ≈ 0 (Layzer–Irvine)" : "expanding box: R = Δ(K + W) + ∫(2K + W) d ln a stays ≈ 0 (Layzer–Irvine)") : `static box: ${total} and M are conserved` },
    spacing: 10,
    vconcat: [
      {
        ...PANEL,
        data: { values: energy.rows },
        mark: { type: "line", strokeWidth: 1.5 },
        encoding: {
          x: xEnc(tTitle, false),
          y: { field: "v", type: "quantitative", title: energy.title },
          color: { field: "series", type: "nominal", title: null, scale: { domain: names, range: colours }, legend: { orient: "right" } },
        },
      },
      { ...small, data: { values: eDrift.rows }, mark: { type: "line", color: COLOURS.E }, encoding: { x: xEnc(tTitle, false), y: { field: "energy", type: "quantitative", title: eDrift.title } } },
      {
        ...small,
        layer: [
          { data: { values: mDrift.rows }, mark: { type: "line", color: COLOURS.E }, encoding: { x: xEnc(tTitle), y: { field: "mass", type: "quantitative", title: mDrift.title } } },
          // the time series keeps 12 significant digits: a drift below that reads as zero
          ...(drifts.every((d) => d.mass === 0) ? [{ data: { values: [{}] }, mark: { type: "text", align: "left", baseline: "top", fontSize: 9, color: "#555" }, encoding: { x: { value: 4 }, y: { value: 4 }, text: { value: "no change within the 12 digits of timeseries.csv" } } }] : []),
        ],
      },
    ],
  } as unknown as TopLevelSpec);
}

/** A clock that rang during the run, at time t in the series' unit. */
export interface Ring {
  readonly t: number;
  readonly label: string;
}

function ringLayers(rings: readonly Ring[], withText: boolean, tRange?: readonly [number, number]): object[] {
  if (rings.length === 0) return [];
  // labels stacked downwards so that clocks ringing close together stay readable; a label a later clock's line would
  // cross on the right goes to the left of its line where there is room, else to the right of the last line it
  // would cross (its anchor time `at`)
  const x = (t: number) => (tRange && tRange[1] > tRange[0] ? ((t - tRange[0]) / (tRange[1] - tRange[0])) * PANEL.width : 0);
  // an upper bound of a label's width at 9 units (DejaVu Sans sets letters within 0.7 em)
  const wide = (label: string) => 3 + 0.7 * 9 * label.length;
  const labelled = rings.map((r, i) => {
    const crossing = rings.filter((o, j) => j !== i && x(o.t) >= x(r.t) && x(o.t) <= x(r.t) + wide(r.label));
    const side = crossing.length > 0 && x(r.t) >= wide(r.label) ? "left" : "right";
    const at = side === "right" && crossing.length > 0 ? Math.max(...crossing.map((o) => o.t)) : r.t;
    return { ...r, at, y: 3 + 11 * i, side };
  });
  const text = (side: "left" | "right") => ({
    data: { values: labelled.filter((r) => r.side === side) },
    mark: { type: "text", align: side === "right" ? "left" : "right", baseline: "top", dx: side === "right" ? 3 : -3, fontSize: 9, color: COLOURS.mark },
    encoding: { x: { field: "at", type: "quantitative" }, y: { field: "y", type: "quantitative", scale: null }, text: { field: "label" } },
  });
  return [
    { data: { values: rings }, mark: { type: "rule", strokeDash: [2, 2], color: COLOURS.mark }, encoding: { x: { field: "t", type: "quantitative" } } },
    ...(withText ? [text("right"), text("left")] : []),
  ];
}

/**
 * A dashed threshold line and its label at the right, under the line, or over it where the line lies less than
 * `LABEL_ROOM` units above the panel's bottom (`above`: the line's height in the panel, 0 at the bottom, 1 at the top).
 */
function threshold(value: number, label: string, above: number, height: number): object[] {
  const one = { values: [{}] };
  const under = above * height >= LABEL_ROOM;
  return [
    { data: one, mark: { type: "rule", strokeDash: [5, 3], color: COLOURS.K }, encoding: { y: { datum: value } } },
    { data: one, mark: { type: "text", align: "right", baseline: under ? "top" : "bottom", dy: under ? 3 : -3, fontSize: 9, color: COLOURS.K }, encoding: { x: { value: PANEL.width - 2 }, y: { datum: value }, text: { value: label } } },
  ];
}

/** Room a threshold's label needs under its line (9 units of text and 3 of gap, and a little more). */
const LABEL_ROOM = 16;

/** Where `v` lies in `domain`, 0 at its start and 1 at its end (on a log scale with `log`). */
function within(v: number, domain: readonly [number, number], log = false): number {
  const f = log ? Math.log : (x: number) => x;
  return (f(v) - f(domain[0])) / (f(domain[1]) - f(domain[0]));
}

/** Squeezing (with its target), the mean-field decay on a log axis that reaches its threshold, and ∫λ dt up to ln N. */
export function clocksPlot(series: Row[], tCol: string, tTitle: string, opts: { lnN: number; targetDb: number; rings: readonly Ring[] }): Promise<Figure> {
  const rows = series.map((r) => ({
    t: Number(r[tCol]),
    squeezing: Number(r["squeezing_dB"]),
    dephasing: -Number(r["log10_meanfield_fraction"]) * Math.LN10,
    breakdown: Number(r["breakdown_integral"]),
  }));
  const positive = rows.filter((r) => r.dephasing > 0);
  const deph = logAxis([...positive.map((r) => r.dephasing), 1, 2]);
  const panel = { width: PANEL.width, height: 110 };
  const tRange: [number, number] = [rows[0]!.t, rows.at(-1)!.t];
  const line = (field: string, y: object) => ({ data: { values: field === "dephasing" ? positive : rows }, mark: { type: "line", strokeWidth: 1.5, color: COLOURS.W }, encoding: { x: xEnc(tTitle, field === "breakdown", tRange), y: { field, type: "quantitative", ...y } } });
  const minDb = Math.min(opts.targetDb * 1.2, ...rows.map((r) => r.squeezing).filter(Number.isFinite));
  const breakdownDomain: [number, number] = [0, Math.max(opts.lnN * 1.08, ...rows.map((r) => r.breakdown))];
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "Quantum clocks of the whole-box mode", subtitle: `dotted: when a clock rang; dashed: its threshold (squeezing target ${formatNumber(opts.targetDb)} dB)` },
    spacing: 10,
    vconcat: [
      { ...panel, layer: [line("squeezing", { title: "squeezing [dB]", scale: { domain: [minDb, 0], nice: false } }), ...threshold(opts.targetDb, `target ${formatNumber(opts.targetDb)} dB`, within(opts.targetDb, [minDb, 0]), panel.height), ...ringLayers(opts.rings, true, tRange)] },
      {
        ...panel,
        layer: [
          line("dephasing", { title: "−ln(|⟨b⟩|²/N)", scale: { type: "log", domain: deph.domain, nice: false }, axis: { values: deph.values } }),
          ...threshold(1, "phase diffusion at 1", within(1, deph.domain, true), panel.height),
          ...ringLayers(opts.rings, false),
        ],
      },
      { ...panel, layer: [line("breakdown", { title: "∫λ dt", scale: { domain: breakdownDomain, nice: false } }), ...threshold(opts.lnN, `breakdown at ln N = ${formatNumber(opts.lnN)}`, within(opts.lnN, breakdownDomain), panel.height), ...ringLayers(opts.rings, false)] },
    ],
  } as unknown as TopLevelSpec);
}
