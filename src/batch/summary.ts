/**
 * The sweep's table, rebuilt from the entry folders alone: one row per entry
 * with the swept values, status, wall time, final time and redshift, whether
 * the grid resolved the flows, the final energies and density from the time series, and every clock's time
 * and method. Written as sweep-summary.csv and sweep-summary.json.
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../io/atomic.js";
import { tidy } from "../core/format.js";
import { lockHolder } from "../simulation/run-lock.js";

/** The manifest a sweep writes (sweep.json). */
export interface SweepManifest {
  readonly name: string;
  readonly keys: readonly string[];
  readonly combine: string;
  readonly entries: readonly { readonly name: string; readonly values: Record<string, unknown> }[];
}

/** "1 entry", "6 entries". */
export const entriesText = (n: number): string => `${n} entr${n === 1 ? "y" : "ies"}`;

/** One row of the summary. */
export type SummaryRow = Record<string, string | number | boolean | null>;

const CLOCKS = ["squeezing-onset", "squeezing-level", "phase-diffusion", "phase-diffusion-adiabatic", "classical-breakdown"];

function readJson(file: string): Record<string, unknown> | undefined {
  try {
    return JSON.parse(fs.readFileSync(file, "utf8")) as Record<string, unknown>;
  } catch {
    return undefined;
  }
}

function lastRow(file: string): Record<string, string> | undefined {
  if (!fs.existsSync(file)) return undefined;
  const lines = fs.readFileSync(file, "utf8").trim().split("\n");
  if (lines.length < 2) return undefined;
  const cols = (lines[0] as string).split(",");
  const cells = (lines.at(-1) as string).split(",");
  return Object.fromEntries(cols.map((c, i) => [c, cells[i] ?? ""]));
}

/** Whether the entry's cells carried its flows (summary.json's flow_resolution), as two columns. */
function flowColumns(summary: Record<string, unknown> | undefined): SummaryRow {
  const flow = summary?.["flow_resolution"] as { resolved?: boolean; worst_unresolved_mass_fraction?: number } | undefined;
  return { flow_resolved: flow?.resolved ?? null, unresolved_mass_fraction: flow?.worst_unresolved_mass_fraction ?? null };
}

/** The mode's start, its loss and dephasing rates and its region's measured outflow (clocks.json), as columns. */
function modeColumns(clocks: Record<string, unknown> | undefined): SummaryRow {
  const start = clocks?.["start"] as { description?: string } | undefined;
  const outflow = clocks?.["outflow"] as { loss_rate_per_s?: number | null } | undefined;
  const num = (v: unknown): number | null => (typeof v === "number" ? v : null);
  return {
    mode_start: start?.description ?? null,
    loss_rate_per_s: num(clocks?.["loss_rate_per_s"]),
    dephasing_rate_per_s: num(clocks?.["dephasing_rate_per_s"]),
    outflow_loss_rate_per_s: num(outflow?.loss_rate_per_s),
  };
}

/** A measured clock of summary.json. */
type Clock = { time_s?: number | null; verdict?: string } | undefined;

/** The [breakdown] companion's measurements and clocks (summary.json's lyapunov and depletion), as columns (empty without it). */
function breakdownColumns(summary: Record<string, unknown> | undefined): SummaryRow {
  const ly = summary?.["lyapunov"] as { rate_per_s?: number; scrambling_clock?: Clock; depletion_time_from_rate?: Clock } | undefined;
  const dep = summary?.["depletion"] as { depleted_fraction?: number; depletion_clock?: Clock } | undefined;
  const clock = (name: string, c: Clock): SummaryRow => ({ [`${name}_s`]: c?.time_s ?? null, [`${name}_verdict`]: c?.verdict ?? null });
  return {
    lyapunov_rate_per_s: ly?.rate_per_s ?? null,
    ...clock("scrambling_clock", ly?.scrambling_clock),
    ...clock("depletion_from_rate_clock", ly?.depletion_time_from_rate),
    depleted_fraction: dep?.depleted_fraction ?? null,
    ...clock("depletion_clock", dep?.depletion_clock),
  };
}

/** The status of one entry folder: "completed", "stopped", "failed", "interrupted" or "pending". */
export function entryStatus(dir: string): { status: string; reason: string | null } {
  const summary = readJson(path.join(dir, "summary.json"));
  const failure = readJson(path.join(dir, "sweep-status.json"));
  if (summary?.["status"] === "completed") return { status: "completed", reason: null };
  // a run holding the folder now (a sweep's worker, a Slurm task): its files are not yet its result
  const holder = lockHolder(dir);
  if (holder) return { status: "running", reason: `psibox process ${holder.pid} on ${holder.host} since ${holder.since}` };
  if (failure) return { status: String(failure["status"]), reason: (failure["reason"] as string | undefined) ?? null };
  if (summary) return { status: "stopped", reason: (summary["reason"] as string | undefined) ?? null };
  if (fs.existsSync(path.join(dir, "checkpoint.h5"))) return { status: "interrupted", reason: "no summary yet; resumable from its checkpoint" };
  return { status: "pending", reason: null };
}

/** Build the summary rows of a sweep folder. */
export function buildSummary(sweepDir: string): { manifest: SweepManifest; rows: SummaryRow[] } {
  const manifest = readJson(path.join(sweepDir, "sweep.json")) as SweepManifest | undefined;
  if (!manifest) throw new InputError(`${sweepDir}: not a sweep folder (no sweep.json)`);
  const rows = manifest.entries.map((e) => {
    const dir = path.join(sweepDir, e.name);
    const summary = readJson(path.join(dir, "summary.json"));
    const clocks = readJson(path.join(dir, "clocks.json"));
    const last = lastRow(path.join(dir, "timeseries.csv"));
    const { status, reason } = entryStatus(dir);
    const row: SummaryRow = { entry: e.name };
    for (const k of manifest.keys) row[k] = JSON.stringify(e.values[k]).replace(/^"|"$/g, "");
    const end = summary?.["end"] as { t?: number; z?: number | null } | undefined;
    Object.assign(row, {
      status,
      reason,
      steps: (summary?.["steps"] as number | undefined) ?? null,
      wall_time_s: (summary?.["wall_time_s"] as number | undefined) ?? null,
      end_time: end?.t ?? null,
      time_unit: (summary?.["time_unit"] as string | undefined) ?? null,
      end_redshift: end?.z ?? null,
      mass_drift: (summary?.["mass_drift"] as number | undefined) ?? null,
      ...flowColumns(summary),
    });
    for (const col of ["kinetic_Msun_km2_s2", "potential_Msun_km2_s2", "total_Msun_km2_s2", "max_density_Msun_kpc3", "squeezing_dB", "log10_meanfield_fraction"]) {
      row[`final_${col}`] = last?.[col] !== undefined ? Number(last[col]) : null;
    }
    Object.assign(row, modeColumns(clocks));
    const list = (clocks?.["clocks"] as { name: string; time_s: number | null; reached: boolean; method: string }[] | undefined) ?? [];
    for (const name of CLOCKS) {
      const c = list.find((x) => x.name === name);
      row[`${name}_s`] = c?.time_s ?? null;
      row[`${name}_reached`] = c ? c.reached : null;
      row[`${name}_method`] = c?.method ?? null;
    }
    return { ...row, ...breakdownColumns(summary) };
  });
  return { manifest, rows };
}

function csvCell(v: string | number | boolean | null): string {
  if (v === null) return "";
  // numbers to 12 significant digits, as the runs' time series: 0.844576514, not 0.8445765140000001
  const s = String(typeof v === "number" ? tidy(v) : v);
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Write sweep-summary.csv and sweep-summary.json into the sweep folder; returns the rows. */
export function writeSummary(sweepDir: string): SummaryRow[] {
  const { manifest, rows } = buildSummary(sweepDir);
  const cols = Object.keys(rows[0] ?? { entry: "" });
  const csv = [cols.join(","), ...rows.map((r) => cols.map((c) => csvCell(r[c] ?? null)).join(","))].join("\n") + "\n";
  writeFileAtomic(path.join(sweepDir, "sweep-summary.csv"), csv);
  writeFileAtomic(path.join(sweepDir, "sweep-summary.json"), JSON.stringify({ name: manifest.name, keys: manifest.keys, combine: manifest.combine, entries: rows }, null, 2) + "\n");
  return rows;
}
