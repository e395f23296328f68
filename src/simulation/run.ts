/**
 * One run from a resolved config: build the grid, background, gravity and
 * initial field (or restore a checkpoint), advance to the end, and write the
 * run folder (see outputs.ts and the README's output layout). The CLI and
 * the tests call this same function; progress goes to a reporter.
 */
import { formatNumber } from "../core/format.js";
import fs from "node:fs";
import path from "node:path";
import { Grid } from "../grid/grid.js";
import { makePoissonSolver } from "../fields/poisson.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { SplitStepper } from "../integrators/split-step.js";
import { ThreadedStepper } from "../integrators/threaded-step.js";
import { buildInitialField } from "../initial-conditions/build.js";
import { CsvWriter } from "../io/csv-writer.js";
import { cleanStaleTemporaries, writeFileAtomic } from "../io/atomic.js";
import { loadHdf5 } from "../io/h5.js";
import { readSnapshot, type CheckpointState } from "../io/snapshot.js";
import type { ResolvedRun } from "../config/resolve.js";
import { resolvedConfigToml, sha256 } from "../config/serialize.js";
import { InputError } from "../core/errors.js";
import { evolveAsync, type StepInfo } from "./evolve.js";
import { OutputScales } from "./scales.js";
import { RunWriter, runPaths } from "./outputs.js";
import { SidecarTracker } from "../quantum/tracker.js";
import { SIDECAR_COLUMNS, clocksRecord, sidecarRow, type ClockReport } from "./sidecar-report.js";

/** Where a run reports what it is doing. */
export interface RunReporter {
  /** A new phase of work begins ("relaxing the ground state", "evolving"). */
  phase(text: string): void;
  /** Progress within the phase, fraction in [0, 1], with a short status text. */
  progress(fraction: number, status: string): void;
  /** The phase ended. */
  endPhase(): void;
  /** Something the user should know, that does not stop the run. */
  warn(text: string): void;
}

/** A reporter that says nothing. */
export const silentReporter: RunReporter = { phase() {}, progress() {}, endPhase() {}, warn() {} };

/** What a run ends with (also written to summary.json). */
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
  readonly clocks?: readonly ClockReport[];
  readonly warnings?: readonly string[];
}

/** Options of a run. */
export interface RunOptions {
  readonly reporter?: RunReporter;
  /** Checked before every step; return a reason to stop (e.g. "interrupted (SIGINT)"). */
  readonly stopRequested?: () => string | undefined;
  /** Continue from the run folder's checkpoint instead of starting afresh. */
  readonly resume?: boolean;
  /** Folder that relative paths in the written config are taken from. @default process.cwd() */
  readonly cwd?: string;
  /** Write the initial state (snapshot 0, and the spectrum table of a cosmological field) and stop. */
  readonly initialOnly?: boolean;
}

/** Run a resolved config; the output folder must exist (see prepareOutputDir). */
export async function runSimulation(run: ResolvedRun, options: RunOptions = {}): Promise<RunSummary> {
  await loadHdf5();
  const reporter = options.reporter ?? silentReporter;
  const wallStart = performance.now();
  const scales = new OutputScales(run);
  const grid = new Grid(run.grid.cells, run.grid.lengths);
  const background = makeBackground(run.background);
  const gravity = makePoissonSolver(grid, run.grid.gravity, run.grid.poisson);
  const expanding = background.kind !== "static";
  const { startTime, endTime } = run.span;
  const paths = runPaths(run.outputDir);
  cleanStaleTemporaries(run.outputDir);
  cleanStaleTemporaries(paths.snapshots);

  const configText = options.resume ? fs.readFileSync(paths.config, "utf8") : resolvedConfigToml(run, options.cwd ?? process.cwd());
  if (!options.resume) writeFileAtomic(paths.config, configText);
  const writer = new RunWriter(run, scales, configText, sha256(configText));
  const { threads, fft } = run.integrator;
  const stepper = threads > 1 ? new ThreadedStepper(grid, background, gravity, threads, fft) : new SplitStepper(grid, background, gravity, fft);
  try {
    return await evolveRun(run, options, { scales, grid, background, gravity, expanding, startTime, endTime, paths, writer, stepper, reporter, wallStart, configText });
  } finally {
    stepper.close();
  }
}

interface RunParts {
  readonly scales: OutputScales;
  readonly grid: Grid;
  readonly background: ReturnType<typeof makeBackground>;
  readonly gravity: ReturnType<typeof makePoissonSolver>;
  readonly expanding: boolean;
  readonly startTime: number;
  readonly endTime: number;
  readonly paths: ReturnType<typeof runPaths>;
  readonly writer: RunWriter;
  readonly stepper: SplitStepper;
  readonly reporter: RunReporter;
  readonly wallStart: number;
  readonly configText: string;
}

async function evolveRun(run: ResolvedRun, options: RunOptions, parts: RunParts): Promise<RunSummary> {
  const { scales, grid, background, gravity, expanding, startTime, endTime, paths, writer, stepper, reporter, wallStart } = parts;

  let resumed: CheckpointState | undefined;
  let relaxation: RunSummary["relaxation"];
  const warnings: string[] = [];
  if (options.resume) {
    resumed = readSnapshot(paths.checkpoint, true).state as CheckpointState;
    stepper.restoreState(resumed.psiCode, resumed.phiCode, resumed.timeCode, resumed.massCode);
    writer.log(`resumed from the checkpoint at step ${resumed.steps}, t = ${scales.formatTime(resumed.timeCode)}`);
  } else {
    writer.log(`started ${run.name}: ${run.grid.cells.join("×")} cells, ${run.initial.kind}`);
    if (run.initial.kind === "ground-state") reporter.phase("relaxing the ground state");
    const initial = buildInitialField(
      run.initial,
      grid,
      background,
      startTime,
      gravity,
      (info) => reporter.progress(Math.min(1, info.iteration / 400), `iteration ${info.iteration}`),
      stepper.rawPsi,
    );
    if (initial.relaxation) {
      reporter.endPhase();
      relaxation = { iterations: initial.relaxation.iterations, converged: initial.relaxation.converged };
      writer.log(`ground state relaxed in ${relaxation.iterations} iterations (converged: ${relaxation.converged})`);
    }
    for (const w of initial.warnings ?? []) {
      warnings.push(w);
      reporter.warn(w);
      writer.log(`warning: ${w}`);
    }
    if (initial.powerTable) writeFileAtomic(paths.power, initial.powerTable);
    stepper.setState(initial.psi, startTime);
  }
  const mass0 = resumed?.mass0Code ?? stepper.mass;
  const stepsBefore = resumed?.steps ?? 0;
  let snapshotsWritten = resumed?.snapshotsWritten ?? 0;
  const wallBefore = resumed?.wallTimeS ?? 0;
  const particleMassCode = run.particleMassKg / scales.units.massKg;
  const tracker = run.sidecar.enabled
    ? new SidecarTracker(stepper, particleMassCode, mass0 / particleMassCode, run.sidecar.squeezingDb, startTime)
    : undefined;
  if (tracker && resumed?.sidecar) tracker.restore(resumed.sidecar);

  const u = scales.timeUnit;
  const energyUnit = "Msun_km2_s2";
  const columns = [
    "step",
    `t_${u}`,
    ...(expanding ? ["a", "z"] : []),
    `dt_${u}`,
    "limiter",
    "mass_Msun",
    `kinetic_${energyUnit}`,
    `potential_${energyUnit}`,
    `total_${energyUnit}`,
    "max_density_Msun_kpc3",
    ...(tracker ? SIDECAR_COLUMNS : []),
  ];
  const limiterColumn = columns.indexOf("limiter");
  const series = resumed
    ? CsvWriter.resume(paths.timeseries, columns, (cells) => Number(cells[0]) < stepsBefore || (Number(cells[0]) === stepsBefore && cells[limiterColumn] !== "stop"))
    : new CsvWriter(paths.timeseries, columns);
  const record = (step: number, dt: number, limiter: string): void => {
    const a = background.scaleFactor(stepper.time);
    // K = ½∫|∇ψ|²/a² (spectral, on the step's own transforms), W = ½∫ρφ/a
    const K = stepper.kineticTilde() / (a * a);
    const moments = stepper.moments();
    const W = (0.5 / a) * moments.rhoPhi * grid.cellVolume;
    series.row([
      step,
      scales.time(stepper.time),
      ...(expanding ? [a, 1 / a - 1] : []),
      scales.time(dt),
      limiter,
      scales.massMsun(stepper.mass),
      scales.energy(K),
      scales.energy(W),
      scales.energy(K + W),
      scales.density(moments.maxRho),
      ...(tracker ? sidecarRow(tracker, a, scales.units.timeS) : []),
    ]);
  };
  const checkpoint = (steps: number): void => {
    series.flush();
    writer.writeCheckpoint(stepper, {
      mass0Code: mass0,
      steps,
      wallTimeS: wallBefore + (performance.now() - wallStart) / 1000,
      snapshotsWritten,
      ...(tracker ? { sidecar: tracker.save() } : {}),
    });
  };
  if (!resumed) {
    record(0, 0, "start");
    writer.writeSnapshot(stepper, 0, snapshotsWritten++);
  }
  if (options.initialOnly) {
    series.close();
    writer.log("initial conditions written");
    return {
      name: run.name,
      status: "completed",
      steps: 0,
      wall_time_s: (performance.now() - wallStart) / 1000,
      time_unit: u,
      start: { t: scales.time(startTime), a: background.scaleFactor(startTime), z: expanding ? 1 / background.scaleFactor(startTime) - 1 : null },
      end: { t: scales.time(startTime), a: background.scaleFactor(startTime), z: expanding ? 1 / background.scaleFactor(startTime) - 1 : null },
      mass_drift: 0,
      snapshots: 1,
      ...(warnings.length ? { warnings } : {}),
    };
  }

  const span = expanding ? Math.log(background.scaleFactor(endTime) / background.scaleFactor(startTime)) : endTime - startTime;
  const progressOf = (t: number): number =>
    expanding ? Math.log(background.scaleFactor(t) / background.scaleFactor(startTime)) / span : (t - startTime) / span;
  const snapshotTimes = new Set(run.output.snapshotTimes);
  let lastRecorded = stepsBefore;
  let lastReport = 0;
  reporter.phase(resumed ? `evolving (resumed at step ${stepsBefore})` : "evolving");
  const onStep = (s: SplitStepper, info: StepInfo): void => {
    tracker?.afterStep(s);
    const atEnd = info.limiter === "end";
    if (info.step % run.output.timeseriesEvery === 0 || atEnd) {
      record(info.step, info.dt, info.limiter);
      lastRecorded = info.step;
    }
    const byCount = run.output.snapshotEvery !== undefined && info.step % run.output.snapshotEvery === 0;
    const byTime = info.landed && snapshotTimes.has(s.time);
    if (byCount || byTime || atEnd) writer.writeSnapshot(s, info.step, snapshotsWritten++);
    if (info.step % run.output.checkpointEvery === 0 && !atEnd) checkpoint(info.step);
    const now = performance.now();
    if (now - lastReport > 200 || atEnd) {
      lastReport = now;
      const a = background.scaleFactor(s.time);
      const where = expanding ? `z = ${formatNumber(1 / a - 1, 4)}` : `t = ${formatNumber(scales.time(s.time), 4)} ${u}`;
      reporter.progress(progressOf(s.time), `step ${info.step}, ${where}, dt = ${formatNumber(scales.time(info.dt))} ${u} (${info.limiter})`);
    }
  };
  const result = await evolveAsync(
    stepper,
    { safety: run.integrator.safety, maxDlnA: run.integrator.maxDlnA, fixedStep: run.integrator.fixedStep },
    { endTime, stops: run.output.snapshotTimes, massTolerance: run.integrator.massTolerance, maxSteps: run.integrator.maxSteps },
    { onStep, formatTime: (t) => scales.formatTime(t), ...(options.stopRequested ? { stopRequested: options.stopRequested } : {}) },
    { steps: stepsBefore, mass0 },
  );
  if (result.status === "stopped") {
    if (result.steps > lastRecorded) record(result.steps, 0, "stop");
    writer.log(`stopped: ${result.reason}`);
    checkpoint(result.steps);
    writer.writeSnapshot(stepper, result.steps, snapshotsWritten++);
  } else {
    writer.log(`completed after ${result.steps} steps`);
  }
  series.close();
  reporter.endPhase();
  let clocks: ClockReport[] | undefined;
  if (tracker) {
    const record = clocksRecord(tracker, background, scales.units.timeS, (endTime - startTime) * scales.units.timeS);
    clocks = record.clocks;
    writeFileAtomic(paths.clocks, JSON.stringify(record, null, 2) + "\n");
  }

  const point = (t: number) => {
    const a = background.scaleFactor(t);
    return { t: scales.time(t), a, z: expanding ? 1 / a - 1 : null };
  };
  const summary: RunSummary = {
    name: run.name,
    status: result.status,
    ...(result.reason ? { reason: result.reason } : {}),
    steps: result.steps,
    wall_time_s: wallBefore + (performance.now() - wallStart) / 1000,
    time_unit: u,
    start: point(startTime),
    end: point(stepper.time),
    mass_drift: Math.abs(stepper.mass - mass0) / mass0,
    snapshots: snapshotsWritten,
    ...(resumed ? { resumed_from_step: resumed.steps } : {}),
    ...(relaxation ? { relaxation } : {}),
    ...(clocks ? { clocks } : {}),
    ...(warnings.length ? { warnings } : {}),
  };
  writeFileAtomic(paths.summary, JSON.stringify(summary, null, 2) + "\n");
  return summary;
}

/** Create a run's output folder; refuse to reuse a folder that holds a run unless `force`. */
export function prepareOutputDir(dir: string, force: boolean): void {
  if (fs.existsSync(dir)) {
    if (!fs.statSync(dir).isDirectory()) throw new InputError(`output path ${dir} exists and is not a folder`);
    const p = runPaths(dir);
    const taken = [p.summary, p.timeseries, p.config, p.checkpoint].some((f) => fs.existsSync(f));
    if (taken && !force) {
      throw new InputError(`output folder ${dir} already holds a run; pass --force to overwrite its files, or set output.dir`);
    }
    if (force) {
      // remove only what psibox itself writes, never other files
      for (const f of [p.summary, p.timeseries, p.checkpoint, p.log, p.clocks, p.power]) fs.rmSync(f, { force: true });
      if (fs.existsSync(p.snapshots)) {
        for (const name of fs.readdirSync(p.snapshots)) if (/^snap_\d{5}\.h5$/.test(name)) fs.rmSync(path.join(p.snapshots, name));
      }
    }
  }
  fs.mkdirSync(dir, { recursive: true });
}
