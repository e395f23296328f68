/**
 * psibox analyze: diagnostics and pictures of snapshots and runs, in
 * physical units. For each snapshot the tables (snapshot-tables.ts) and the
 * density pictures and P(k) as PNG and SVG; for a run the energies and
 * clocks from the time series, a space–time diagram for 1D runs, and
 * optionally movie frames and a movie.
 */
import fs from "node:fs";
import path from "node:path";
import { readSnapshot, readSnapshotMeta, type Snapshot } from "../io/snapshot.js";
import { checkOneRun } from "../io/run-identity.js";
import { RunTracks } from "./halo-track-table.js";
import { haloFigures } from "./halo-plots.js";
import { writeFileAtomic, writeTogether } from "../io/atomic.js";
import { loadField, snapshotGrid, type LoadedField } from "../simulation/from-snapshot.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { snapshotTables } from "./snapshot-tables.js";
import { checkHaloRequest, haloTables } from "./halo-tables.js";
import { snapshotPictures, timeCaption } from "./snapshot-pictures.js";
import { powerPlot } from "./plots.js";
import { runFigures, type RunOutputs } from "./run-figures.js";
import { checkSliceIndex, DEFAULT_PICTURES, type PictureOptions } from "./picture-options.js";
import type { DensityPlane } from "./planes.js";
import { prepareFigures, type Figure } from "./render.js";
import { checkDiagnostics, type DiagnosticRequest, type FieldDiagnostic } from "./diagnostic-options.js";
import { fieldDiagnostics, physicalScales } from "./field-diagnostics.js";
import { diagnosticFigures, splitFigures, vortexFigure } from "./diagnostic-plots.js";
import { AnalysisTransforms } from "./analysis-transforms.js";
import { energyAndKineticSplit } from "../diagnostics/energy-split.js";
import { granuleStats, type GranuleStats } from "../diagnostics/granules.js";
import { speciesSummary } from "./species-summary.js";

export { AnalysisTransforms } from "./analysis-transforms.js";

const KPC = 1e3 * PC_M;

/** What analysing one snapshot produced. */
export interface SnapshotAnalysis {
  readonly file: string;
  readonly dir: string;
  readonly summary: Record<string, unknown>;
  readonly figures: Record<string, Figure>;
  /** The planes behind the density pictures (for movie frames on a common colour range). */
  readonly planes: { slice?: DensityPlane; projection?: DensityPlane };
  readonly time: number;
  readonly caption: string;
}

/** Write a figure as NAME.png and NAME.svg. */
export function writeFigure(dir: string, name: string, fig: Figure): void {
  writeFileAtomic(path.join(dir, `${name}.png`), fig.png);
  writeFileAtomic(path.join(dir, `${name}.svg`), fig.svg);
}

function units(field: LoadedField): { kpcPerCode: number; densityUnit: number } {
  const u = field.units;
  return { kpcPerCode: u.lengthM / KPC, densityUnit: u.massKg / u.lengthM ** 3 / (M_SUN_KG / KPC ** 3) };
}

/** A promise awaited later: marked handled now, so that a failure elsewhere first does not leave it unhandled. */
function later<T>(p: Promise<T>): Promise<T> {
  p.catch(() => undefined);
  return p;
}

/** What the numbers of a snapshot give the pictures. */
interface Measured {
  readonly summary: Record<string, unknown>;
  readonly diagnostics: ReturnType<typeof fieldDiagnostics>;
  readonly powerFigure?: Promise<Figure>;
  /** The diagnostics' figures started already: the vortices' (as soon as the census is known) and, in a run, the energy split's. */
  readonly started?: Record<string, Promise<Figure>>;
}

/**
 * The tables and the field diagnostics of a snapshot; P(k)'s and the vortices' figures are handed to the figure
 * worker as soon as they are known, and drawn while the rest is computed. The energy split's figures are too in
 * a run (its grids are kept anyway); one snapshot's are drawn after its grids are given back, with the other
 * diagnostics' figures: the energy spectra's is the widest figure (1890×975 pixels at 128³), and the memory
 * resvg's allocator keeps after drawing it and the velocity power stayed on top of the grids to the end of the
 * numbers (about 11 MB of the analysis's peak at 128³, at the same wall time).
 */
async function measure(file: string, snap: Snapshot, field: LoadedField, outDir: string, request: DiagnosticRequest, chosen: Set<FieldDiagnostic>, withPictures: boolean, transforms: AnalysisTransforms, tracks: RunTracks | undefined): Promise<Measured> {
  const fft = transforms.of(field.grid);
  // the vortex scan reads ψ on a thread of its own while this one computes the rest (on a grid the cores pay for)
  const vortexJob = chosen.has("vortices") ? transforms.vortices(field.grid, field.psi, physicalScales(field).kpc) : undefined;
  if (vortexJob) later(vortexJob);
  // the energy split's passes give the tables' kinetic split, ψ's moments and ρ̄ too: run even when the split is not
  // asked for, since they cost less time and memory than the kinetic split alone (128³ tables: 0.4 against 0.5 s,
  // 215 against 228 MB peak)
  const both = energyAndKineticSplit(field.grid, field.psi, field.scaleFactor, fft);
  const split = withPictures && chosen.has("energy-split") && !transforms.single ? splitFigures(field, both.split, physicalScales(field), timeCaption(snap)) : undefined;
  if (split) Object.values(split).forEach(later);
  // the granules from δ's spectrum while P(k) leaves it in work grid 0 (with ψ's moments and ρ̄ from the split)
  let granules: GranuleStats | undefined;
  const inputs = { moments: both.moments, meanDensity: both.meanDensity };
  // the granules' transforms are the last passes on the pool's threads: stopped right after them (the rest of the
  // tables runs on this thread), their heaps are given back while the densest points and the halos are measured
  const contrast = chosen.has("granules")
    ? (spectrum: Float64Array) => {
        granules = granuleStats(field.grid, field.psi, field.scaleFactor, fft, undefined, undefined, { contrastSpectrum: spectrum, ...inputs });
        transforms.poolDone();
      }
    : undefined;
  const { summary, power } = snapshotTables(file, snap, field, outDir, fft, both, contrast);
  // the halos, the census and the rest run on this thread and the helper's: the pool's thread is given back (now, without the granules)
  transforms.poolDone();
  const powerFigure = withPictures ? later(powerFigureOf(file, snap, field, power)) : undefined;
  // the halos' scratch: the first half of work grid 1, as the densest points' (snapshot-tables.ts)
  summary["halos"] = haloTables(file, snap, field, outDir, request.halos ?? { definition: "200m" }, tracks, fft.work(1));
  const species = speciesSummary(snap, field, outDir);
  if (species) summary["species"] = species;
  const vortices = vortexJob ? await vortexJob : undefined;
  // its picture is drawn while the granules and the Husimi distribution are measured
  const vortexPicture = withPictures && vortices ? later(vortexFigure(field, vortices.report, physicalScales(field), timeCaption(snap))) : undefined;
  const diagnostics = fieldDiagnostics(field, chosen, outDir, fft, request.husimiWindowKpc, request.husimiPointsKpc, both.split, granules, vortices);
  return { summary, diagnostics, ...(powerFigure ? { powerFigure } : {}), started: { ...split, ...(vortexPicture ? { vortices: vortexPicture } : {}) } };
}

/** The P(k) figure, with the linear prediction of a cosmological run. */
function powerFigureOf(file: string, snap: Snapshot, field: LoadedField, power: { k: number; P: number }[]): Promise<Figure> {
  // bins at round-off level (a field with a few modes) would only stretch the log axis
  const maxP = Math.max(...power.map((b) => b.P));
  const d = field.grid.dims;
  return powerPlot(power.filter((b) => b.P > 1e-12 * maxP), linearPrediction(file, field), "k [1/kpc]", `P(k) [kpc${["", "", "²", "³"][d]}]`, "Density power spectrum", timeCaption(snap));
}

/**
 * Analyse one snapshot into `outDir` (created), with the field diagnostics of `request` and pictures drawn as
 * `pictures` says. Its files are made durable together at the end (writeTogether: one round of fsyncs on the
 * thread pool instead of one per file on the main thread).
 */
export function analyzeSnapshot(...args: Parameters<typeof analyzeSnapshotFiles>): Promise<SnapshotAnalysis> {
  return writeTogether(() => analyzeSnapshotFiles(...args));
}

async function analyzeSnapshotFiles(
  file: string,
  outDir: string,
  withPictures = true,
  request: DiagnosticRequest = {},
  pictures: PictureOptions = DEFAULT_PICTURES,
  transforms?: AnalysisTransforms,
  tracks?: RunTracks,
): Promise<SnapshotAnalysis> {
  const own = transforms ?? new AnalysisTransforms(true);
  try {
    return await analyzeWith(file, outDir, withPictures, request, pictures, own, tracks);
  } finally {
    if (!transforms) await own.close();
  }
}

/** What a snapshot's numbers leave for the rest of its analysis: no view of ψ or of the transforms' grids. */
interface SnapshotNumbers {
  readonly summary: Record<string, unknown>;
  readonly time: number;
  readonly caption: string;
  /** The figures, requested already (with pictures). */
  readonly figures?: {
    readonly density: ReturnType<typeof snapshotPictures>;
    readonly power: Promise<Figure>;
    /** The diagnostics' figures not started yet (the granules', the Husimi distribution's, one snapshot's energy split's), requested by calling it. */
    readonly diagnostic: () => ReturnType<typeof diagnosticFigures>;
  };
}

/** analyzeSnapshot on the given transforms. */
async function analyzeWith(file: string, outDir: string, withPictures: boolean, request: DiagnosticRequest, pictures: PictureOptions, transforms: AnalysisTransforms, tracks: RunTracks | undefined): Promise<SnapshotAnalysis> {
  const { summary, time, caption, figures: drawn } = await snapshotNumbers(file, outDir, withPictures, request, pictures, transforms, tracks);
  // the density pictures are the last to read ψ: once they are drawn, one snapshot's grids are given back (a run's kept)
  await transforms.numbersDone(drawn?.density.catch(() => undefined));
  const figures: Record<string, Figure> = {};
  const planes: SnapshotAnalysis["planes"] = {};
  if (drawn) {
    // drawn together: they share the figure workers. The diagnostics' last figures are the largest (the granules',
    // the Husimi points' and the energy spectra's are 7-13 MB of pixels each at 128³, and resvg holds a copy of
    // them besides): sent to the worker only now, their pixels no longer come on top of one snapshot's grids
    const [pics, power, diagnostic] = await Promise.all([drawn.density, drawn.power, drawn.diagnostic()]);
    figures["slice"] = pics.slice;
    if (pics.projection) figures["projection"] = pics.projection;
    if (pics.slicePlane) planes.slice = pics.slicePlane;
    if (pics.projectionPlane) planes.projection = pics.projectionPlane;
    figures["power"] = power;
    Object.assign(figures, diagnostic);
    for (const [name, fig] of Object.entries(figures)) writeFigure(outDir, name, fig);
  }
  return { file, dir: outDir, summary, figures, planes, time, caption };
}

/** Read a snapshot, compute its numbers, write its tables and summary.json, and request its figures. */
async function snapshotNumbers(file: string, outDir: string, withPictures: boolean, request: DiagnosticRequest, pictures: PictureOptions, transforms: AnalysisTransforms, tracks: RunTracks | undefined): Promise<SnapshotNumbers> {
  // fontconfig answers, the figure workers and the transforms' threads start while the snapshot is read
  if (withPictures) prepareFigures();
  const snap = readSnapshot(file, false, transforms.psiOf(snapshotGrid(readSnapshotMeta(file))));
  const chosen = checkDiagnostics(request, snap.meta.cells.length, snap.meta.boxSizeKpc, snap.meta.cells, file);
  if (withPictures) checkSliceIndex(pictures, snap.meta.cells, file);
  checkHaloRequest(request.halos ?? { definition: "200m" }, snap, file);
  // the pictures read only the snapshot's metadata: the field takes its ψ over (one grid less in memory)
  const field = loadField(snap, true);
  fs.mkdirSync(outDir, { recursive: true });
  const { kpcPerCode, densityUnit } = units(field);
  // the density pictures need ψ alone: drawn while the numbers are computed
  const density = withPictures ? later(snapshotPictures(snap, field, kpcPerCode, densityUnit, pictures)) : undefined;
  const { summary, diagnostics, powerFigure, started } = await measure(file, snap, field, outDir, request, chosen, withPictures, transforms, tracks);
  Object.assign(summary, diagnostics.summary);
  writeFileAtomic(path.join(outDir, "summary.json"), JSON.stringify(summary, null, 2) + "\n");
  const caption = timeCaption(snap);
  const numbers = { summary, time: snap.meta.time, caption };
  if (!density || !powerFigure) return numbers;
  // the diagnostics' figures need the grid, not ψ (a field without it, made now: the closure holds no view of ψ)
  const bare = { ...field, psi: new Float64Array(0) };
  const scales = physicalScales(field);
  const diagnostic = () => diagnosticFigures(bare, diagnostics, scales, caption, started);
  return { ...numbers, figures: { density, power: powerFigure, diagnostic } };
}

/** The linear prediction for a cosmological run: its initial-power.csv (beside snapshots/) scaled by D(a)²/D(1)². */
function linearPrediction(file: string, field: LoadedField): { k: number; P: number }[] | undefined {
  const table = path.join(path.dirname(path.dirname(path.resolve(file))), "initial-power.csv");
  if (!fs.existsSync(table) || field.background.kind !== "lcdm") return undefined;
  const g = field.background.growth(field.scaleFactor) / field.background.growth(1);
  const lines = fs.readFileSync(table, "utf8").trim().split("\n").slice(1);
  // columns: k [h/Mpc], k [1/Mpc], …, P_z0 [Mpc³] (5th): to 1/kpc and kpc³
  return lines.map((l) => {
    const c = l.split(",").map(Number);
    return { k: c[1]! / 1e3, P: c[4]! * 1e9 * g * g };
  });
}

export interface RunAnalysisOptions {
  readonly frames?: boolean;
  readonly movie?: boolean;
  readonly pictures?: boolean;
  readonly pictureOptions?: PictureOptions;
  readonly diagnostics?: DiagnosticRequest;
  /** Called after each snapshot (done, total). */
  readonly onSnapshot?: (done: number, total: number) => void;
}

/** The snapshot files of a run folder, in order. */
export function runSnapshots(runDir: string): string[] {
  const snapDir = path.join(runDir, "snapshots");
  return fs.readdirSync(snapDir).filter((f) => /^snap_\d{5}\.h5$/.test(f)).sort().map((f) => path.join(snapDir, f));
}

/** Refuse a run folder whose snapshots are not all of one run (before anything is written); returns the run's identity. */
export function checkRunSnapshots(runDir: string): string | undefined {
  const files = runSnapshots(runDir);
  return files.length ? checkOneRun(files, files.map(readSnapshotMeta), "following halos through a run") : undefined;
}

/** Analyse a run folder: every snapshot, its halos followed through them, plus run-level figures (and frames and a movie when asked). */
export async function analyzeRun(runDir: string, outDir: string, options: RunAnalysisOptions = {}): Promise<{ snapshots: SnapshotAnalysis[]; figures: Record<string, Figure>; tracks: RunTracks } & RunOutputs> {
  const files = runSnapshots(runDir);
  const identity = checkRunSnapshots(runDir) ?? "";
  const pictures = options.pictures !== false;
  const pictureOptions = options.pictureOptions ?? DEFAULT_PICTURES;
  const snapshots: SnapshotAnalysis[] = [];
  const transforms = new AnalysisTransforms();
  const tracks = new RunTracks();
  try {
    for (const f of files) {
      snapshots.push(await analyzeSnapshot(f, path.join(outDir, path.basename(f, ".h5")), pictures, options.diagnostics, pictureOptions, transforms, tracks));
      options.onSnapshot?.(snapshots.length, files.length);
    }
  } finally {
    await transforms.close();
  }
  if (files.length) tracks.write(outDir, identity);
  if (!pictures) return { snapshots, figures: {}, tracks };
  // the run's figures need the first snapshot's metadata only
  const first = files[0] ? readSnapshotMeta(files[0]) : undefined;
  const run = await runFigures(runDir, outDir, snapshots, files, first, { frames: options.frames === true, movie: options.movie === true, pictures: pictureOptions });
  if (first) Object.assign(run.figures, await haloFigures(tracks, first));
  for (const [name, fig] of Object.entries(run.figures)) writeFigure(outDir, name, fig);
  if (options.frames || options.movie) {
    // 1D runs: the Husimi x–v image over the snapshots, as a second set of frames
    snapshots.forEach((s, i) => {
      const husimi = s.figures["husimi"];
      if (husimi) writeFileAtomic(path.join(outDir, "frames", `husimi_${String(i).padStart(5, "0")}.png`), husimi.png);
    });
  }
  return { snapshots, ...run, tracks };
}
