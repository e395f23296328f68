/** `psibox run CONFIG` and `psibox run --resume DIR`. */
import { formatNumber, formatQuantity } from "../core/format.js";
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { applyOverrides, checkConfig, readTomlFile } from "../config/load.js";
import { loadHdf5 } from "../io/h5.js";
import { fillFromSnapshot } from "../simulation/snapshot-start.js";
import { resolveRun, type ResolvedRun } from "../config/resolve.js";
import { silentReporter } from "../simulation/run.js";
import { runSimulation } from "../app/run.js";
import { checkBreakdownMemory } from "../app/breakdown-memory.js";
import { takeRunFolder, type OwnedFolder } from "../simulation/run-folder.js";
import { recordOwned } from "../simulation/run-manifest.js";
import { fileName } from "../core/sanitize.js";
import { runPaths } from "../simulation/outputs.js";
import { TextReporter } from "./progress.js";
import { constantToRoundOff } from "../quantum/outflow.js";
import { describeRun } from "./describe.js";
import type { ClockReport, outflowRecord, twinRecord } from "../quantum/sidecar-report.js";

export interface RunFlags {
  set: string[];
  force: boolean;
  quiet: boolean;
  resume?: string;
  threads?: string;
}

/** The flags of `psibox ic` (the same command, writing the initial conditions only). */
export type IcFlags = Pick<RunFlags, "set" | "force" | "quiet">;

function resumeTarget(dir: string): ResolvedRun {
  const p = runPaths(path.resolve(dir));
  if (!fs.existsSync(p.config)) throw new InputError(`${fileName(dir)}: not a psibox run folder (no config.toml)`);
  if (!fs.existsSync(p.checkpoint)) throw new InputError(`${fileName(dir)}: has no checkpoint.h5 to resume from`);
  const run = resolveRun(checkConfig(readTomlFile(p.config)), path.basename(path.resolve(dir)), process.cwd());
  return { ...run, outputDir: path.resolve(dir) };
}

/** Run or resume; returns the exit code. */
export async function runCommand(
  configFile: string | undefined,
  flags: RunFlags & { readonly initialOnly?: boolean; /** with resume: the later end of psibox extend */ readonly extend?: string },
): Promise<number> {
  if (flags.threads !== undefined) {
    const t = Number(flags.threads);
    if (!(Number.isInteger(t) && t >= 1 && t <= 64)) throw new InputError(`--threads: must be a whole number from 1 to 64, got ${flags.threads}`);
    process.env["PSIBOX_THREADS"] = String(t);
  }
  let run: ResolvedRun;
  let owned: OwnedFolder;
  let extendedConfig: string | undefined;
  if (flags.resume !== undefined && flags.extend !== undefined) {
    ({ run, owned, configText: extendedConfig } = (await import("./extend.js")).extendRun(flags.resume, flags.extend));
  } else if (flags.resume !== undefined) {
    if (configFile !== undefined) throw new InputError("give either a config file or --resume DIR, not both");
    if (flags.set.length > 0) throw new InputError("--set cannot change a resumed run; edit its config.toml instead");
    run = resumeTarget(flags.resume);
    if (completedBefore(runPaths(run.outputDir).summary)) {
      process.stdout.write(`${fileName(flags.resume)}: the run has already completed; nothing to resume\n`);
      return 0;
    }
    owned = takeRunFolder(run.outputDir, { force: false, resume: true });
  } else {
    if (configFile === undefined) throw new InputError("give a config file (psibox run CONFIG) or --resume DIR");
    await loadHdf5();
    const config = checkConfig(fillFromSnapshot(applyOverrides(readTomlFile(configFile), flags.set)));
    if (config.sweep) throw new InputError(`${fileName(configFile)} describes a sweep ([sweep] section): run it with psibox sweep ${fileName(configFile)}`);
    run = resolveRun(config, path.basename(configFile).replace(/\.[^.]*$/, ""), process.cwd());
    // a config kept in its own output folder (a sweep entry's entry.toml) names the run after the folder, as --resume does
    if (path.resolve(run.outputDir) === path.dirname(path.resolve(configFile))) run = { ...run, name: path.basename(run.outputDir) };
    checkBreakdownMemory(run);
    owned = takeRunFolder(run.outputDir, { force: flags.force });
  }
  run = { ...run, outputDir: owned.dir };
  for (const note of owned.notes) process.stderr.write(`psibox: ${note}\n`);
  try {
    return await runOwned(run, { ...flags, extendedConfig });
  } finally {
    owned.lock.release();
  }
}

/** Did the run whose summary is `file` complete? (A missing or unreadable summary means no.) */
function completedBefore(file: string): boolean {
  try {
    return (JSON.parse(fs.readFileSync(file, "utf8")) as { status?: unknown }).status === "completed";
  } catch {
    return false;
  }
}

/** Run (or resume) in a folder this process holds; returns the exit code. */
async function runOwned(run: ResolvedRun, flags: RunFlags & { readonly initialOnly?: boolean; readonly extendedConfig?: string | undefined }): Promise<number> {
  const reporter = flags.quiet ? silentReporter : new TextReporter();
  if (!flags.quiet) process.stderr.write(describeRun(run, flags.initialOnly ? "ic" : flags.extendedConfig !== undefined ? "extend" : flags.resume !== undefined ? "run --resume" : "run") + "\n");
  let interrupted: string | undefined;
  // a run started by psibox sweep stops (with a checkpoint) when the sweep itself is gone
  const parent = Number(process.env["PSIBOX_PARENT_PID"] ?? 0);
  const orphaned = (): string | undefined => (parent > 0 && process.ppid !== parent ? "interrupted (the sweep that started this run has ended)" : undefined);
  const handlers = (["SIGINT", "SIGTERM"] as const).map((signal) => {
    const h = () => {
      interrupted = `interrupted (${signal})`;
    };
    process.once(signal, h);
    return [signal, h] as const;
  });
  try {
    const summary = await runSimulation(run, {
      reporter,
      stopRequested: () => interrupted ?? orphaned(),
      resume: flags.resume !== undefined,
      initialOnly: flags.initialOnly === true,
      ...(flags.extendedConfig !== undefined ? { extendedConfig: flags.extendedConfig } : {}),
    });
    const where = fileName(path.relative(process.cwd(), run.outputDir) || ".");
    if (flags.initialOnly) {
      process.stdout.write(`wrote the initial conditions to ${where}/snapshots/snap_00000.h5\n`);
      return 0;
    }
    if (run.config.output.analyze) {
      const { analyzeRun } = await import("../report/analyze.js");
      recordOwned(run.outputDir, ["analysis/"]);
      const analysis = await analyzeRun(run.outputDir, path.join(run.outputDir, "analysis"));
      process.stderr.write(`analysed ${analysis.snapshots.length} snapshots into ${path.join(where, "analysis")}\n`);
    }
    if (summary.status === "completed") {
      process.stdout.write(`completed ${summary.steps} steps in ${summary.wall_time_s.toFixed(1)} s; outputs in ${where}\n`);
      const clocks = summary["clocks"] as readonly ClockReport[] | undefined;
      if (clocks) process.stdout.write(formatClocks(clocks, run.sidecar.squeezingDb));
      process.stdout.write(formatMeasuredClocks(summary));
      const twin = summary["adiabatic_twin"] as TwinSummary | undefined;
      if (twin) process.stdout.write(formatTwin(twin));
      const outflow = summary["outflow"] as OutflowSummary | undefined;
      if (outflow) process.stdout.write(formatOutflow(outflow));
      return 0;
    }
    const hint = interrupted ? `; continue with: psibox run --resume ${where}` : "";
    process.stderr.write(`psibox: run stopped: ${summary.reason}; outputs up to the last good step in ${where}${hint}\n`);
    return interrupted ? 130 : 3;
  } finally {
    for (const [signal, h] of handlers) process.removeListener(signal, h);
  }
}

const clockTitle = (name: ClockReport["name"], squeezingDb: number): string =>
  ({
    "squeezing-onset": "squeezing onset (N|X| = 1)",
    "squeezing-level": `squeezing to ${formatNumber(squeezingDb)} dB`,
    "phase-diffusion": "phase diffusion, frozen mode (1/e)",
    "phase-diffusion-adiabatic": "phase diffusion, adiabatic (1/e)",
    "classical-breakdown": "classical breakdown, estimate (gravitational rate)",
  })[name];

/** A measured breakdown clock, as in summary.json. */
interface MeasuredClock {
  readonly verdict: "rang" | "projected" | "never";
  readonly time: string;
  readonly method: string;
  readonly ratio_to_span: number | null;
}

/** The measured breakdown clocks of summary.json (the Lyapunov and depletion plug-ins' parts) as lines; empty without them. */
export function formatMeasuredClocks(summary: Readonly<Record<string, unknown>>): string {
  const ly = summary["lyapunov"] as { scrambling_clock: MeasuredClock; depletion_time_from_rate: MeasuredClock } | undefined;
  const dep = summary["depletion"] as { depletion_clock: MeasuredClock & { fraction: number } } | undefined;
  const clocks: [string, MeasuredClock][] = [
    ...(dep ? [[`depletion, measured (N_dep = ${formatNumber(dep.depletion_clock.fraction)} N)`, dep.depletion_clock] as [string, MeasuredClock]] : []),
    ...(ly ? ([["depletion, from the rate (∫λ dt = ½ ln N)", ly.depletion_time_from_rate], ["scrambling (∫λ dt = ln N)", ly.scrambling_clock]] as [string, MeasuredClock][]) : []),
  ];
  if (clocks.length === 0) return "";
  const width = Math.max(...clocks.map(([t]) => t.length));
  const lines = clocks.map(([title, c]) => {
    const when = c.verdict === "never" ? c.method : `${c.verdict === "rang" ? "at" : "projected at"} ${c.time} (${formatNumber(c.ratio_to_span!)} × the run)`;
    return `  ${title.padEnd(width)}  ${when}`;
  });
  return `measured classical breakdown (tangent-linear companion):\n${lines.join("\n")}\n`;
}

/** One line per clock: when it rang (or will), and how that compares with the run and the universe. */
export function formatClocks(clocks: readonly ClockReport[], squeezingDb = -10): string {
  const titles = clocks.map((c) => clockTitle(c.name, squeezingDb));
  const width = Math.max(...titles.map((t) => t.length));
  const lines = clocks.map((c, i) => {
    const when = c.time_s === null ? "never" : `${c.reached ? "at" : "projected at"} ${c.time}`;
    const ratios = c.ratio_to_span === null ? "" : ` (${formatNumber(c.ratio_to_span)} × the run, ${formatNumber(c.ratio_to_age_of_universe!)} × the age of the universe)`;
    return `  ${titles[i]!.padEnd(width)}  ${when}${ratios}`;
  });
  return `quantum sidecar clocks (whole-box mode):\n${lines.join("\n")}\n`;
}

type TwinSummary = ReturnType<typeof twinRecord>;
type OutflowSummary = ReturnType<typeof outflowRecord>;

/** The region's measured outflow in a line, with the loss rate to feed back. */
export function formatOutflow(o: OutflowSummary): string {
  if (o.loss_rate_per_s === null) return `  mass outflow of the ${o.region} region: too few time-series rows to measure\n`;
  const g = o.loss_rate_per_s;
  const change = o.particles_first_N !== null && o.particles_last_N !== null ? constantToRoundOff([o.particles_first_N, o.particles_last_N]) : undefined;
  if (change !== undefined) return `  N of the ${o.region} region is the same at the end as at the start to round-off (|ΔN|/N = ${formatNumber(change)}): no outflow to measure\n`;
  const what = g >= 0 ? "mass outflow" : "mass inflow (a negative loss rate)";
  const hint = g > 0 ? `; as a loss rate: sidecar.loss_rate = "${g.toPrecision(4)}/s"` : "";
  return `  ${what} of the ${o.region} region over the run: ${formatQuantity(g, "/s")} = ${formatQuantity(o.loss_rate_per_yr as number, "/yr")}${hint}\n`;
}

/** The twin field's measurement in a line: χ_ad against the stationary-state formula and the frozen χ. */
export function formatTwin(twin: TwinSummary): string {
  if (twin.chi_adiabatic_per_s === null) return "  adiabatic coefficient by the twin field: too few steps to fit (at least 8 are needed)\n";
  const ratio = (v: number | null) => formatNumber(v ?? Number.NaN, 4);
  return (
    `  adiabatic coefficient by the twin field (e = ${formatNumber(twin.excess)}): χ_ad = ${formatQuantity(twin.chi_adiabatic_per_s, "/s", 4)}, ` +
    `${ratio(twin.ratio_to_stationary)} × the stationary-state 2ω/N + 2χ, ${ratio(twin.ratio_to_frozen)} × the frozen-mode χ\n`
  );
}
