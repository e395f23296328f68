/**
 * psibox report: one self-contained HTML page for a run (no network needed):
 * what was run, the clocks' verdicts in a sentence each, the plots and
 * density pictures (inlined PNGs at their design size), and tables with
 * human headers and units.
 */
import fs from "node:fs";
import path from "node:path";
import { notRunFolder } from "../simulation/run-folder.js";
import { formatNumber, formatQuantity } from "../core/format.js";
import { readSnapshotMeta } from "../io/snapshot.js";
import { analyzeRun, type RunAnalysisOptions } from "./analyze.js";
import { diagnosticsSection } from "./diagnostics-section.js";
import { haloSection } from "./halo-section.js";
import { axisUnit } from "./snapshot-pictures.js";
import { ensembleSection } from "./ensemble-report.js";
import { breakdownSection, clockSentence, twinSentence, outflowSentence, modeSentence, esc, figure, table, writePage, type ClockEntry } from "./report-parts.js";

interface RunSummary {
  name?: string;
  status?: string;
  reason?: string;
  steps?: number;
  wall_time_s?: number;
  time_unit?: string;
  start?: { t: number; z: number | null };
  end?: { t: number; z: number | null };
  mass_drift?: number;
  snapshots?: number;
}

function readJson<T>(file: string): T | undefined {
  return fs.existsSync(file) ? (JSON.parse(fs.readFileSync(file, "utf8")) as T) : undefined;
}

/** The opening paragraph: what ran, how it ended. */
function overview(s: RunSummary, runDir: string, firstFile: string | undefined): string {
  const u = s.time_unit ?? "";
  const span = s.start && s.end ? (s.start.z !== null && s.end.z !== null ? `from z = ${formatNumber(s.start.z, 4)} to z = ${formatNumber(s.end.z, 4)} (t = ${formatQuantity(s.start.t, u)} to ${formatQuantity(s.end.t, u)})` : `from t = ${formatQuantity(s.start.t, u)} to ${formatQuantity(s.end.t, u)}`) : "";
  const status = s.status === "completed" ? "completed" : `stopped (${s.reason ?? "no reason recorded"})`;
  let setup = "";
  if (firstFile) {
    const m = readSnapshotMeta(firstFile);
    const bg = m.background.kind === "lcdm" ? `flat ΛCDM (H₀ = ${formatNumber(m.background.hubbleKmSMpc, 4)} km/s/Mpc, Ω_m = ${formatNumber(m.background.omegaMatter, 4)}), comoving box` : "static box";
    const unit = axisUnit(Math.max(...m.boxSizeKpc));
    setup = `<p>${m.cells.length}D grid of ${m.cells.join(" × ")} cells, box ${m.boxSizeKpc.map((b) => formatNumber(b * unit.perKpc, 4)).join(" × ")} ${unit.name}, ${m.gravity} gravity, ${bg}; particle mass ${formatQuantity(m.particleMassEv, "eV")}.</p>`;
  }
  return `${setup}<p>The run ${status} after ${s.steps ?? "?"} steps in ${formatQuantity(s.wall_time_s ?? NaN, "s")} of wall time, ${span}; ${s.snapshots ?? "?"} snapshots; relative mass drift ${formatNumber(s.mass_drift ?? NaN)}. Folder: <code>${esc(runDir)}</code>.</p>`;
}

/** The densest points at the end, with the core fit in 3D. */
function peaksTable(dir: string | undefined, dims: number): string {
  const file = dir ? path.join(dir, "peaks.csv") : "";
  if (!file || !fs.existsSync(file)) return "<p>none</p>";
  const [header, ...lines] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  const get = (row: number[], c: string) => row[cols.indexOf(c)]!;
  const rows = lines.map((l) => l.split(",").map(Number));
  const axes = ["x", "y", "z"].slice(0, dims);
  const headers = ["#", ...axes.map((a) => `${a} [kpc]`), "ρ [Msun/kpc³]", ...(dims === 3 ? ["core fit ρ_c [Msun/kpc³]", "core fit r_c [kpc]", "ρ_c from the core relation [Msun/kpc³]", "fit rms (ln ρ)"] : [])];
  const body = rows.map((r) => [
    get(r, "peak"),
    ...axes.map((a) => get(r, `${a}_kpc`)),
    get(r, "density_Msun_kpc3"),
    ...(dims === 3 ? [get(r, "core_fit_rho_c_Msun_kpc3"), get(r, "core_fit_r_c_kpc"), get(r, "core_relation_rho_c_Msun_kpc3"), get(r, "core_fit_rms_ln")] : []),
  ]);
  const note = dims === 3 ? `<p class="note">Core fit: ρ_c/(1 + 0.091 (r/r_c)²)⁸ (Schive, Chiueh &amp; Broadhurst 2014); the core relation ρ_c = 1.9 (m/10⁻²³ eV)⁻² (r_c/kpc)⁻⁴ Msun/pc³ for the fitted r_c.</p>` : "";
  return table(headers, body) + note;
}

/** The energies at the end as a two-column table. */
function energyTable(summary: Record<string, unknown>): string {
  const e = (summary["energies_Msun_km2_s2"] ?? {}) as Record<string, number>;
  const unit = "Msun (km/s)²";
  return table(
    ["quantity", "value"],
    [
      [`kinetic energy K [${unit}]`, e["kinetic"]],
      [`  bulk flow ½∫ρv² [${unit}]`, e["kinetic_bulk_flow"]],
      [`  quantum gradient [${unit}]`, e["kinetic_quantum_gradient"]],
      [`potential energy W [${unit}]`, e["potential"]],
      [`total K + W [${unit}]`, e["total"]],
      ["virial ratio 2K/|W|", summary["virial_ratio"]],
      ["velocity dispersion [km/s]", summary["velocity_dispersion_km_s"]],
    ],
  );
}

/** Each species at the end and their total (a run of several species), with their modes' coefficients; empty otherwise. */
function speciesTable(summary: Record<string, unknown>): string {
  type Energies = { kinetic: number; potential: number; contact?: number; total: number };
  type Each = { name: string; particle_mass_eV: number; mass_Msun: number; energies_Msun_km2_s2: Energies; particles_N: number; chi_per_s: number; chi_contact_per_s?: number };
  const sp = summary["species"] as { each: Each[]; total: { mass_Msun: number; energies_Msun_km2_s2: Energies }; cross: { species: string[]; chi_per_s: number }[] } | undefined;
  if (!sp) return "";
  const unit = "Msun (km/s)²";
  // a species' own contact energy U_i and its mode's contact part χ_SI,i, when a species has a contact term
  const withContact = sp.total.energies_Msun_km2_s2.contact !== undefined;
  const c = <T>(values: T[]): T[] => (withContact ? values : []);
  const energies = (e: Energies) => [e.kinetic, e.potential, ...c([e.contact]), e.total];
  const rows = [
    ...sp.each.map((e) => [e.name, e.particle_mass_eV, e.mass_Msun, ...energies(e.energies_Msun_km2_s2), e.particles_N, e.chi_per_s, ...c([e.chi_contact_per_s])]),
    ["total", undefined, sp.total.mass_Msun, ...energies(sp.total.energies_Msun_km2_s2), undefined, undefined, ...c([undefined])],
  ];
  const cross = sp.cross.map((x) => `χ between the modes of ${x.species.join(" and ")}: ${formatNumber(x.chi_per_s)} /s`).join("; ");
  const total = withContact ? "K_i + W_i + U_i" : "K_i + W_i";
  const header = ["species", "particle mass [eV]", "mass [Msun]", `kinetic K_i [${unit}]`, `potential W_i (shared Φ) [${unit}]`, ...c([`contact U_i [${unit}]`]), `${total} [${unit}]`, "mode N_i", withContact ? "mode χ_i (own Φ and contact) [1/s]" : "mode χ_i (own Φ) [1/s]", ...c(["its contact part χ_SI,i [1/s]"])];
  return `<h3>Species at the end</h3>
${table(header, rows)}
<p class="note">${esc(cross)} (gravity only: the species have no contact term between them). The table above this one and the pictures are of the first species' field.</p>`;
}

/** Write <run>/report.html (and the analysis it shows under <run>/analysis); returns the report's path. */
export async function writeReport(runDir: string, outFile?: string, options: RunAnalysisOptions = {}): Promise<string> {
  const summary = readJson<RunSummary>(path.join(runDir, "summary.json"));
  if (!summary) throw notRunFolder(runDir, "summary.json");
  const config = fs.existsSync(path.join(runDir, "config.toml")) ? fs.readFileSync(path.join(runDir, "config.toml"), "utf8") : "";
  const clocks = readJson<Parameters<typeof modeSentence>[0] & { clocks: ClockEntry[]; squeezing_db_target?: number; adiabatic_twin?: Parameters<typeof twinSentence>[0]; outflow?: Parameters<typeof outflowSentence>[0] }>(path.join(runDir, "clocks.json"));
  const analysis = await analyzeRun(runDir, path.join(runDir, "analysis"), { ...options, pictures: true });
  const first = analysis.snapshots[0];
  const last = analysis.snapshots.at(-1);
  const dims = first ? readSnapshotMeta(first.file).cells.length : 0;
  const target = clocks?.squeezing_db_target ?? -10;
  const clockSection = clocks
    ? `<p>For the whole-box condensate mode of N = ${formatNumber(clocks.particles_N)} particles, counted from the start of the run (squeezing target ${formatNumber(target)} dB). ${esc(modeSentence(clocks))}</p>
<ul class="verdict">${clocks.clocks.map((c) => `<li>${esc(clockSentence(c, target))}</li>`).join("")}</ul>${clocks.adiabatic_twin ? `\n<p>${esc(twinSentence(clocks.adiabatic_twin))}</p>` : ""}${clocks.outflow ? `\n<p>${esc(outflowSentence(clocks.outflow))}</p>` : ""}
<div class="figs">${figure(analysis.figures["clocks"], "Squeezing, mean-field decay and the breakdown integral, with their thresholds (dashed) and the times the clocks rang (dotted).")}</div>`
    : "<p>The quantum sidecar was off for this run.</p>";
  const fieldFigs = [
    figure(first?.figures["slice"], "Density at the start."),
    figure(last?.figures["slice"], "Density at the end."),
    figure(last?.figures["projection"], "Column density at the end (mass per area along the line of sight)."),
    figure(analysis.figures["spacetime"], "Density against position and time, one band per snapshot."),
  ].join("");
  const body = `${overview(summary, runDir, first?.file)}
<h2 id="clocks">Quantum clocks</h2>
${clockSection}
${breakdownSection(summary as unknown as Record<string, unknown>, analysis.figures["breakdown"])}
${await ensembleSection(path.join(runDir, "ensemble"))}
<h2 id="energies">Energies</h2>
<div class="figs">${figure(analysis.figures["energies"], "Energies, and the checks of energy and mass conservation.")}</div>
<h3>At the end: ${esc(last?.caption ?? "")}</h3>
${last ? energyTable(last.summary) : "<p>none</p>"}
${last ? speciesTable(last.summary) : ""}
<h2 id="field">Field</h2>
<div class="figs">${fieldFigs}</div>
<h3>Densest points at the end</h3>
${peaksTable(last?.dir, dims)}
<h2 id="power">Power spectrum</h2>
<div class="figs">${figure(first?.figures["power"], "At the start.")}${figure(last?.figures["power"], "At the end.")}</div>
${diagnosticsSection(first, last, { img: figure, esc })}
${haloSection(last?.dir, analysis.tracks, analysis.figures, dims)}`;
  const target_ = outFile ?? path.join(runDir, "report.html");
  writePage(target_, `psibox report: ${String(summary.name)}`, `psibox run “${String(summary.name)}”`, body, config);
  return target_;
}
