/**
 * The comparison part of an ensemble's report: the clocks of each method as
 * sentences, the figure of ensemble-comparison-plot.ts and comparison.csv as
 * a table (empty when the ensemble folder holds no comparison).
 */
import fs from "node:fs";
import path from "node:path";
import { formatNumber } from "../core/format.js";
import { ensembleComparisonPlot } from "./ensemble-comparison-plot.js";
import { esc, figure, table } from "./report-parts.js";

type Clock = { verdict: string; time: number | null; band_earliest: number | null; band_latest: number | null };
interface ComparisonPart {
  probes: number;
  depletion_clocks: { fraction: number; level_N: number; ensemble: Clock; tangent_linear: Clock };
  meanfield_clocks: { level: number; ensemble: Clock; kerr: Clock; kerr_adiabatic: Clock };
}

function when(c: Clock, unit: string): string {
  if (c.time === null) return c.band_earliest === null ? "not within the span" : `not within the span (its error band from ${formatNumber(c.band_earliest, 3)} ${unit})`;
  const band = c.band_earliest !== null ? ` (error band ${formatNumber(c.band_earliest, 3)} … ${c.band_latest === null ? "beyond the span" : formatNumber(c.band_latest, 3)})` : "";
  return `at ${formatNumber(c.time, 4)} ${unit}${band}`;
}

function sentences(c: ComparisonPart, unit: string): string[] {
  const d = c.depletion_clocks;
  const m = c.meanfield_clocks;
  return [
    `Depletion reaching ${formatNumber(100 * d.fraction)}% of N (${formatNumber(d.level_N, 4)} particles): the ensemble ${when(d.ensemble, unit)}; the tangent-linear depletion (${c.probes} probes) ${when(d.tangent_linear, unit)}.`,
    `Mean field |⟨b⟩|²/N falling to 1/e: the ensemble ${when(m.ensemble, unit)}; the Kerr mode with the Hartree χ ${when(m.kerr, unit)}; with the adiabatic χ_ad ${when(m.kerr_adiabatic, unit)}.`,
  ];
}

/** The table of comparison.csv rows: value ± error for the ensemble, the predictions beside. */
function comparisonTable(rows: readonly Record<string, string>[], unit: string): string {
  const n = (r: Record<string, string>, c: string) => (r[c] === "" ? "—" : formatNumber(Number(r[c]), 3));
  const pm = (r: Record<string, string>, c: string) => (r[c] === "" ? "—" : `${n(r, c)} ± ${r[`${c}_err`] === "" ? "—" : formatNumber(Number(r[`${c}_err`]), 2)}`);
  return table(
    [`t [${unit}]`, "depletion: ensemble", "tangent-linear", "|⟨b⟩|/√N: ensemble", "Kerr (χ)", "Kerr (χ_ad)", "V_min: ensemble", "Kerr (χ)"],
    rows.map((r) => [Number(r["time"]), pm(r, "depletion_ensemble"), pm(r, "depletion_tangent"), pm(r, "meanfield_ensemble"), n(r, "meanfield_kerr"), n(r, "meanfield_kerr_adiabatic"), pm(r, "vmin_ensemble"), n(r, "vmin_kerr")]),
  );
}

/** The section (heading level h3) from the ensemble folder `dir` and its summary's comparison part. */
export async function comparisonSection(dir: string, summary: { comparison?: ComparisonPart; time_unit: string }): Promise<string> {
  const file = path.join(dir, "comparison.csv");
  const c = summary.comparison;
  if (!c || !fs.existsSync(file)) return "";
  const [head, ...lines] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = (head ?? "").split(",");
  const rows = lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i] ?? "", v])));
  const unit = summary.time_unit;
  const fig = rows.length > 1 ? await ensembleComparisonPlot(rows, unit, c.depletion_clocks.level_N, c.meanfield_clocks.level) : undefined;
  return `<h3 id="ensemble-comparison">Against the linear and the single-mode pictures</h3>
<ul class="verdict">${sentences(c, unit).map((v) => `<li>${esc(v)}</li>`).join("")}</ul>
<div class="figs">${figure(fig, "Top: the depletion N − N₀ of the ensemble and the tangent-linear Tr V†V of the classical companion. Bottom: |⟨b⟩|/√N of the ensemble and of the Kerr mode with the Hartree χ and the adiabatic χ_ad. Bands: ± one error.")}</div>
${comparisonTable(rows, unit)}`;
}
