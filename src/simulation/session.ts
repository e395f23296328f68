/**
 * The parts of one run that every phase of it shares (grid, background,
 * gravity, stepper, writer, plug-ins), and the run's start: the initial
 * field built in place, or the checkpoint it resumes from.
 */
import { RelaxationCollapse } from "../ground-state/imaginary-time.js";
import { collapseVerdict } from "./collapse-guard.js";
import { M_SUN_KG } from "../physics/constants.js";
import fs from "node:fs";
import { Grid } from "../grid/grid.js";
import { makePoissonSolver, type PoissonSolver } from "../fields/poisson.js";
import { makeBackground, type Background } from "../physics/cosmology/background.js";
import { SplitStepper } from "../integrators/split-step.js";
import { ThreadedStepper } from "../integrators/threaded-step.js";
import type { FieldKind } from "../integrators/extra-fields.js";
import { buildInitialField, type InitialField } from "../initial-conditions/build.js";
import { snapshotInitialField } from "./snapshot-start.js";
import { speciesInitialField } from "./species-start.js";
import { speciesContacts } from "./species-energies.js";
import { cleanStaleTemporaries, writeFileAtomic } from "../io/atomic.js";
import { readCheckpoint, type CheckpointState } from "../io/snapshot.js";
import { checkMemory, describeEstimate, formatBytes, type MemoryEstimate } from "./memory-estimate.js";
import type { ResolvedRun } from "../config/resolve.js";
import { resolvedConfigToml, sha256 } from "../config/serialize.js";
import { OutputScales } from "./scales.js";
import { RunWriter, runPaths, speciesMasses } from "./outputs.js";
import { PluginSet } from "./plugin-set.js";
import { verifyCheckpoint } from "./resume-check.js";
import type { RunContext, RunPlugin, PluginFields } from "./plugin.js";
import { InputError, NumericsError } from "../core/errors.js";

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

/** Options of a run. */
export interface RunOptions {
  readonly reporter?: RunReporter;
  /** Checked before every step; return a reason to stop (e.g. "interrupted (SIGINT)"). */
  readonly stopRequested?: () => string | undefined;
  /** Continue from the run folder's checkpoint instead of starting afresh. */
  readonly resume?: boolean;
  /** Write the initial state (snapshot 0, and the spectrum table of a cosmological field) and stop. */
  readonly initialOnly?: boolean;
  /** Plug-ins of the run loop (see plugin.ts), called in this order. */
  readonly plugins?: readonly RunPlugin[];
  /**
   * With `resume`: the folder's config.toml with a later end (psibox extend). It replaces
   * config.toml only once the checkpoint is verified against it, so a refused extension
   * leaves the folder as it was.
   */
  readonly extendedConfig?: string;
}

/** Everything a run's phases share. */
export interface RunSession {
  readonly run: ResolvedRun;
  readonly options: RunOptions;
  readonly reporter: RunReporter;
  readonly scales: OutputScales;
  readonly grid: Grid;
  readonly background: Background;
  readonly gravity: PoissonSolver;
  readonly expanding: boolean;
  readonly paths: ReturnType<typeof runPaths>;
  readonly writer: RunWriter;
  readonly stepper: SplitStepper;
  readonly plugins: PluginSet;
  readonly context: RunContext;
  /** performance.now() when this process started the run. */
  readonly wallStart: number;
  /** The memory the run was estimated to need. */
  readonly memory: MemoryEstimate;
}

/** Build a run's parts and write (or, on resume, read) its config.toml. Close `stepper` when done. */
export function openSession(run: ResolvedRun, options: RunOptions): RunSession {
  const wallStart = performance.now();
  const plugins = new PluginSet(options.plugins ?? [], run.species.length);
  const scales = new OutputScales(run);
  const grid = new Grid(run.grid.cells, run.grid.lengths);
  const background = makeBackground(run.background);
  const gravity = makePoissonSolver(grid, run.grid.gravity, run.grid.poisson);
  const paths = runPaths(run.outputDir);
  cleanStaleTemporaries(run.outputDir);
  cleanStaleTemporaries(paths.snapshots);
  const configText = options.extendedConfig ?? (options.resume ? fs.readFileSync(paths.config, "utf8") : resolvedConfigToml(run));
  if (!options.resume) writeFileAtomic(paths.config, configText);
  const writer = new RunWriter(run, scales, configText, sha256(configText));
  const { threads, fft } = run.integrator;
  // the stepper's extra fields: the later species in order, then the plug-ins' fields in the plug-ins' order
  // each species' own contact coefficient g_i (the first one's is the stepper's): it acts on its own density only
  const [contact, ...later] = speciesContacts(run, scales.units);
  const species: FieldKind[] = run.species.map((sp, i) => ({ kind: "species", massRatio: sp.massRatio, contact: later[i]! }));
  const fields: FieldKind[] = [...species, ...plugins.fields.map((f): FieldKind => ({ kind: f.kind }))];
  // refuse a grid that cannot fit before anything is allocated
  const memory = checkMemory({ cells: run.grid.cells, gravity: run.grid.gravity, threads, fft, fields });
  const stepper =
    threads > 1 ? new ThreadedStepper(grid, background, gravity, threads, fft, {}, fields, contact) : new SplitStepper(grid, background, gravity, fft, 1, fields, contact);
  plugins.attach((first, count) => fieldsHandle(stepper, first, count));
  const { startTime, endTime } = run.span;
  const reporter = options.reporter ?? silentReporter;
  const warn = (text: string): void => {
    reporter.warn(text);
    writer.log(`warning: ${text}`);
  };
  const context: RunContext = { grid, background, gravity: run.grid.gravity !== "none", scales, particleMass: run.particleMassKg / scales.units.massKg, startTime, endTime, outputDir: run.outputDir, warn };
  const expanding = background.kind !== "static";
  return { run, options, reporter, scales, grid, background, gravity, expanding, paths, writer, stepper, plugins, context, wallStart, memory };
}

/** A plug-in's view of the stepper's fields first … first + count − 1. */
function fieldsHandle(stepper: SplitStepper, first: number, count: number): PluginFields {
  const at = (j: number): number => {
    if (!(Number.isInteger(j) && j >= 1 && j <= count)) throw new RangeError(`field ${j} of the plug-in does not exist (1 … ${count})`);
    return first + j - 1;
  };
  return {
    count,
    reference: () => stepper.psi,
    mass: () => stepper.mass,
    field: (j) => stepper.field(at(j)),
    set: (j, field) => stepper.setField(at(j), field),
    overlap: (j) => stepper.fieldOverlap(at(j)),
    combine: (j, scale, re, im) => stepper.combineField(at(j), scale, re, im),
  };
}

/** Load a checkpoint's companion fields (they owe ψ's kick); a checkpoint with other fields than the run's is refused. */
function restoreFields(stepper: SplitStepper, state: CheckpointState, file: string): void {
  const fields = state.fieldsCode ?? [];
  if (fields.length !== stepper.extraFields) {
    throw new InputError(`${file}: holds ${fields.length} companion field(s), this run advances ${stepper.extraFields}; resume with the [[species]], [breakdown] and [sidecar] settings the run started with, or start it afresh`);
  }
  // each field owes ψ's kick (tangents) or its own (fields with their own gravity, saved beside it)
  const owed = (i: number): number => state.fieldsOwedKickCode?.[i] ?? Number.NaN;
  fields.forEach((f, i) => stepper.setField(i + 1, f, Number.isFinite(owed(i)) ? owed(i) : (state.owedKickCode ?? 0)));
}

/** Where the run starts: a checkpoint's counters, or a fresh start's relaxation and warnings. */
export interface RunStart {
  readonly resumed?: CheckpointState;
  readonly relaxation?: { readonly iterations: number; readonly converged: boolean };
  readonly warnings: string[];
  readonly mass0: number;
  /** The later species' masses at the start of the run (code units, in order; empty for one species): the mass guard's reference. */
  readonly speciesMass0: readonly number[];
  readonly steps: number;
  readonly snapshotsWritten: number;
  readonly wallBefore: number;
}

/** Load the stepper with the initial field, or with the checkpoint's exact state on resume. */
export function startRun(session: RunSession): RunStart {
  const { run, stepper, writer, scales, paths } = session;
  if (session.options.resume) {
    const saved = readCheckpoint(paths.checkpoint);
    const resumed = saved.state;
    verifyCheckpoint(paths.checkpoint, saved.meta, resumed, { configText: writer.configText, cells: run.grid.cells, startTime: run.span.startTime, endTime: run.span.endTime, scales });
    session.plugins.check(resumed.plugins ?? {}, paths.checkpoint);
    if (session.options.extendedConfig !== undefined) adoptLaterEnd(session, resumed);
    stepper.restoreState(resumed.psiCode, resumed.phiCode, resumed.timeCode, resumed.massCode, resumed.owedKickCode ?? 0);
    restoreFields(stepper, resumed, paths.checkpoint);
    writer.log(`resumed from the checkpoint at step ${resumed.steps}, t = ${scales.formatTime(resumed.timeCode)}; ${memoryLine(session)}`);
    session.plugins.restore(resumed.plugins ?? {}, paths.checkpoint);
    const { mass0Code: mass0, steps, snapshotsWritten, wallTimeS: wallBefore } = resumed;
    // a checkpoint written before the species' start masses were kept: the guard compares with the masses resumed
    const speciesMass0 = resumed.speciesMass0Code ?? speciesMasses(stepper, run.species.length).slice(1);
    return { resumed, warnings: [], mass0, speciesMass0, steps, snapshotsWritten, wallBefore };
  }
  writer.log(`started ${run.name}: ${run.grid.cells.join("×")} cells, ${run.initial.kind}; ${memoryLine(session)}`);
  const reporter = session.reporter;
  if (run.initial.kind === "ground-state") reporter.phase("relaxing the ground state");
  const progress = (info: { iteration: number }) => reporter.progress(Math.min(1, info.iteration / 400), `iteration ${info.iteration}`);
  const initial = run.initial.kind === "snapshot" ? snapshotInitialField(run, session.grid, stepper.rawPsi) : builtField(session, run.initial, progress);
  let relaxation: RunStart["relaxation"];
  if (initial.relaxation) {
    reporter.endPhase();
    relaxation = { iterations: initial.relaxation.iterations, converged: initial.relaxation.converged };
    writer.log(`ground state relaxed in ${relaxation.iterations} iterations (converged: ${relaxation.converged})`);
  }
  const warnings = [...(initial.warnings ?? [])];
  for (const w of warnings) {
    reporter.warn(w);
    writer.log(`warning: ${w}`);
  }
  if (initial.powerTable) writeFileAtomic(paths.power, initial.powerTable);
  warnings.push(...startSpecies(session, progress));
  const base = session.plugins.base;
  session.plugins.fields.forEach((f, i) => {
    if (f.kind === "own-gravity") stepper.setField(base + i + 1, initial.psi.map((v) => v * f.startScale));
  });
  stepper.setState(initial.psi, run.span.startTime);
  const speciesMass0 = speciesMasses(stepper, run.species.length).slice(1);
  return { ...(relaxation ? { relaxation } : {}), warnings, mass0: stepper.mass, speciesMass0, steps: 0, snapshotsWritten: 0, wallBefore: 0 };
}

/** The initial field of a config (not a snapshot); a relaxation that collapsed under an attractive contact term is a NumericsError naming the mass and the critical mass. */
function builtField(session: RunSession, ic: Exclude<ResolvedRun["initial"], { kind: "snapshot" }>, progress: (info: { iteration: number }) => void): InitialField {
  const { run, stepper } = session;
  try {
    return buildInitialField(ic, session.grid, session.background, run.span.startTime, session.gravity, progress, stepper.rawPsi, stepper.contact);
  } catch (e) {
    if (!(e instanceof RelaxationCollapse) || !run.contact) throw e;
    const kg = session.scales.massMsun(e.mass) * M_SUN_KG;
    throw new NumericsError(`${ic.kind === "ground-state" ? "initial.mass" : "initial.soliton"}: no ground state: the relaxation collapsed to the grid's scale under the attractive self-interaction: ${collapseVerdict(kg, session.grid.dims, run.contact, run.particleMassKg, undefined, session.scales.units.toSI(session.grid.lengths[0]!, "length"))}`);
  }
}

/** Build and load the later species' initial fields (extra fields 1 … S); returns their warnings, also reported. */
function startSpecies(session: RunSession, progress: (info: { iteration: number }) => void): string[] {
  const { run, reporter, writer, stepper } = session;
  const warnings: string[] = [];
  run.species.forEach((sp, i) => {
    const relaxing = sp.initial.kind === "ground-state" || (sp.initial.kind === "solitons" && sp.initial.profile === "relaxed");
    if (relaxing) reporter.phase(`relaxing the species ${sp.name}`);
    const built = speciesInitialField(run, sp, i, session.grid, session.gravity, progress);
    if (relaxing) reporter.endPhase();
    if (built.relaxation) writer.log(`species ${sp.name}: ground state relaxed in ${built.relaxation.iterations} iterations (converged: ${built.relaxation.converged})`);
    for (const w of built.warnings ?? []) {
      reporter.warn(w);
      writer.log(`warning: ${w}`);
      warnings.push(w);
    }
    stepper.setField(i + 1, built.psi);
  });
  return warnings;
}

/**
 * An extension verified: summary.json no longer says "completed" (so an
 * extension that stops can be resumed), then config.toml gets the later end.
 */
function adoptLaterEnd(session: RunSession, resumed: CheckpointState): void {
  const { paths, writer, scales, run } = session;
  let summary: Record<string, unknown> = {};
  try {
    summary = JSON.parse(fs.readFileSync(paths.summary, "utf8")) as Record<string, unknown>;
  } catch {
    // no readable summary: the one written below says why the run is not complete
  }
  const reason = `being extended to t = ${scales.formatTime(run.span.endTime)} (psibox extend); continue with psibox run --resume`;
  writeFileAtomic(paths.summary, JSON.stringify({ ...summary, status: "stopped", reason }, null, 2) + "\n");
  writeFileAtomic(paths.config, writer.configText);
  writer.log(`extended to t = ${scales.formatTime(run.span.endTime)} from the checkpoint at step ${resumed.steps}`);
}

/** The memory estimate for run.log. */
function memoryLine(session: RunSession): string {
  return `memory: about ${formatBytes(session.memory.total)} (${describeEstimate(session.memory, session.run.integrator.threads)})`;
}
