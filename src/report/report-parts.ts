/**
 * Pieces of the HTML report: escaping, figures, tables with human headers
 * and units, and the clocks' verdicts as sentences. Every number goes
 * through psibox's formatter.
 */
import { formatNumber } from "../core/format.js";
import { constantToRoundOff } from "../quantum/outflow.js";
import type { Figure } from "./render.js";
import { PNG_SCALE } from "./render.js";
import { writeFileAtomic } from "../io/atomic.js";

export function esc(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

/** A figure at its design size (PNG pixels / PNG_SCALE), scaled down to the column if narrower. */
export function figure(fig: Figure | undefined, caption: string): string {
  if (!fig) return "";
  const w = Math.round(fig.width / PNG_SCALE);
  const h = Math.round(fig.height / PNG_SCALE);
  return `<figure><img alt="${esc(caption)}" src="data:image/png;base64,${fig.png.toString("base64")}" width="${w}" height="${h}"><figcaption>${esc(caption)}</figcaption></figure>`;
}

/** A table cell: numbers formatted, missing values as a dash. */
export function cell(v: unknown, digits = 3): string {
  if (typeof v === "number") return formatNumber(v, digits);
  if (v === null || v === undefined || v === "") return "—";
  return esc(String(v));
}

/** A table with the given column headers (already human, with units) and rows of cells. */
export function table(headers: readonly string[], rows: readonly (readonly unknown[])[], className = ""): string {
  if (rows.length === 0) return "<p>none</p>";
  return `<div class="table"><table${className ? ` class="${className}"` : ""}><thead><tr>${headers.map((h) => `<th>${esc(h)}</th>`).join("")}</tr></thead><tbody>${rows
    .map((r) => `<tr>${r.map((v) => `<td>${cell(v)}</td>`).join("")}</tr>`)
    .join("")}</tbody></table></div>`;
}

export interface ClockEntry {
  readonly name: string;
  readonly time: string;
  readonly time_s: number | null;
  readonly reached: boolean;
  readonly ratio_to_span: number | null;
  readonly ratio_to_age_of_universe: number | null;
}

/** One sentence per clock: what happens, when (from the start of the run), and how that compares. */
export function clockSentence(c: ClockEntry, targetDb: number): string {
  const when = c.time_s === null ? "" : c.reached ? `after ${c.time}` : `only after a projected ${c.time} (extrapolated with the last rates)`;
  const what: Record<string, string> = {
    "squeezing-onset": "The condensate mode starts to squeeze (N|∫χ dt| = 1)",
    "squeezing-level": `Its squeezing reaches ${formatNumber(targetDb)} dB`,
    "phase-diffusion": "Its mean field dephases (|⟨b⟩|²/N = 1/e, frozen-mode χ)",
    "phase-diffusion-adiabatic": "With the adiabatic coefficient dμ/dN its mean field dephases",
    "classical-breakdown": "By the gravitational estimate λ = √(4πGρ_eff) (not a measured rate), the classical-field description fails (∫λ dt = ln N)",
  };
  if (c.time_s === null) return c.name === "squeezing-level" ? `Squeezing to ${formatNumber(targetDb)} dB is beyond the best single-mode squeezing for this N: it never happens.` : `${what[c.name] ?? c.name}: never.`;
  const ratios = c.ratio_to_span === null ? "" : `, ${formatNumber(c.ratio_to_span)} × the run's span and ${formatNumber(c.ratio_to_age_of_universe!)} × the age of the universe`;
  return `${what[c.name] ?? c.name} ${when}${ratios}.`;
}

/** The twin field's measurement of the adiabatic coefficient in a sentence (clocks.json's adiabatic_twin). */
export function twinSentence(twin: { excess: number; chi_adiabatic_per_s: number | null; ratio_to_stationary: number | null; ratio_to_frozen: number | null }): string {
  if (twin.chi_adiabatic_per_s === null) return "A twin field ran beside the field, but the run had too few steps to fit its overlap phase.";
  return (
    `A twin field (ψ₂ = (1 + e/2)ψ at the start with e = ${formatNumber(twin.excess)}, advanced with its own gravity) measured the adiabatic coefficient ` +
    `χ_ad = ${formatNumber(twin.chi_adiabatic_per_s)} /s from the phase of its overlap with the field: ${formatNumber(twin.ratio_to_stationary ?? Number.NaN, 4)} × the ` +
    `stationary-state value 2ω/N + 2χ and ${formatNumber(twin.ratio_to_frozen ?? Number.NaN, 4)} × the frozen-mode χ (3/2 for a stationary soliton). The adiabatic clock above uses it.`
  );
}

/** The mode's start and its loss and dephasing rates in a sentence (clocks.json's start and rates). */
export function modeSentence(c: { particles_N: number; start?: { description: string; number_spread: number }; loss_rate_per_s?: number; dephasing_rate_per_s?: number }): string {
  const start = c.start ? `${c.start.description} start (number spread ΔN = ${formatNumber(c.start.number_spread)}, √N = ${formatNumber(Math.sqrt(c.particles_N))})` : "coherent start";
  const rate = (v: number | undefined, what: string) => (v ? `${what} at ${formatNumber(v)} /s` : `no ${what}`);
  return `The clocks are those of a ${start}, with ${rate(c.loss_rate_per_s, "loss")} and ${rate(c.dephasing_rate_per_s, "dephasing")}.`;
}

/** The measured mass outflow of the sidecar's region in a sentence (clocks.json's outflow). */
export function outflowSentence(o: { region: string; particles_first_N: number | null; particles_last_N: number | null; loss_rate_per_s: number | null; loss_rate_per_yr: number | null }): string {
  if (o.loss_rate_per_s === null) return `The ${o.region} region's mass outflow was measured, but the run had too few time-series rows for a rate.`;
  const change = o.particles_first_N !== null && o.particles_last_N !== null ? constantToRoundOff([o.particles_first_N, o.particles_last_N]) : undefined;
  if (change !== undefined) return `The ${o.region} region held ${formatNumber(o.particles_first_N!)} particles at the first time-series row and the same at the last to round-off (|ΔN|/N = ${formatNumber(change)}): no matter crossed its boundary to measure.`;
  const flow = o.loss_rate_per_s >= 0 ? "lost" : "gained";
  return (
    `The ${o.region} region held ${formatNumber(o.particles_first_N ?? Number.NaN)} particles at the first time-series row and ${formatNumber(o.particles_last_N ?? Number.NaN)} at the last: it ${flow} matter at a mean ` +
    `rate of ${formatNumber(Math.abs(o.loss_rate_per_s))} /s (${formatNumber(Math.abs(o.loss_rate_per_yr ?? Number.NaN))} /yr), ` +
    (o.loss_rate_per_s > 0 ? "the loss rate of its mode to give back as sidecar.loss_rate" : "a negative loss rate (inflow)") +
    ` (outflow_loss_rate_per_s in the time series gives it per interval).`
  );
}

export const STYLESHEET = `
body{font-family:"DejaVu Sans",system-ui,sans-serif;max-width:1060px;margin:2em auto;padding:0 1em;color:#222;line-height:1.45}
h1{font-size:1.5em;margin-bottom:.2em}h2{font-size:1.2em;border-bottom:1px solid #ccc;padding-bottom:.2em;margin-top:1.8em}h3{font-size:1em}
.figs{display:grid;grid-template-columns:repeat(auto-fill,minmax(min(100%,470px),1fr));gap:1.2em 1em;align-items:start}
figure{margin:0;min-width:0}figure img{max-width:100%;height:auto;display:block}figcaption{font-size:.8em;color:#555;margin-top:.2em}
.table{max-width:100%;overflow-x:auto}
table{border-collapse:collapse;font-size:.85em;margin:.4em 0}td,th{border:1px solid #ddd;padding:.2em .6em;text-align:right;white-space:nowrap}th{background:#f4f4f4;font-weight:600;white-space:normal;max-width:8.5em;vertical-align:bottom}
td:first-child,th:first-child{text-align:left}
pre{background:#f7f7f7;padding:1em;overflow-x:auto;font-size:.8em;white-space:pre-wrap}
.verdict li{margin:.2em 0}.note{color:#555;font-size:.9em}
`;

/** Write a whole report page atomically: its title, heading, body and the config it came from. */
export function writePage(file: string, title: string, heading: string, body: string, config: string): void {
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${esc(title)}</title>
<style>${STYLESHEET}</style></head><body>
<h1>${esc(heading)}</h1>
${body}
<h2 id="parameters">Parameters</h2>
<pre>${esc(config)}</pre>
</body></html>
`;
  writeFileAtomic(file, html);
}

/** A measured breakdown clock of summary.json. */
interface MeasuredClockEntry {
  readonly verdict: string;
  readonly time: string;
  readonly method: string;
  readonly ratio_to_span: number | null;
}

/** The measured breakdown clocks (summary.json's lyapunov and depletion parts) as a report section; empty without them. */
export function breakdownSection(summary: Readonly<Record<string, unknown>>, fig: Figure | undefined): string {
  const ly = summary["lyapunov"] as { rate_per_s: number; scrambling_clock: MeasuredClockEntry; depletion_time_from_rate: MeasuredClockEntry; twin?: { ratio_to_tangent: number } } | undefined;
  const dep = summary["depletion"] as { depleted_N: number; depleted_N_error: number; depleted_fraction: number; depletion_clock: MeasuredClockEntry & { fraction: number } } | undefined;
  if (!ly && !dep) return "";
  const when = (c: MeasuredClockEntry) => (c.verdict === "never" ? c.method : `${c.verdict === "rang" ? "rang at" : "projected at"} ${c.time} (${formatNumber(c.ratio_to_span!)} × the run)`);
  const items = [
    ...(dep ? [`Depletion, measured (N_dep = ${formatNumber(dep.depletion_clock.fraction)} N): ${when(dep.depletion_clock)}; at the end N_dep = ${formatNumber(dep.depleted_N)} ± ${formatNumber(dep.depleted_N_error)} particles, ${formatNumber(dep.depleted_fraction)} of N.`] : []),
    ...(ly
      ? [
          `Depletion from the rate (∫λ dt = ½ ln N): ${when(ly.depletion_time_from_rate)}.`,
          `Scrambling (∫λ dt = ln N): ${when(ly.scrambling_clock)}.`,
          `Finite-time Lyapunov rate over the run: ${formatNumber(ly.rate_per_s)} /s${ly.twin ? `; the twin nonlinear run measured ${formatNumber(ly.twin.ratio_to_tangent)} × that` : ""}.`,
        ]
      : []),
  ];
  return `<h2 id="breakdown">Measured classical breakdown</h2>
<ul class="verdict">${items.map((i) => `<li>${esc(i)}</li>`).join("")}</ul>
<div class="figs">${figure(fig, "The Lyapunov rate λ(t), ∫λ dt against ½ ln N (depletion) and ln N (scrambling), and the measured depletion N_dep/N on a log axis against the depletion clock's fraction.")}</div>`;
}
