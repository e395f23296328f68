/**
 * psibox report: one self-contained HTML page for a run (no network needed):
 * its parameters, the clocks' verdicts in a sentence each, the pictures
 * (inlined as data URIs) and the tables.
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../io/atomic.js";
import { analyzeRun } from "./analyze.js";
import type { Figure } from "./render.js";
import { diagnosticsSection } from "./diagnostics-section.js";

function esc(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

function img(fig: Figure | undefined, alt: string): string {
  return fig ? `<figure><img alt="${esc(alt)}" src="data:image/png;base64,${fig.png.toString("base64")}" width="${Math.round(fig.width / 2)}"><figcaption>${esc(alt)}</figcaption></figure>` : "";
}

function table(rows: Record<string, unknown>[]): string {
  if (rows.length === 0) return "<p>none</p>";
  const cols = Object.keys(rows[0]!);
  const cell = (v: unknown) =>
    typeof v === "number" ? (Number.isNaN(v) ? "—" : Number.isInteger(v) ? String(v) : v.toPrecision(4)) : v === null || v === undefined ? "—" : esc(String(v));
  return `<table><thead><tr>${cols.map((c) => `<th>${esc(c)}</th>`).join("")}</tr></thead><tbody>${rows.map((r) => `<tr>${cols.map((c) => `<td>${cell(r[c])}</td>`).join("")}</tr>`).join("")}</tbody></table>`;
}

const CLOCK_SENTENCE: Record<string, (time: string, reached: boolean) => string> = {
  "squeezing-onset": (t, r) => `The condensate mode starts to squeeze (N|∫χ dt| = 1) ${r ? "after" : "only after a projected"} ${t}.`,
  "squeezing-level": (t, r) => (t === "never" ? "The chosen squeezing level is beyond the best single-mode squeezing for this N." : `It reaches the chosen squeezing level ${r ? "after" : "after a projected"} ${t}.`),
  "phase-diffusion": (t, r) => `Its mean field dephases (|⟨b⟩|²/N = 1/e) ${r ? "after" : "after a projected"} ${t}.`,
  "classical-breakdown": (t, r) => `The classical-field description is expected to fail (∫λ dt = ln N) ${r ? "after" : "after a projected"} ${t}.`,
};

/** Write <run>/report.html (and the analysis it shows under <run>/analysis); returns the report's path. */
export async function writeReport(runDir: string, outFile?: string): Promise<string> {
  const summaryFile = path.join(runDir, "summary.json");
  if (!fs.existsSync(summaryFile)) throw new InputError(`${runDir}: not a finished psibox run folder (no summary.json)`);
  const summary = JSON.parse(fs.readFileSync(summaryFile, "utf8")) as Record<string, unknown>;
  const config = fs.existsSync(path.join(runDir, "config.toml")) ? fs.readFileSync(path.join(runDir, "config.toml"), "utf8") : "";
  const clocks = fs.existsSync(path.join(runDir, "clocks.json")) ? (JSON.parse(fs.readFileSync(path.join(runDir, "clocks.json"), "utf8")) as { clocks: { name: string; time: string; reached: boolean; method: string; ratio_to_span: number | null; ratio_to_age_of_universe: number | null }[]; particles_N: number }) : undefined;
  const analysis = await analyzeRun(runDir, path.join(runDir, "analysis"), {});
  const last = analysis.snapshots.at(-1);
  const first = analysis.snapshots[0];
  const lastSummary = (last?.summary ?? {}) as Record<string, unknown>;
  const energies = (lastSummary["energies_Msun_km2_s2"] ?? {}) as Record<string, number>;
  const peaks = last && fs.existsSync(path.join(last.dir, "peaks.csv")) ? fs.readFileSync(path.join(last.dir, "peaks.csv"), "utf8").trim().split("\n") : [];
  const peakRows = peaks.slice(1).map((l) => Object.fromEntries(l.split(",").map((v, i) => [peaks[0]!.split(",")[i]!, Number(v)])));
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>psibox report: ${esc(String(summary["name"]))}</title>
<style>
body{font-family:system-ui,sans-serif;max-width:1000px;margin:2em auto;padding:0 1em;color:#222}
h1{font-size:1.6em}h2{border-bottom:1px solid #ccc;padding-bottom:.2em;margin-top:2em}
table{border-collapse:collapse;font-size:.85em}td,th{border:1px solid #ddd;padding:.2em .5em;text-align:right}th{background:#f4f4f4}
pre{background:#f7f7f7;padding:1em;overflow-x:auto;font-size:.8em}figure{display:inline-block;margin:.5em}figcaption{font-size:.8em;color:#555}
.verdict{font-size:1.05em}
</style></head><body>
<h1>psibox run “${esc(String(summary["name"]))}”</h1>
<p>Status: <b>${esc(String(summary["status"]))}</b>${summary["reason"] ? ` (${esc(String(summary["reason"]))})` : ""}, ${esc(String(summary["steps"]))} steps in ${Number(summary["wall_time_s"]).toFixed(1)} s of wall time.</p>
<h2 id="clocks">Quantum clocks</h2>
${clocks ? `<p>For the whole-box condensate mode of N = ${clocks.particles_N.toPrecision(4)} particles:</p><ul class="verdict">${clocks.clocks.map((c) => `<li>${esc(CLOCK_SENTENCE[c.name]?.(c.time, c.reached) ?? c.name)}${c.ratio_to_span !== null ? ` (${c.ratio_to_span.toPrecision(3)} × the run, ${c.ratio_to_age_of_universe!.toPrecision(3)} × the age of the universe)` : ""}</li>`).join("")}</ul>${img(analysis.figures["clocks"], "squeezing, mean-field fraction and the breakdown integral")}` : "<p>The sidecar was off for this run.</p>"}
<h2 id="energies">Energies</h2>
${img(analysis.figures["energies"], "kinetic, potential and total energy")}
${table([{ kinetic: energies["kinetic"], bulk_flow: energies["kinetic_bulk_flow"], quantum_gradient: energies["kinetic_quantum_gradient"], potential: energies["potential"], total: energies["total"], virial_ratio: lastSummary["virial_ratio"], velocity_dispersion_km_s: lastSummary["velocity_dispersion_km_s"] }])}
<h2 id="field">Field</h2>
${img(first?.figures["slice"], "density at the start")}${img(last?.figures["slice"], "density at the end")}${img(last?.figures["projection"], "projected density at the end")}${img(analysis.figures["spacetime"], "space–time density")}
<h3>Densest points at the end</h3>
${table(peakRows)}
<h2 id="power">Power spectrum</h2>
${img(first?.figures["power"], "at the start")}${img(last?.figures["power"], "at the end")}
${diagnosticsSection(first, last, { img, esc })}
<h2 id="parameters">Parameters</h2>
<pre>${esc(config)}</pre>
</body></html>
`;
  const target = outFile ?? path.join(runDir, "report.html");
  writeFileAtomic(target, html);
  return target;
}
