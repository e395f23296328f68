/** `psibox ensemble CONFIG`: resolve, run or continue the ensemble (or one array task's share of it, or its reduction), print its headline numbers. */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { formatNumber } from "../core/format.js";
import { fileName } from "../core/sanitize.js";
import { checkConfig, readTomlFile, applyOverrides } from "../config/load.js";
import { resolveRun, type ResolvedRun } from "../config/resolve.js";
import { resolveEnsemble } from "../config/resolve-ensemble.js";
import { silentReporter } from "../simulation/session.js";
import { checkOutputFolder } from "../simulation/run-folder.js";
import { lockRunFolder } from "../simulation/run-lock.js";
import { runEnsemble, type EnsembleResult } from "../ensemble/ensemble.js";
import { runCompanion } from "../app/ensemble-companion.js";
import { comparisonHeadline } from "../ensemble/comparison-output.js";
import type { Estimate } from "../ensemble/observables.js";
import { TextReporter } from "./progress.js";
import { emitCommand, modeOf, type Mode, type ModeFlags } from "./ensemble-slurm.js";

export interface EnsembleFlags extends ModeFlags {
  set: string[];
  workers?: string;
  force: boolean;
  quiet: boolean;
}

function workersOf(text: string | undefined): number {
  if (text === undefined) return os.availableParallelism();
  const n = Number(text);
  if (!(Number.isInteger(n) && n >= 1 && n <= 256)) throw new InputError(`--workers: must be a whole number from 1 to 256, got ${text}`);
  return n;
}

const show = (e: { value: number; error: number }, digits = 4): string => `${formatNumber(e.value, digits)} ± ${formatNumber(e.error, 2)}`;

/** The lines printed at the end. */
function headline(result: EnsembleResult, where: string): string {
  const s = result.summary as { members_reduced: number; particles_N: number; time_unit: string; at_end?: Record<string, Estimate>; departure_clock?: { level: number; time: number | null; time_error: number | null } };
  const lines = [`${result.status} ${s.members_reduced} members (N = ${formatNumber(s.particles_N, 4)}); outputs in ${where}`];
  const end = s.at_end;
  if (end) {
    lines.push(`  at the end: condensate fraction ${show(end["condensate_fraction"]!)}, depletion ${show(end["depletion_N"]!)} particles, V_min ${show(end["vmin"]!)}`);
  }
  const clock = s.departure_clock;
  if (clock) {
    const when = clock.time === null ? "not within the span" : `at ${formatNumber(clock.time, 4)} ± ${formatNumber(clock.time_error ?? Number.NaN, 2)} ${s.time_unit}`;
    lines.push(`  the mean field departs from the classical one by ${formatNumber(clock.level)}: ${when}`);
  }
  lines.push(...comparisonHeadline(result.summary));
  return lines.join("\n") + "\n";
}

/** The config's run, checked as far as anything can be before work starts. */
function loadRun(configFile: string, flags: EnsembleFlags): ResolvedRun {
  const config = checkConfig(applyOverrides(readTomlFile(configFile), flags.set));
  if (config.sweep) throw new InputError(`${fileName(configFile)} describes a sweep ([sweep] section); an ensemble takes a single run's config`);
  const run = resolveRun(config, path.basename(configFile).replace(/\.[^.]*$/, ""), process.cwd());
  resolveEnsemble(run.config); // bad settings fail before any work
  return run;
}

/** Run the command; returns the exit code. */
export async function ensembleCommand(configFile: string, flags: EnsembleFlags): Promise<number> {
  const workers = workersOf(flags.workers);
  const mode = modeOf(flags);
  const run = loadRun(configFile, flags);
  if (mode.kind === "emit") return emitCommand(run, flags, mode.tasks);
  const dir = checkOutputFolder(path.join(run.outputDir, "ensemble"));
  let interrupted: string | undefined;
  const handlers = (["SIGINT", "SIGTERM"] as const).map((signal) => {
    const h = (): void => void (interrupted = `interrupted (${signal})`);
    process.once(signal, h);
    return [signal, h] as const;
  });
  fs.mkdirSync(dir, { recursive: true });
  // the tasks of an array share the folder, each writing only its own members' files
  const lock = mode.kind === "task" ? undefined : lockRunFolder(dir);
  try {
    const reporter = flags.quiet ? silentReporter : new TextReporter();
    const share = mode.kind === "task" ? { share: { task: mode.task, count: mode.count } } : {};
    const result = await runEnsemble(run, { workers, force: flags.force, reporter, dir, stopRequested: () => interrupted, companion: runCompanion, ...share, reduceOnly: mode.kind === "reduce" });
    return finish(result, mode, fileName(path.relative(process.cwd(), dir) || "."));
  } finally {
    lock?.release();
    for (const [signal, h] of handlers) process.removeListener(signal, h);
  }
}

/** Print how the ensemble (or this task's share) ended; returns the exit code. */
function finish(result: EnsembleResult, mode: Mode, where: string): number {
  if (result.status === "completed" && mode.kind === "task") {
    process.stdout.write(`array task ${mode.task} of ${mode.count}: its members are in ${where}; the collect step (psibox ensemble CONFIG --reduce) reduces them\n`);
    return 0;
  }
  if (result.status === "completed") {
    process.stdout.write(headline(result, where));
    return 0;
  }
  if (mode.kind === "reduce") {
    process.stderr.write(`psibox: ensemble reduced incompletely: ${result.reason}; outputs in ${where}; run the array (or psibox ensemble CONFIG) again to add them\n`);
    return 3;
  }
  process.stderr.write(`psibox: ensemble stopped: ${result.reason}; the members done are kept in ${where}; run the same command again to continue\n`);
  return 130;
}
