/**
 * One run from a resolved config: build the grid, background, gravity and
 * initial field (or restore a checkpoint), advance to the end with the run
 * loop (evolve.ts), calling the run's plug-ins, and write the run folder
 * (see outputs.ts and the README's output layout). The plug-ins are exactly
 * the ones given: the application layer (app/run.ts) adds the built-in ones
 * a config asks for.
 */
import { collapseProblem } from "./collapse-guard.js";
import fs from "node:fs";
import { formatNumber, tidy } from "../core/format.js";
import { writeFileAtomic } from "../io/atomic.js";
import { loadHdf5 } from "../io/h5.js";
import type { ResolvedRun } from "../config/resolve.js";
import { takeRunFolder } from "./run-folder.js";
import { ConfigError } from "../core/errors.js";
import { FIXED_STEP_FACTOR, checkFixedStep, fieldProblem, speciesMassProblem } from "./guards.js";
import { PluginSet } from "./plugin-set.js";
import { writeFailureReason } from "../io/write-failure.js";
import type { SplitStepper } from "../integrators/split-step.js";
import { evolveAsync, type EvolveResult, type StepInfo } from "./evolve.js";
import { RunRecorder } from "./recorder.js";
import { openSession, startRun, type RunOptions, type RunSession, type RunStart } from "./session.js";
import type { MeasuredSums } from "./plugin.js";

export { silentReporter, type RunOptions, type RunReporter } from "./session.js";

/** What a run ends with (also written to summary.json), with the plug-ins' parts as further keys. */
export interface RunSummary {
  readonly name: string;
  readonly status: "completed" | "stopped";
  readonly reason?: string;
  readonly steps: number;
  readonly wall_time_s: number;
  readonly time_unit: string;
  readonly start: { readonly t: number; readonly a: number; readonly z: number | null };
  readonly end: { readonly t: number; readonly a: number; readonly z: number | null };
  readonly mass_drift: number;
  readonly snapshots: number;
  readonly resumed_from_step?: number;
  readonly relaxation?: { readonly iterations: number; readonly converged: boolean };
  readonly warnings?: readonly string[];
  /** The estimate made before the run and the peak resident memory of the process (bytes). */
  readonly memory: { readonly estimate_bytes: number; readonly address_space_estimate_bytes: number; readonly peak_rss_bytes: number };
  readonly [plugin: string]: unknown;
}

/** The keys of summary.json that belong to the run itself. */
const SUMMARY_KEYS = ["name", "status", "reason", "steps", "wall_time_s", "time_unit", "start", "end", "mass_drift", "snapshots", "resumed_from_step", "relaxation", "warnings", "memory"];

/** Run a resolved config with the given plug-ins; the output folder must exist (see prepareOutputDir). */
export async function simulate(run: ResolvedRun, options: RunOptions = {}): Promise<RunSummary> {
  await loadHdf5();
  let session = openSession(run, options);
  try {
    const first = startRun(session);
    // a field that is not finite at the start stops the run before its first step, with no plug-in measuring it
    const startProblem = fieldProblem(session.stepper, session.scales);
    const start = startProblem ? first : checkStep(session, first);
    if (startProblem) session = { ...session, plugins: new PluginSet([]) };
    else startPlugins(session, start);
    const recorder = new RunRecorder(session, start);
    if (!start.resumed) {
      recorder.row(0, 0, "start");
      recorder.snapshot(0);
    }
    if (options.initialOnly) {
      recorder.close();
      session.writer.log("initial conditions written");
      return summaryOf(session, start, { status: "completed", steps: 0 }, 1, {});
    }
    const { result, failedWrite } = await loop(session, start, recorder);
    // after a failed write (a full disk) each further write is attempted, and what cannot be written is left out
    const write = <T>(what: () => T, otherwise: T): T => (failedWrite ? attemptWrite(what, otherwise) : what());
    write(() => recorder.close(), undefined);
    session.reporter.endPhase();
    const a = session.background.scaleFactor(session.stepper.time);
    const parts = write(() => session.plugins.stop({ status: result.status, steps: result.steps, t: session.stepper.time, a }, SUMMARY_KEYS), {});
    const summary = summaryOf(session, start, result, recorder.snapshotsWritten, parts);
    write(() => writeFileAtomic(session.paths.summary, JSON.stringify(summary, null, 2) + "\n"), undefined);
    return summary;
  } finally {
    session.stepper.close();
  }
}

/** Refuse (or, when insisted on, warn about) a fixed step far beyond the phase rules; returns the start with any warning. */
function checkStep(session: RunSession, start: RunStart): RunStart {
  const { run, stepper, scales, reporter, writer } = session;
  if (start.resumed) return start;
  const { integrator } = run;
  const fixed = checkFixedStep(stepper, { safety: integrator.safety, maxDlnA: integrator.maxDlnA, fixedStep: integrator.fixedStep }, scales);
  if (!fixed || fixed.ratio <= FIXED_STEP_FACTOR) return start;
  if (!run.config.integrator.allow_large_fixed_step) {
    throw new ConfigError("integrator.fixed_step", `${fixed.text.replace(/^integrator\.fixed_step = /, "")}; lower it, or set integrator.allow_large_fixed_step = true to run it anyway`);
  }
  reporter.warn(fixed.text);
  writer.log(`warning: ${fixed.text}`);
  return { ...start, warnings: [...start.warnings, fixed.text] };
}

/** The sums the plug-ins asked for, of the stepper's current state (`kinetic`: measured in the last drift, or now). */
function measuredSums(session: RunSession, kineticNow: boolean): MeasuredSums {
  const { plugins, stepper } = session;
  const sums: { -readonly [K in keyof MeasuredSums]: MeasuredSums[K] } = {};
  if (plugins.measures("kinetic")) sums.kinetic = kineticNow ? stepper.kineticTilde() : stepper.midKineticTilde;
  if (plugins.measures("moments")) sums.moments = stepper.moments();
  if (plugins.measures("overlaps")) sums.overlaps = plugins.fields.map((_, i) => {
      if (!plugins.overlapWanted(i + 1)) return [Number.NaN, Number.NaN] as const; // of a plug-in that did not ask
      const o = stepper.fieldOverlap(plugins.base + i + 1); // both fields current first (changes later steps at round-off only)
      return [o.re, o.im] as const;
    });
  return sums;
}

function startPlugins(session: RunSession, start: RunStart): void {
  const { stepper, plugins, background } = session;
  if (plugins.measures("kinetic")) stepper.trackKinetic = true;
  const facts = { step: start.steps, t: stepper.time, a: background.scaleFactor(stepper.time), mass0: start.mass0, resumed: start.resumed !== undefined };
  plugins.start(session.context, { ...facts, sums: measuredSums(session, true) });
}

/** Advance to the end: plug-ins, rows, snapshots, checkpoints and progress after every step. */
/** `what()`, or `otherwise` when it fails to write a file. */
function attemptWrite<T>(what: () => T, otherwise: T): T {
  try {
    return what();
  } catch (e) {
    if (!writeFailureReason(e)) throw e;
    return otherwise;
  }
}

async function loop(session: RunSession, start: RunStart, recorder: RunRecorder): Promise<{ result: EvolveResult; failedWrite: boolean }> {
  const { run, stepper, writer, reporter } = session;
  const snapshotTimes = new Set(run.output.snapshotTimes);
  let lastRecorded = start.steps;
  const progress = progressReporter(session);
  reporter.phase(start.resumed ? `evolving (resumed at step ${start.steps})` : "evolving");
  let current = start.steps;
  const onStep = (s: SplitStepper, info: StepInfo): void => {
    current = info.step;
    const t = s.time;
    const facts = { step: info.step, t, dt: info.dt, a: session.background.scaleFactor(t), drift: s.lastDrift, kick: s.lastKick };
    session.plugins.afterStep({ ...facts, sums: measuredSums(session, false) });
    const atEnd = info.limiter === "end";
    if (info.step % run.output.timeseriesEvery === 0 || atEnd) {
      recorder.row(info.step, info.dt, info.limiter);
      lastRecorded = info.step;
    }
    const byCount = run.output.snapshotEvery !== undefined && info.step % run.output.snapshotEvery === 0;
    if (byCount || (info.landed && snapshotTimes.has(t)) || atEnd) recorder.snapshot(info.step);
    if (info.step % run.output.checkpointEvery === 0 && !atEnd && !extensionPoint) recorder.checkpoint(info.step);
    progress(info, atEnd);
  };
  // The checkpoint before the steps the end time shortened stays the run's last one: a later end
  // (psibox extend) continues from it exactly as a run that had that end from the start.
  let extensionPoint = false;
  const beforeEndStep = (_: SplitStepper, steps: number): void => {
    if (extensionPoint) return;
    recorder.checkpoint(steps);
    extensionPoint = true;
  };
  const { integrator } = run;
  // the run loop holds the first species' mass; every later species' own mass is held the same way
  const speciesGuard = (s: SplitStepper) => speciesMassProblem(s, run.species.map((sp) => sp.name), start.speciesMass0, integrator.massTolerance);
  let result: EvolveResult;
  try {
    result = await evolveAsync(
      stepper,
      { safety: integrator.safety, maxDlnA: integrator.maxDlnA, fixedStep: integrator.fixedStep },
      { endTime: run.span.endTime, stops: run.output.snapshotTimes, massTolerance: integrator.massTolerance, maxSteps: integrator.maxSteps },
      { onStep, beforeEndStep, guard: (s) => fieldProblem(s, session.scales) ?? speciesGuard(s) ?? collapseProblem(s, session.scales, run), formatTime: (t) => session.scales.formatTime(t), ...(session.options.stopRequested ? { stopRequested: session.options.stopRequested } : {}) },
      { steps: start.steps, mass0: start.mass0 },
    );
  } catch (e) {
    // a full disk (or another write failure) stops the run; the last checkpoint, written atomically, stays intact
    const why = writeFailureReason(e);
    if (!why) throw e;
    const next = fs.existsSync(session.paths.checkpoint) ? "the last checkpoint is intact: free space, then continue with psibox run --resume" : "no checkpoint was written yet: free space and run again";
    const reason = `after step ${current}: ${why}; ${next}`;
    attemptWrite(() => writer.log(`stopped: ${reason}`), undefined);
    return { result: { status: "stopped", reason, steps: current }, failedWrite: true };
  }
  if (result.status === "stopped") {
    if (result.steps > lastRecorded) recorder.row(result.steps, 0, "stop");
    writer.log(`stopped: ${result.reason}`);
    recorder.checkpoint(result.steps);
    if (start.resumed || result.steps > 0) recorder.snapshot(result.steps);
  } else {
    writer.log(`completed after ${result.steps} steps`);
  }
  return { result, failedWrite: false };
}

/** Progress at most every 200 ms (and at the end): the fraction of the span in t, or in ln a. */
function progressReporter(session: RunSession): (info: StepInfo, atEnd: boolean) => void {
  const { background, expanding, scales, reporter } = session;
  const { startTime, endTime } = session.run.span;
  const lnA = (t: number) => Math.log(background.scaleFactor(t) / background.scaleFactor(startTime));
  const fraction = (t: number): number => (expanding ? lnA(t) / lnA(endTime) : (t - startTime) / (endTime - startTime));
  const u = scales.timeUnit;
  let lastReport = 0;
  return (info, atEnd) => {
    const now = performance.now();
    if (now - lastReport <= 200 && !atEnd) return;
    lastReport = now;
    const t = session.stepper.time;
    const where = expanding ? `z = ${formatNumber(1 / background.scaleFactor(t) - 1, 4)}` : `t = ${formatNumber(scales.time(t), 4)} ${u}`;
    reporter.progress(fraction(t), `step ${info.step}, ${where}, dt = ${formatNumber(scales.time(info.dt))} ${u} (${info.limiter})`);
  };
}

function summaryOf(session: RunSession, start: RunStart, result: EvolveResult, snapshots: number, parts: Record<string, unknown>): RunSummary {
  const { run, stepper, background, expanding, scales } = session;
  const point = (t: number) => {
    const a = background.scaleFactor(t);
    // round-off removed: a run that ends at 100 Myr or z = 11 says so, not 99.99999999999999
    return { t: tidy(scales.time(t)), a: tidy(a), z: expanding ? tidy(1 / a - 1) : null };
  };
  const initialOnly = session.options.initialOnly === true;
  return {
    name: run.name,
    status: result.status,
    ...(result.reason ? { reason: result.reason } : {}),
    steps: result.steps,
    wall_time_s: tidy(start.wallBefore + (performance.now() - session.wallStart) / 1000),
    time_unit: scales.timeUnit,
    start: point(run.span.startTime),
    end: point(initialOnly ? run.span.startTime : stepper.time),
    mass_drift: initialOnly ? 0 : Math.abs(stepper.mass - start.mass0) / start.mass0,
    snapshots,
    ...(start.resumed ? { resumed_from_step: start.resumed.steps } : {}),
    ...(!initialOnly && start.relaxation ? { relaxation: start.relaxation } : {}),
    ...parts,
    ...(start.warnings.length ? { warnings: start.warnings } : {}),
    memory: { estimate_bytes: session.memory.total, address_space_estimate_bytes: session.memory.addressSpace, peak_rss_bytes: process.resourceUsage().maxRSS * 1024 },
  };
}

/** Create a run's output folder; refuse to reuse a folder that holds a run unless `force`. */
export function prepareOutputDir(dir: string, force: boolean): void {
  takeRunFolder(dir, { force }).lock.release();
}
