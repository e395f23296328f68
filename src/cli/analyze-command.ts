/** `psibox analyze PATH...` and `psibox report RUN_DIR`. */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { notRunFolder } from "../simulation/run-folder.js";
import { loadHdf5 } from "../io/h5.js";
import { analyzeRun, analyzeSnapshot, checkRunSnapshots, runSnapshots } from "../report/analyze.js";
import { writeReport } from "../report/html.js";
import { prepareFigures } from "../report/render.js";
import { pictureOptions, type PictureFlags } from "../report/picture-options.js";
import { formatDuration } from "../core/format.js";
import { TextReporter } from "./progress.js";
import { parseDiagnosticList, parseHusimiPoints, type DiagnosticRequest } from "../report/diagnostic-options.js";
import { parseAs } from "../physics/units.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { parseOverdensity } from "../physics/cosmology/overdensity.js";
import type { HaloRequest } from "../report/halo-tables.js";
import { recordIfInside } from "../simulation/run-manifest.js";

export interface AnalyzeFlags extends PictureFlags {
  out?: string;
  frames: boolean;
  movie: boolean;
  pictures: boolean;
  /** Comma-separated field diagnostics (energy-split, vortices, granules, husimi) or "none". */
  diagnostics?: string;
  /** Husimi window η, a length such as "0.5 kpc". */
  husimiWindow?: string;
  /** Points for the Husimi momentum distribution, "x,y[,z];…" in kpc. */
  husimiPoints?: string;
  /** Halo definition: 200c, 200m or vir. */
  overdensity?: string;
  /** Smallest halo mass, e.g. "1e8 Msun". */
  haloMinMass?: string;
}

/** A physical value of a flag, with the flag's name in the error. */
function flagValue(flag: string, text: string, kind: "length" | "mass"): number {
  try {
    return parseAs(text, kind);
  } catch (e) {
    throw new InputError(`${flag}: ${(e as Error).message}`);
  }
}

/** The halo catalogue's request of the flags. */
export function haloRequest(flags: Pick<AnalyzeFlags, "overdensity" | "haloMinMass">): HaloRequest {
  const minMassMsun = flags.haloMinMass !== undefined ? flagValue("--halo-min-mass", flags.haloMinMass, "mass") / M_SUN_KG : undefined;
  if (minMassMsun !== undefined && !(minMassMsun > 0)) throw new InputError(`--halo-min-mass: must be above zero, e.g. "1e8 Msun"`);
  return { definition: parseOverdensity(flags.overdensity ?? "200m"), ...(minMassMsun !== undefined ? { minMassMsun } : {}) };
}

/** The field-diagnostics request of the flags (one-line errors naming the option). */
export function diagnosticRequest(flags: AnalyzeFlags): DiagnosticRequest {
  const husimiWindowKpc = flags.husimiWindow !== undefined ? flagValue("--husimi-window", flags.husimiWindow, "length") / (1e3 * PC_M) : undefined;
  return {
    halos: haloRequest(flags),
    ...(flags.diagnostics !== undefined ? { only: parseDiagnosticList(flags.diagnostics) } : {}),
    ...(husimiWindowKpc !== undefined ? { husimiWindowKpc } : {}),
    ...(flags.husimiPoints !== undefined ? { husimiPointsKpc: parseHusimiPoints(flags.husimiPoints) } : {}),
  };
}

const what = (flags: AnalyzeFlags): string => (flags.pictures ? "tables and pictures" : "tables (no pictures)");

function runFolder(p: string): string[] {
  if (!fs.existsSync(path.join(p, "snapshots"))) throw notRunFolder(p, "snapshots/");
  return runSnapshots(p);
}

/** Analyse run folders and snapshot files; returns the exit code. */
export async function analyzeCommand(paths: readonly string[], flags: AnalyzeFlags): Promise<number> {
  const pictures = pictureOptions(flags);
  const diagnostics = diagnosticRequest(flags);
  if ((flags.movie || flags.frames) && !flags.pictures) throw new InputError(`--${flags.movie ? "movie" : "frames"}: cannot be combined with --no-pictures`);
  for (const p of paths) {
    if (!fs.existsSync(p)) throw new InputError(`${p}: no such file or folder`);
    const dir = fs.statSync(p).isDirectory();
    if (flags.movie && !dir) throw new InputError(`--movie: needs a run folder with at least two snapshots; ${p} is a file`);
    if (flags.movie && runFolder(p).length < 2) throw new InputError(`--movie: needs at least two snapshots; ${p} has ${runFolder(p).length}`);
  }
  // the figure worker starts (loads its modules, asks fontconfig) while HDF5 is loaded here
  if (flags.pictures) prepareFigures();
  await loadHdf5();
  // halos are followed through a run's snapshots: refuse a folder that mixes runs before anything is written
  for (const p of paths) if (fs.statSync(p).isDirectory() && fs.existsSync(path.join(p, "snapshots"))) checkRunSnapshots(p);
  const reporter = new TextReporter();
  for (const p of paths) {
    const started = performance.now();
    if (fs.statSync(p).isDirectory()) {
      runFolder(p);
      const out = flags.out ?? path.join(p, "analysis");
      recordIfInside(p, out, true);
      const r = await analyzeRun(p, out, { frames: flags.frames, movie: flags.movie, pictures: flags.pictures, pictureOptions: pictures, diagnostics, onSnapshot: (done, total) => reporter.progress(done / total, `snapshot ${done} of ${total}`) });
      reporter.endPhase();
      process.stdout.write(`${p}: ${r.snapshots.length} snapshots analysed in ${formatDuration((performance.now() - started) / 1000)}; ${what(flags)} in ${out}\n`);
      if (r.movieNote) process.stdout.write(`${r.movie ? `wrote ${r.movie}: ` : ""}${r.movieNote}\n`);
    } else {
      const out = flags.out ?? path.join(path.dirname(p), "..", "analysis", path.basename(p, ".h5"));
      recordIfInside(path.join(path.dirname(p), ".."), out, true);
      await analyzeSnapshot(p, out, flags.pictures, diagnostics, pictures);
      process.stdout.write(`${p}: analysed in ${formatDuration((performance.now() - started) / 1000)}; ${what(flags)} in ${out}\n`);
    }
  }
  return 0;
}

/** Write a run's HTML report; returns the exit code. */
export async function reportCommand(runDir: string, flags: PictureFlags & { out?: string; overdensity?: string; haloMinMass?: string }): Promise<number> {
  const pictures = pictureOptions(flags);
  const halos = haloRequest(flags);
  if (!fs.existsSync(runDir)) throw new InputError(`${runDir}: no such folder`);
  if (fs.existsSync(path.join(runDir, "sweep.json"))) {
    const { writeSweepReport } = await import("../batch/sweep-report.js");
    process.stdout.write(`wrote ${await writeSweepReport(runDir, flags.out)}\n`);
    return 0;
  }
  if (fs.existsSync(path.join(runDir, "ensemble.json"))) {
    const { writeEnsembleReport } = await import("../report/ensemble-report.js");
    recordIfInside(runDir, flags.out ?? path.join(runDir, "report.html"));
    process.stdout.write(`wrote ${await writeEnsembleReport(runDir, flags.out)}\n`);
    return 0;
  }
  prepareFigures();
  await loadHdf5();
  if (fs.existsSync(path.join(runDir, "snapshots"))) checkRunSnapshots(runDir);
  recordIfInside(runDir, path.join(runDir, "analysis"), true);
  recordIfInside(runDir, flags.out ?? path.join(runDir, "report.html"));
  const reporter = new TextReporter();
  const file = await writeReport(runDir, flags.out, { pictureOptions: pictures, diagnostics: { halos }, onSnapshot: (done, total) => reporter.progress(done / total, `snapshot ${done} of ${total}`) });
  reporter.endPhase();
  process.stdout.write(`wrote ${file}\n`);
  return 0;
}
