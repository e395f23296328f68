/**
 * psibox ensemble: a truncated-Wigner ensemble of a run. The classical
 * start is built once; the members (start + vacuum noise, noise.ts) and the
 * classical reference are advanced on a pool of workers (pool.ts) and kept
 * in the ensemble folder (store.ts); the reduction (reduce.ts) runs each
 * time the completed members double and at the end, so series.csv,
 * fields.h5 and summary.json exist while the ensemble grows. Given a
 * companion runner, the classical companion (companion.ts) runs first and
 * each reduction is compared with its predictions (comparison.ts).
 */
import path from "node:path";
import { Grid } from "../grid/grid.js";
import { makePoissonSolver } from "../fields/poisson.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { buildInitialField } from "../initial-conditions/build.js";
import { snapshotInitialField } from "../simulation/snapshot-start.js";
import { OutputScales } from "../simulation/scales.js";
import { silentReporter, type RunReporter } from "../simulation/session.js";
import type { ResolvedRun } from "../config/resolve.js";
import { resolveEnsemble, type ResolvedEnsemble } from "../config/resolve-ensemble.js";
import { resolvedConfigToml, sha256 } from "../config/serialize.js";
import { loadHdf5 } from "../io/h5.js";
import { EnsembleStore, type EnsembleIdentity } from "./store.js";
import { runMembers } from "./pool.js";
import { reduceEnsemble, type EnsembleReduction } from "./reduce.js";
import { writeEnsembleOutputs, writeSummary } from "./outputs.js";
import { summaryOf } from "./summary.js";
import { checkEnsembleModel, checkEnsembleSize, validityWarning } from "./guards.js";
import type { MemberSetup } from "./member.js";
import { companionRun, companionSeries, type CompanionRunner, type CompanionSeries } from "./companion.js";
import { compareEnsemble, type Comparison } from "./comparison.js";
import { comparisonSummary } from "./comparison-output.js";
import { REDUCTION_FILES } from "./outputs.js";
import { recordOwned } from "../simulation/run-manifest.js";

/** Options of an ensemble. */
export interface EnsembleOptions {
  /** Worker threads. */
  readonly workers: number;
  /** Replace an ensemble of other settings in the folder. */
  readonly force?: boolean;
  readonly reporter?: RunReporter;
  /** Checked as members end; a reason stops the ensemble (the members done are kept). */
  readonly stopRequested?: () => string | undefined;
  /** The ensemble folder. @default the run's output folder + "/ensemble" */
  readonly dir?: string;
  /** Runs the classical companion (app/ensemble-companion.ts); absent: no comparison. */
  readonly companion?: CompanionRunner;
  /**
   * One task of several sharing the members (a Slurm array): advance the
   * members j with j mod count = task (task 0 also the classical reference)
   * into a folder set up before (prepareEnsemble); no companion, no reduction.
   */
  readonly share?: { readonly task: number; readonly count: number };
  /** Advance nothing: reduce the members the folder holds (the collect step of an array). */
  readonly reduceOnly?: boolean;
}

/** How an ensemble ended. */
export interface EnsembleResult {
  readonly status: "completed" | "stopped";
  readonly reason?: string;
  readonly dir: string;
  readonly reduction: EnsembleReduction | undefined;
  /** The comparison with the companion's predictions (with a companion runner, once reduced). */
  readonly comparison?: Comparison;
  readonly summary: Record<string, unknown>;
  readonly warnings: readonly string[];
}

/** The classical start, the particle number and the sample times. */
function prepare(run: ResolvedRun, settings: ResolvedEnsemble, reporter: RunReporter): { setup: MemberSetup; grid: Grid; particles: number; warnings: string[] } {
  const grid = new Grid(run.grid.cells, run.grid.lengths);
  const background = makeBackground(run.background);
  const gravity = makePoissonSolver(grid, run.grid.gravity, run.grid.poisson);
  const into = new Float64Array(2 * grid.size);
  if (run.initial.kind === "ground-state") reporter.phase("relaxing the ground state");
  const initial = run.initial.kind === "snapshot" ? snapshotInitialField(run, grid, into) : buildInitialField(run.initial, grid, background, run.span.startTime, gravity, undefined, into);
  let mass = 0;
  for (let i = 0; i < initial.psi.length; i++) mass += (initial.psi[i] as number) ** 2;
  mass *= grid.cellVolume;
  const scales = new OutputScales(run);
  const particles = settings.particles === "physical" ? (mass * scales.units.massKg) / run.particleMassKg : settings.particles;
  const { startTime, endTime } = run.span;
  const times = Array.from({ length: settings.samples + 1 }, (_, i) => (i === settings.samples ? endTime : startTime + ((endTime - startTime) * i) / settings.samples));
  const warnings = [...(initial.warnings ?? [])];
  const validity = validityWarning(particles, grid.size);
  if (validity) warnings.push(validity);
  return { setup: { run, start: Float64Array.from(initial.psi), times, particleMass: mass / particles, seed: settings.seed }, grid, particles, warnings };
}

/** The identity of the ensemble: the run config without [ensemble], N, seed, cells and times. */
function identityOf(run: ResolvedRun, setup: MemberSetup, particles: number): EnsembleIdentity {
  const { ensemble: _settings, ...config } = run.config;
  return { config_sha256: sha256(resolvedConfigToml({ ...run, config: config as ResolvedRun["config"] })), cells: setup.start.length / 2, particles, seed: setup.seed, times_code: setup.times };
}

/** What an ensemble run and its folder need, checked and set up (an array task only joins the folder). */
function begin(run: ResolvedRun, options: Pick<EnsembleOptions, "force" | "dir" | "reporter" | "share">) {
  const reporter = options.reporter ?? silentReporter;
  const settings = resolveEnsemble(run.config);
  checkEnsembleModel(run);
  const dir = options.dir ?? path.join(run.outputDir, "ensemble");
  checkEnsembleSize(settings, new Grid(run.grid.cells, run.grid.lengths), settings.samples + 1, dir);
  const { setup, grid, particles, warnings } = prepare(run, settings, reporter);
  for (const w of warnings) reporter.warn(w);
  const identity = identityOf(run, setup, particles);
  if (options.share) return { reporter, settings, dir, setup, grid, particles, warnings, store: EnsembleStore.join(dir, identity) };
  const { store } = EnsembleStore.open(dir, identity, resolvedConfigToml(run), options.force === true);
  recordOwned(dir, [...REDUCTION_FILES]);
  return { reporter, settings, dir, setup, grid, particles, warnings, store };
}

/**
 * Set up the folder of the ensemble of `run` (its identity and config) and
 * advance nothing: what emitting a Slurm array does once, before its tasks
 * add members to the folder at the same time.
 */
export async function prepareEnsemble(run: ResolvedRun, options: Pick<EnsembleOptions, "force" | "dir" | "reporter">): Promise<{ dir: string; settings: ResolvedEnsemble; kept: number }> {
  await loadHdf5();
  const { dir, settings, store } = begin(run, options);
  return { dir, settings, kept: store.completed().filter((j) => j < settings.members).length };
}

/** The tasks of this call: the members still missing (of this share), and the reference first when it is missing. */
function tasksOf(store: EnsembleStore, members: number, options: EnsembleOptions): { tasks: (number | null)[]; done: Set<number> } {
  const done = new Set(store.completed().filter((j) => j < members));
  if (options.reduceOnly) return { tasks: [], done };
  const { task, count } = options.share ?? { task: 0, count: 1 };
  const mine = Array.from({ length: members }, (_, j) => j).filter((j) => j % count === task && !done.has(j));
  return { tasks: [...(store.hasReference() || task !== 0 ? [] : [null]), ...mine], done };
}

/** Why a reduction of the members in the folder is incomplete (undefined: every member is there). */
function missingReason(done: ReadonlySet<number>, members: number, hasReference: boolean): string | undefined {
  if (!hasReference) return "the classical reference is missing (array task 0 has not finished)";
  return done.size < members ? `${members - done.size} of ${members} members are missing (their tasks failed, were cancelled or are still running)` : undefined;
}

/** Run (or continue) the ensemble of `run`, or one array task's share of it, or only its reduction. */
export async function runEnsemble(run: ResolvedRun, options: EnsembleOptions): Promise<EnsembleResult> {
  await loadHdf5();
  const { reporter, settings, dir, setup, grid, particles, warnings, store } = begin(run, options);
  const scales = new OutputScales(run);
  let series: CompanionSeries | undefined;
  const companion = options.companion && !options.share ? companionRun(run, dir) : undefined;
  if (companion && options.companion) {
    const c = await companionSeries(companion, options.companion, reporter, (t) => scales.codeTime(t), options.stopRequested);
    if (c.stopped !== undefined) return { status: "stopped", reason: c.stopped, dir, reduction: undefined, summary: summaryOf(run, settings, particles, grid.size, undefined, scales, "stopped", c.stopped, warnings), warnings };
    series = c.series;
  }
  const out = { dir, scales, cells: run.grid.cells, particleMass: setup.particleMass, cellVolume: grid.cellVolume };
  const reduction = { particleMass: setup.particleMass, cellVolume: grid.cellVolume, resamples: settings.resamples, seed: settings.seed, level: settings.departure, grid };
  const { tasks, done } = tasksOf(store, settings.members, options);
  const hasReference = (): boolean => store.hasReference();
  let reduced: EnsembleReduction | undefined;
  let compared: Record<string, unknown> | undefined;
  let comparison: Comparison | undefined;
  const reduce = (status: string, reason?: string): void => {
    const members = [...done].sort((a, b) => a - b);
    if (members.length < 2 || !hasReference() || options.share) return;
    reduced = reduceEnsemble(store, reduction, members);
    comparison = series ? compareEnsemble(reduced, series, particles, run.breakdown.depletionFraction) : undefined;
    compared = comparison && companion ? comparisonSummary(comparison, scales, companion.breakdown.probes) : undefined;
    writeEnsembleOutputs(reduced, out, summaryOf(run, settings, particles, grid.size, reduced, scales, status, reason, warnings, compared), comparison);
  };
  const what = options.share ? `ensemble, array task ${options.share.task} of ${options.share.count}` : "ensemble";
  reporter.phase(done.size > 0 ? `${what} (continuing: ${done.size} of ${settings.members} members kept)` : what);
  let nextReduction = Math.max(2, 2 ** Math.ceil(Math.log2(Math.max(2, done.size + 1))));
  const total = tasks.length;
  let finished = 0;
  const stopped = await runMembers(setup, dir, tasks, options.workers, {
    done: (index) => {
      finished++;
      if (index !== null) done.add(index);
      if (done.size >= nextReduction && done.size < settings.members) {
        reduce("running");
        nextReduction *= 2;
      }
      reporter.progress(finished / Math.max(1, total), `${done.size} of ${settings.members} members`);
    },
    progress: (running) => {
      // a member at the end of its span is not done until it is saved: 100% waits for the last one's
      const partial = [...running.values()].reduce((s, f) => s + Math.min(f, 0.999), 0);
      reporter.progress((finished + partial) / Math.max(1, total), `${done.size} of ${settings.members} members, ${running.size} running`);
    },
    ...(options.stopRequested ? { stopRequested: options.stopRequested } : {}),
  });
  reporter.endPhase();
  const reason = stopped ?? (options.reduceOnly ? missingReason(done, settings.members, hasReference()) : undefined);
  const status = reason ? "stopped" : "completed";
  reduce(status, reason);
  const summary = summaryOf(run, settings, particles, grid.size, reduced, scales, status, reason, warnings, compared);
  if (!reduced && !options.share) writeSummary(dir, summary);
  return { status, ...(reason ? { reason } : {}), dir, reduction: reduced, ...(comparison ? { comparison } : {}), summary, warnings };
}
