/**
 * The classical companion of an ensemble: the config's own run, once, from
 * the same classical start without noise, with the quantum sidecar (the Kerr
 * mode of the Hartree mode: X = ∫χ dt and the adiabatic ∫χ_ad dt) and the
 * tangent-linear depletion probes (Tr V†V), a time-series row every step.
 * It is an ordinary run folder inside the ensemble folder (`companion/`),
 * checkpointed and resumed like any run; the predictions are read from its
 * timeseries.csv. The sidecar takes N from the particle mass of the config;
 * X scales as 1/N at a fixed field, so X at the ensemble's N is
 * X·N_config/N. The tangent-linear depletion is a count that does not
 * depend on N.
 */
import fs from "node:fs";
import path from "node:path";
import type { CheckedConfig } from "../config/schema.js";
import { resolveRun, type ResolvedRun } from "../config/resolve.js";
import { resolvedConfigToml } from "../config/serialize.js";
import type { RunReporter } from "../simulation/session.js";
import { InputError } from "../core/errors.js";

/** The companion's folder inside the ensemble folder. */
export const COMPANION_DIR = "companion";
/** Depletion probes of the companion when the config asks for none (breakdown.probes). */
export const DEFAULT_PROBES = 8;

/** Runs (or resumes) the companion run in its folder; the app layer provides it (it assembles the run's plug-ins). */
export type CompanionRunner = (companion: ResolvedRun, options: { resume: boolean; reporter: RunReporter; stopRequested?: () => string | undefined }) => Promise<{ status: string; reason?: string }>;

/** The companion's config: the run's, with the sidecar on, depletion probes, a row every step, no snapshots. */
export function companionRun(run: ResolvedRun, ensembleDir: string): ResolvedRun {
  const c = run.config;
  const { snapshot_every: _every, snapshot_interval: _interval, snapshot_redshifts: _redshifts, ...output } = c.output;
  const config = {
    ...c,
    output: { ...output, dir: path.join(ensembleDir, COMPANION_DIR), timeseries_every: 1, vortex_census: false, analyze: false },
    sidecar: { ...c.sidecar, enabled: true },
    breakdown: { ...c.breakdown, tangent: false, twin_offset: 0, region: "box", probes: c.breakdown.probes > 0 ? c.breakdown.probes : DEFAULT_PROBES },
  } as CheckedConfig;
  return resolveRun(config, run.name, path.dirname(ensembleDir));
}

/** What a companion folder holds: nothing, a finished run of this config, a run to resume, or something to start afresh. */
export function companionState(companion: ResolvedRun): "done" | "resume" | "new" {
  const dir = companion.outputDir;
  const file = (name: string) => path.join(dir, name);
  if (!fs.existsSync(file("config.toml")) || fs.readFileSync(file("config.toml"), "utf8") !== resolvedConfigToml(companion)) return "new";
  if (fs.existsSync(file("summary.json"))) {
    const status = (JSON.parse(fs.readFileSync(file("summary.json"), "utf8")) as { status?: string }).status;
    if (status === "completed" && fs.existsSync(file("timeseries.csv"))) return "done";
  }
  return fs.existsSync(file("checkpoint.h5")) ? "resume" : "new";
}

/** The companion's time series: code times and the columns the predictions need. */
export interface CompanionSeries {
  readonly t: Float64Array;
  /** N of the config (the sidecar's). */
  readonly particles: number;
  /** X = ∫χ dt and ∫χ_ad dt at the config's N. */
  readonly x: Float64Array;
  readonly xAdiabatic: Float64Array;
  /** Tr V†V and its standard error (particles). */
  readonly depletion: Float64Array;
  readonly depletionError: Float64Array;
}

/** Read the companion's timeseries.csv (times converted to code units by `codeTime`). */
export function readCompanion(companion: ResolvedRun, codeTime: (t: number) => number): CompanionSeries {
  const file = path.join(companion.outputDir, "timeseries.csv");
  const [head, ...lines] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = (head ?? "").split(",");
  const rows = lines.map((l) => l.split(","));
  const column = (name: string): Float64Array => {
    const i = cols.indexOf(name);
    if (i < 0) throw new InputError(`${path.join(COMPANION_DIR, "timeseries.csv")}: has no column ${name}; remove the companion folder and run the ensemble again`);
    return Float64Array.from(rows, (r) => (r[i] === "" || r[i] === undefined ? Number.NaN : Number(r[i])));
  };
  const t = column(cols.find((c) => c.startsWith("t_")) ?? "t_");
  return {
    t: t.map(codeTime),
    particles: column("particles_N")[0] as number,
    x: column("chi_integral_rad"),
    xAdiabatic: column("chi_adiabatic_integral_rad"),
    depletion: column("depleted_N"),
    depletionError: column("depleted_N_error"),
  };
}

/**
 * The companion's series, running (or resuming) it first unless it has finished; `stopped` when a stop was
 * requested before it finished (its checkpoint is kept for the next call).
 */
export async function companionSeries(
  companion: ResolvedRun,
  runner: CompanionRunner,
  reporter: RunReporter,
  codeTime: (t: number) => number,
  stopRequested?: () => string | undefined,
): Promise<{ series?: CompanionSeries; stopped?: string }> {
  const state = companionState(companion);
  if (state !== "done") {
    reporter.phase(`classical companion (the sidecar's Kerr mode and ${companion.breakdown.probes} depletion probes)${state === "resume" ? ": continuing" : ""}`);
    const result = await runner(companion, { resume: state === "resume", reporter, ...(stopRequested ? { stopRequested } : {}) });
    reporter.endPhase();
    if (result.status !== "completed") return { stopped: result.reason ?? "the classical companion stopped" };
  }
  return { series: readCompanion(companion, codeTime) };
}
