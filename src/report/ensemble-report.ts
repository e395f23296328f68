/**
 * The report of a truncated-Wigner ensemble (psibox report on an ensemble
 * folder, and a section of a run's report when the run folder holds one):
 * what was reduced, the headline numbers with their errors as sentences,
 * the figure of ensemble-plot.ts and the series as a table, then the
 * comparison with the linear and single-mode pictures
 * (ensemble-comparison-section.ts) when the ensemble has one.
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { formatNumber } from "../core/format.js";
import { ensemblePlot } from "./ensemble-plot.js";
import { comparisonSection } from "./ensemble-comparison-section.js";
import { esc, figure, table, writePage } from "./report-parts.js";

type Pair = { value: number; error: number };
interface EnsembleSummary {
  name: string;
  status: string;
  reason?: string;
  members_requested: number;
  members_reduced: number;
  particles_N: number;
  modes: number;
  noise_seed: number;
  time_unit: string;
  at_end?: { time: number; condensate_fraction: Pair; depletion_N: Pair; b: { re: Pair; im: Pair }; coherence: Pair; vmin: Pair };
  departure_clock?: { level: number; verdict: string; time: number | null; time_error: number | null };
  warnings?: string[];
}

/** The rows of a CSV file of plain values (no quoted commas), keyed by the header. */
function readRows(file: string): Record<string, string>[] {
  const [head, ...lines] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = (head ?? "").split(",");
  return lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i] ?? "", v])));
}

const pm = (p: Pair, digits = 3): string => `${formatNumber(p.value, digits)} ± ${formatNumber(p.error, 2)}`;

/** The sentences of the headline numbers. */
function verdicts(s: EnsembleSummary): string[] {
  const u = s.time_unit;
  const out = [`${s.members_reduced} of ${s.members_requested} members reduced (${s.status}${s.reason ? `: ${s.reason}` : ""}); N = ${formatNumber(s.particles_N, 4)} particles over ${s.modes} grid modes (N/modes = ${formatNumber(s.particles_N / s.modes)}), noise seed ${s.noise_seed}.`];
  const e = s.at_end;
  if (e) {
    out.push(`At t = ${formatNumber(e.time, 4)} ${u}: condensate fraction ${pm(e.condensate_fraction)}, depletion ${pm(e.depletion_N)} particles, mean field |⟨b⟩|²/N = ${pm(e.coherence)}.`);
    out.push(`The classical mode's amplitude ⟨b⟩ = ${pm(e.b.re, 4)} + (${pm(e.b.im, 4)}) i; its smallest quadrature variance V_min = ${pm(e.vmin)} (a coherent state has 1/2).`);
  }
  const c = s.departure_clock;
  if (c) out.push(c.time === null ? `The mean field stays within ${formatNumber(c.level)} of the classical field (relative distance) over the span.` : `The mean field departs from the classical field by ${formatNumber(c.level)} (relative distance) at t = ${formatNumber(c.time, 4)} ± ${formatNumber(c.time_error ?? Number.NaN, 2)} ${u}.`);
  return out;
}

/** The series as a table of value ± error. */
function seriesTable(rows: readonly Record<string, string>[], unit: string): string {
  const v = (r: Record<string, string>, c: string): string => (r[c] === "" ? "—" : `${formatNumber(Number(r[c]), 3)} ± ${formatNumber(Number(r[`${c}_err`]), 2)}`);
  const cols = ["condensate_fraction", "depletion_N", "coherence", "vmin", "departure"];
  return table(
    [`t [${unit}]`, "members", "N₀/N", "depletion [particles]", "|⟨b⟩|²/N", "V_min", "departure"],
    rows.map((r) => [Number(r["time"]), Number(r["members"]), ...cols.map((c) => v(r, c))]),
  );
}

/** The ensemble's part of a report (heading level h2); empty when `dir` holds no reduced ensemble. */
export async function ensembleSection(dir: string): Promise<string> {
  const summaryFile = path.join(dir, "summary.json");
  const seriesFile = path.join(dir, "series.csv");
  if (!fs.existsSync(summaryFile) || !fs.existsSync(seriesFile)) return "";
  const s = JSON.parse(fs.readFileSync(summaryFile, "utf8")) as EnsembleSummary;
  const rows = readRows(seriesFile);
  const fig = rows.length > 1 ? await ensemblePlot(rows, s.time_unit, { level: s.departure_clock?.level ?? Number.NaN, departureTime: s.departure_clock?.time ?? null }) : undefined;
  const warnings = (s.warnings ?? []).map((w) => `<p class="note">warning: ${esc(w)}</p>`).join("");
  return `<h2 id="ensemble">Truncated-Wigner ensemble</h2>
<ul class="verdict">${verdicts(s).map((v) => `<li>${esc(v)}</li>`).join("")}</ul>${warnings}
<div class="figs">${figure(fig, "The condensate fraction and the mean field's share of N, and the mean field's distance from the classical field, each with ± one error (bootstrap or standard error).")}</div>
<h3>Series</h3>
${seriesTable(rows, s.time_unit)}
${await comparisonSection(dir, s as Parameters<typeof comparisonSection>[1])}`;
}

/** Write the report of the ensemble folder `dir` (report.html in it, or `outFile`); returns its path. */
export async function writeEnsembleReport(dir: string, outFile?: string): Promise<string> {
  if (!fs.existsSync(path.join(dir, "summary.json"))) throw new InputError(`${dir}: the ensemble has no summary.json yet (fewer than 2 members done); run psibox ensemble on its config again`);
  const name = (JSON.parse(fs.readFileSync(path.join(dir, "summary.json"), "utf8")) as EnsembleSummary).name;
  const config = fs.existsSync(path.join(dir, "config.toml")) ? fs.readFileSync(path.join(dir, "config.toml"), "utf8") : "";
  const target = outFile ?? path.join(dir, "report.html");
  writePage(target, `psibox ensemble: ${name}`, `psibox ensemble “${name}”`, `<p>Folder: <code>${esc(dir)}</code>.</p>\n${await ensembleSection(dir)}`, config);
  return target;
}
