/**
 * The comparison (comparison.ts) in physical units: comparison.csv, one row
 * per sample time with a column per method (the ensemble's with its error),
 * and its part of summary.json, the clocks of each method at the same
 * levels.
 */
import type { OutputScales } from "../simulation/scales.js";
import { formatNumber } from "../core/format.js";
import type { Comparison, ComparisonRow, Crossing } from "./comparison.js";
import { COMPANION_DIR } from "./companion.js";

/** The columns of comparison.csv. */
export const COMPARISON_COLUMNS = [
  "time", "members",
  "depletion_ensemble", "depletion_ensemble_err", "depletion_tangent", "depletion_tangent_err",
  "condensate_fraction_ensemble", "condensate_fraction_ensemble_err", "condensate_fraction_tangent", "condensate_fraction_tangent_err",
  "meanfield_ensemble", "meanfield_ensemble_err", "meanfield_kerr", "meanfield_kerr_adiabatic",
  "vmin_ensemble", "vmin_ensemble_err", "vmin_kerr", "vmin_kerr_adiabatic",
  "kerr_x_rad", "kerr_adiabatic_x_rad",
] as const;

function values(r: ComparisonRow, time: number): number[] {
  const e = (x: { value: number; error: number }) => [x.value, x.error];
  return [
    time, r.members, ...e(r.depletion), ...e(r.depletionTangent), ...e(r.fraction), ...e(r.fractionTangent),
    ...e(r.meanField), r.meanFieldKerr, r.meanFieldKerrAdiabatic, ...e(r.vMin), r.vMinKerr, r.vMinKerrAdiabatic, r.x, r.xAdiabatic,
  ];
}

/** comparison.csv as text. */
export function comparisonCsv(comparison: Comparison, scales: OutputScales): string {
  const lines = comparison.rows.map((r) => values(r, scales.time(r.t)).map((v) => (Number.isFinite(v) ? String(v) : "")).join(","));
  return [COMPARISON_COLUMNS.join(","), ...lines].join("\n") + "\n";
}

/** A crossing in the output time unit, with a verdict. */
function clock(c: Crossing, scales: OutputScales): Record<string, unknown> {
  const t = (v: number | null) => (v === null ? null : scales.time(v));
  return { verdict: c.time === null ? "not within the span" : "rung", time: t(c.time), band_earliest: t(c.earliest), band_latest: t(c.latest) };
}

/** The comparison's part of summary.json: each method's clock at the same levels (times as in series.csv). */
export function comparisonSummary(comparison: Comparison, scales: OutputScales, probes: number): Record<string, unknown> {
  const d = comparison.depletionLevel;
  const m = comparison.meanFieldLevel;
  return {
    companion: COMPANION_DIR,
    probes,
    depletion_clocks: { fraction: d.fraction, level_N: d.particles, ensemble: clock(d.ensemble, scales), tangent_linear: clock(d.tangent, scales) },
    meanfield_clocks: { level: m.level, ensemble: clock(m.ensemble, scales), kerr: clock(m.kerr, scales), kerr_adiabatic: clock(m.kerrAdiabatic, scales) },
  };
}

/** The clocks of summary.json's comparison as lines for the terminal (none without a comparison). */
export function comparisonHeadline(summary: Record<string, unknown>): string[] {
  type Clock = { time: number | null; band_earliest: number | null; band_latest: number | null };
  const c = summary["comparison"] as { depletion_clocks: Record<string, Clock> & { fraction: number }; meanfield_clocks: Record<string, Clock> } | undefined;
  if (!c) return [];
  const u = String(summary["time_unit"]);
  const when = (k: Clock): string => {
    if (k.time === null) return "not within the span";
    const band = k.band_earliest !== null ? ` (band ${formatNumber(k.band_earliest, 3)} … ${k.band_latest === null ? "beyond the span" : formatNumber(k.band_latest, 3)})` : "";
    return `${formatNumber(k.time, 4)} ${u}${band}`;
  };
  const d = c.depletion_clocks;
  const m = c.meanfield_clocks;
  return [
    `  depletion reaches ${formatNumber(100 * d.fraction)}% of N: ensemble ${when(d["ensemble"]!)}, tangent-linear ${when(d["tangent_linear"]!)}`,
    `  mean field |⟨b⟩|²/N falls to 1/e: ensemble ${when(m["ensemble"]!)}, Kerr mode ${when(m["kerr"]!)}, adiabatic Kerr mode ${when(m["kerr_adiabatic"]!)}`,
  ];
}
