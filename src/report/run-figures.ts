/**
 * A run's own figures, after its snapshots are analysed: energies, the
 * sidecar's clocks and the measured breakdown from the time series, the space–time diagram of a 1D run, and the
 * movie frames (2D: the density; 3D: the column density along the chosen
 * axis; 1D: the density profile) on one colour range for the whole run,
 * encoded into a movie when asked and an encoder is found.
 */
import fs from "node:fs";
import path from "node:path";
import type { SnapshotMeta } from "../io/snapshot.js";
import { readSnapshot } from "../io/snapshot.js";
import { rasterPool } from "./raster-pool.js";
import { writeFileAtomic } from "../io/atomic.js";
import { unitInSI } from "../physics/units.js";
import { formatNumber } from "../core/format.js";
import { energiesPlot, clocksPlot, type Ring } from "./run-plots.js";
import { spacetimeFigure } from "./spacetime.js";
import { breakdownPlot, type BreakdownMarks } from "./breakdown-plot.js";
import { colourRange, fieldFigure } from "./field-image.js";
import { densityLinePlot, type Row } from "./plots.js";
import { AXIS_NAMES, type DensityPlane } from "./planes.js";
import { axisUnit } from "./snapshot-pictures.js";
import { encodeMovie, findEncoder } from "./movie.js";
import type { PictureOptions } from "./picture-options.js";
import { figuresTogether, type Figure } from "./render.js";

export interface RunOutputs {
  readonly figures: Record<string, Figure>;
  readonly frames?: number;
  /** The movie file, when one was encoded. */
  readonly movie?: string;
  /** What happened to the movie, in a sentence (encoder used, or why there are only frames). */
  readonly movieNote?: string;
}

interface SnapshotLike {
  readonly planes: { slice?: DensityPlane; projection?: DensityPlane };
  readonly time: number;
  readonly caption: string;
}

function readSeries(file: string): { rows: Row[]; tCol: string; unit: string } | undefined {
  if (!fs.existsSync(file)) return undefined;
  const [header, ...lines] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  const rows = lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i]!, cols[i] === "limiter" ? v : Number(v)])));
  const tCol = cols.find((c) => c.startsWith("t_"))!;
  return rows.length ? { rows, tCol, unit: tCol.slice(2) } : undefined;
}

const CLOCK_LABELS: Record<string, string> = { "squeezing-onset": "onset", "squeezing-level": "target", "phase-diffusion": "dephased", "classical-breakdown": "breakdown" };

function clockInfo(runDir: string, t0: number, unit: string): { targetDb: number; rings: Ring[] } {
  const file = path.join(runDir, "clocks.json");
  if (!fs.existsSync(file)) return { targetDb: -10, rings: [] };
  const c = JSON.parse(fs.readFileSync(file, "utf8")) as { squeezing_db_target?: number; clocks: { name: string; reached: boolean; time_s: number | null }[] };
  const perUnit = unitInSI(unit);
  const rings = c.clocks.filter((k) => k.reached && k.time_s !== null).map((k) => ({ t: t0 + k.time_s! / perUnit, label: CLOCK_LABELS[k.name] ?? k.name }));
  return { targetDb: c.squeezing_db_target ?? -10, rings };
}

/** A measured breakdown clock in summary.json. */
type MeasuredClock = { verdict: string; time_s: number | null } | undefined;

/** ln N, the depletion clock's fraction and the measured clocks that rang, from summary.json's lyapunov and depletion parts. */
function breakdownMarks(runDir: string, t0: number, unit: string): BreakdownMarks | undefined {
  const file = path.join(runDir, "summary.json");
  if (!fs.existsSync(file)) return undefined;
  const s = JSON.parse(fs.readFileSync(file, "utf8")) as Record<string, unknown>;
  const ly = s["lyapunov"] as { scrambling_clock: MeasuredClock & { ln_N: number }; depletion_time_from_rate: MeasuredClock } | undefined;
  const dep = s["depletion"] as { particles_N: number; depletion_clock: MeasuredClock & { fraction: number } } | undefined;
  const lnN = ly?.scrambling_clock.ln_N ?? (dep ? Math.log(dep.particles_N) : undefined);
  if (lnN === undefined) return undefined;
  const perUnit = unitInSI(unit);
  const named: [string, MeasuredClock][] = [["depletion", dep?.depletion_clock], ["½ ln N", ly?.depletion_time_from_rate], ["scrambling", ly?.scrambling_clock]];
  const rings = named.filter(([, c]) => c?.verdict === "rang" && c.time_s !== null).map(([label, c]) => ({ t: t0 + c!.time_s! / perUnit, label }));
  return { lnN, ...(dep ? { fraction: dep.depletion_clock.fraction } : {}), rings };
}

/** Frames drawn at a time: their rasterising shares the thread pool, and few are held in memory at once. */
const FRAMES_TOGETHER = 4;

/** Run `draw(0 … count − 1)` in groups of FRAMES_TOGETHER at a time. */
async function inGroups(count: number, draw: (i: number) => Promise<void>): Promise<void> {
  for (let i0 = 0; i0 < count; i0 += FRAMES_TOGETHER) {
    await Promise.all(Array.from({ length: Math.min(FRAMES_TOGETHER, count - i0) }, (_, j) => draw(i0 + j)));
  }
}

/**
 * The texts of `texts` with the most characters or one fewer (at most eight): among them the widest when set
 * (digits, most of what differs between a run's captions, are all one width in the figure font), sent with each
 * frame instead of all.
 */
function longest(texts: readonly string[]): string[] {
  const most = Math.max(...texts.map((t) => t.length));
  return [...new Set(texts.filter((t) => t.length >= most - 1))].slice(0, 8);
}

/** Frames of the whole run on one colour range; returns how many were written. */
async function writeFrames(snapshots: readonly SnapshotLike[], files: readonly string[], frameDir: string, first: SnapshotMeta, opts: PictureOptions): Promise<number> {
  fs.mkdirSync(frameDir, { recursive: true });
  // many figures of one kind: a second figure worker draws beside the first
  rasterPool(2);
  for (const f of fs.readdirSync(frameDir)) if (/^frame_\d{5}\.png$/.test(f)) fs.rmSync(path.join(frameDir, f));
  const dims = first.cells.length;
  const frame = (i: number) => path.join(frameDir, `frame_${String(i).padStart(5, "0")}.png`);
  if (dims === 1) {
    const profiles = files.map((f) => {
      const s = readSnapshot(f);
      const n = s.meta.cells[0]!;
      const unit = s.meta.boxSizeKpc[0]! / n;
      return Array.from({ length: n }, (_, i) => ({ x: i * unit, rho: s.psi[2 * i]! ** 2 + s.psi[2 * i + 1]! ** 2 }));
    });
    const all = profiles.flat().map((p) => p.rho);
    // every frame as wide as the widest (the subtitles' times and steps differ in length)
    const room = longest(snapshots.map((s) => s.caption));
    await inGroups(profiles.length, async (i) => writeFileAtomic(frame(i), (await densityLinePlot(profiles[i]!, "x [kpc]", "ρ [Msun/kpc³]", "Density", snapshots[i]!.caption, all, room)).png));
    return profiles.length;
  }
  const pick = (s: SnapshotLike) => (dims === 3 ? s.planes.projection : s.planes.slice)!;
  const logs = snapshots.map((s) => pick(s).values.map((v) => (v > 0 ? Math.log10(v) : -Infinity)));
  let hi = -Infinity;
  for (const l of logs) for (const v of l) if (v > hi) hi = v;
  const fixed = dims === 3 ? opts.columnRange : opts.densityRange;
  const range = fixed ? ([fixed[0], fixed[1]] as const) : colourRange(Float64Array.of(hi - opts.decades, hi), opts.decades);
  const p0 = pick(snapshots[0]!);
  const unit = axisUnit(Math.max(...first.boxSizeKpc)).name;
  const subtitles = snapshots.map((s) => `${s.caption}; ${fixed ? "fixed colours" : `colours: the run's maximum and ${formatNumber(opts.decades)} decades below`}`);
  const room = longest(subtitles);
  await inGroups(snapshots.length, async (i) => {
    const s = snapshots[i]!;
    const plane = pick(s);
    const fig = await fieldFigure(
      { ...plane, values: logs[i]! },
      {
        xTitle: `${AXIS_NAMES[p0.across]} [${unit}]`,
        yTitle: `${AXIS_NAMES[p0.up]} [${unit}]`,
        legend: dims === 3 ? "log₁₀ Σ [Msun/kpc²]" : "log₁₀ ρ [Msun/kpc³]",
        title: dims === 3 ? `Column density along ${AXIS_NAMES[p0.normal!]}` : "Density",
        subtitle: subtitles[i]!,
        // every frame as wide as the widest (the subtitles' times and steps differ in length)
        subtitleRoom: room,
        range,
        colourMap: opts.colourMap,
      },
    );
    writeFileAtomic(frame(i), fig.png);
  });
  return snapshots.length;
}

/** Make the run's figures (and frames and movie when asked). */
export async function runFigures(runDir: string, outDir: string, snapshots: readonly SnapshotLike[], files: readonly string[], first: SnapshotMeta | undefined, opts: { frames: boolean; movie: boolean; pictures: PictureOptions }): Promise<RunOutputs> {
  const pending: Record<string, Promise<Figure>> = {};
  const series = readSeries(path.join(runDir, "timeseries.csv"));
  if (series) {
    const tTitle = `t [${series.unit}]`;
    pending["energies"] = energiesPlot(series.rows, series.tCol, tTitle);
    if ("squeezing_dB" in series.rows[0]!) {
      const lnN = Math.log(Number(series.rows[0]!["particles_N"]));
      const clocks = clockInfo(runDir, Number(series.rows[0]![series.tCol]), series.unit);
      pending["clocks"] = clocksPlot(series.rows, series.tCol, tTitle, { lnN, ...clocks });
    }
    const marks = "lyapunov_integral" in series.rows[0]! || "depleted_N" in series.rows[0]! ? breakdownMarks(runDir, Number(series.rows[0]![series.tCol]), series.unit) : undefined;
    if (marks) pending["breakdown"] = breakdownPlot(series.rows, series.tCol, tTitle, marks);
  }
  if (first && first.cells.length === 1 && files.length > 1) {
    const rows = files.map((f) => {
      const s = readSnapshot(f);
      return { t: s.meta.time, logRho: Float64Array.from({ length: s.meta.cells[0]! }, (_, i) => Math.log10(Math.max(s.psi[2 * i]! ** 2 + s.psi[2 * i + 1]! ** 2, 1e-300))) };
    });
    pending["spacetime"] = spacetimeFigure(rows, first.boxSizeKpc[0]!, first.timeUnit, { colourMap: opts.pictures.colourMap, decades: opts.pictures.decades, ...(opts.pictures.densityRange ? { range: opts.pictures.densityRange } : {}) });
  }
  // drawn together: their rasterising shares the thread pool
  const figures = await figuresTogether(pending);
  if (!(opts.frames || opts.movie) || !first) return { figures };
  const frameDir = path.join(outDir, "frames");
  const frames = await writeFrames(snapshots, files, frameDir, first, opts.pictures);
  if (!opts.movie) return { figures, frames };
  const encoder = findEncoder();
  if (!encoder) return { figures, frames, movieNote: `no video encoder found (ffmpeg with libx264 or libvpx on the PATH); the movie is the ${frames} frames in ${frameDir}` };
  const movie = encodeMovie(encoder, frameDir, path.join(outDir, "movie"));
  return { figures, frames, movie, movieNote: `movie of ${frames} frames (${formatNumber(4)} per second) encoded by ${encoder.program} with ${encoder.codec}` };
}
